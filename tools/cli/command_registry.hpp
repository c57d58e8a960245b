// Subcommands register themselves here; main() builds the command line from the registry.
#pragma once

#include <CLI/CLI.hpp>

#include <functional>
#include <stdexcept>
#include <string>
#include <vector>

namespace liveprob::cli {

// Exit codes of the program (documented in README.md).
inline constexpr int kExitOk = 0;
inline constexpr int kExitFailure = 1;  // the command ran and failed (bad data, I/O, ...)
inline constexpr int kExitUsage = 2;    // the command line itself is wrong

// Thrown by a command that finds its arguments unusable after parsing (exit code 2).
struct UsageError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// A command's setup adds its options to `sub` and returns the function that runs it.
using CommandSetup = std::function<std::function<int()>(CLI::App& sub)>;

struct Command {
    std::string name;
    std::string summary;
    CommandSetup setup;
};

std::vector<Command>& command_registry();

// `static const Registration r{{"name", "summary", setup}};` in a command's file.
struct Registration {
    explicit Registration(Command command) { command_registry().push_back(std::move(command)); }
};

}  // namespace liveprob::cli
