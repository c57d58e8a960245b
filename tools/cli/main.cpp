// liveprob: one program, one subcommand per job. Errors are one line on stderr; exit codes are
// 0 success, 1 runtime failure, 2 bad usage.
#include <algorithm>
#include <exception>
#include <iostream>
#include <utility>

#include "command_registry.hpp"
#include "liveprob/system/version.hpp"

namespace liveprob::cli {
std::vector<Command>& command_registry() {
    static std::vector<Command> commands;
    return commands;
}
}  // namespace liveprob::cli

int main(int argc, char** argv) {
    using namespace liveprob::cli;
    CLI::App app{"liveprob: live football win/draw/loss probabilities (estimates, not advice)",
                 "liveprob"};
    app.set_version_flag("--version",
                         std::string("liveprob ") + liveprob::system::version_string());
    app.require_subcommand(1);
    app.fallthrough(false);

    auto& commands = command_registry();
    std::sort(commands.begin(), commands.end(),
              [](const Command& a, const Command& b) { return a.name < b.name; });
    std::vector<std::pair<CLI::App*, std::function<int()>>> runners;
    for (const auto& command : commands) {
        CLI::App* sub = app.add_subcommand(command.name, command.summary);
        runners.emplace_back(sub, command.setup(*sub));
    }

    try {
        app.parse(argc, argv);
    } catch (const CLI::CallForHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForAllHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForVersion& e) {
        return app.exit(e);
    } catch (const CLI::ParseError& e) {
        std::cerr << "liveprob: usage error: " << e.what() << " (try --help)\n";
        return kExitUsage;
    }

    for (auto& [sub, run] : runners) {
        if (!sub->parsed()) continue;
        try {
            return run();
        } catch (const UsageError& e) {
            std::cerr << "liveprob " << sub->get_name() << ": usage error: " << e.what() << "\n";
            return kExitUsage;
        } catch (const std::exception& e) {
            std::cerr << "liveprob " << sub->get_name() << ": error: " << e.what() << "\n";
            return kExitFailure;
        }
    }
    return kExitUsage;  // unreachable: require_subcommand(1)
}
