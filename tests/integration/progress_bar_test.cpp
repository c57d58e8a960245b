// The progress bar of `replay` and `import`: drawn, with its rate and ETA, when standard error is
// a terminal (the program runs on a pseudo-terminal here); never with --quiet, and never when
// standard error is a file or a pipe.
#include <catch2/catch.hpp>

#include <pty.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/demo/demo_season.hpp"
#include "test_env.hpp"

namespace {

struct TerminalRun {
    int exit_code = -1;
    std::string screen;  // everything the program wrote to its terminal
};

// Runs the program with a pseudo-terminal as its standard input, output and error.
TerminalRun run_on_terminal(const std::vector<std::string>& argv) {
    std::vector<char*> args;
    for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
    args.push_back(nullptr);
    int master = -1;
    const pid_t pid = ::forkpty(&master, nullptr, nullptr, nullptr);
    REQUIRE(pid >= 0);
    if (pid == 0) {
        ::execv(args[0], args.data());
        ::_exit(127);
    }
    TerminalRun run;
    char buffer[4096];
    for (;;) {
        const ssize_t n = ::read(master, buffer, sizeof buffer);
        if (n > 0) {
            run.screen.append(buffer, static_cast<std::size_t>(n));
        } else if (n < 0 && errno == EINTR) {
            continue;
        } else {
            break;  // EIO once the program has exited and closed the terminal
        }
    }
    ::close(master);
    int status = 0;
    ::waitpid(pid, &status, 0);
    run.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return run;
}

}  // namespace

TEST_CASE("progress bar: rate and ETA on a terminal, nothing with --quiet or when not a terminal",
          "[progress]") {
    const auto dir = liveprob::test::scratch_dir("progress-bar");
    const auto season =
        liveprob::demo::simulate_demo_season(liveprob::demo::make_demo_league(4), 4);
    std::vector<liveprob::core::InboundMessage> all;
    for (const auto& m : season.league) all.insert(all.end(), m.messages.begin(), m.messages.end());
    liveprob::backtest::write_stream(dir / "season.stream", all,
                                     liveprob::backtest::StreamForm::frames);
    const std::string bin = liveprob::test::liveprob_binary().string();

    const auto shown = run_on_terminal(
        {bin, "replay", (dir / "season.stream").string(), "--report", (dir / "a").string()});
    INFO(shown.screen);
    CHECK(shown.exit_code == 0);
    CHECK(shown.screen.find("replay [########################] 380/380 matches") !=
          std::string::npos);
    CHECK(shown.screen.find("matches/s  ETA 0:00") != std::string::npos);

    const auto quiet = run_on_terminal({bin, "replay", (dir / "season.stream").string(), "--report",
                                        (dir / "b").string(), "--quiet"});
    CHECK(quiet.exit_code == 0);
    CHECK(quiet.screen.find("ETA") == std::string::npos);
    CHECK(quiet.screen.find("378 matches scored (2 abandoned") != std::string::npos);

    // Standard error to a file, standard output a pipe: not a terminal.
    const auto piped = liveprob::test::run_command(
        fmt::format("{} replay {} --report {} 2>{}", bin, (dir / "season.stream").string(),
                    (dir / "c").string(), (dir / "stderr.txt").string()));
    CHECK(piped.exit_code == 0);
    CHECK(liveprob::test::run_command(fmt::format("cat {}", (dir / "stderr.txt").string()))
              .out.empty());

    // The import's walk-forward fits (a short span of the open data).
    const auto data = liveprob::test::open_data_dir() / "international";
    const auto import = run_on_terminal({bin, "import", "--international", data.string(), "--out",
                                         (dir / "imported").string(), "--from", "2015-09-01"});
    INFO(import.screen);
    CHECK(import.exit_code == 0);
    CHECK(import.screen.find("import: walk-forward fits [########################]") !=
          std::string::npos);
    CHECK(import.screen.find("fits/s  ETA 0:00") != std::string::npos);
}
