// Where tests find things outside themselves: the open datasets, the built program, Debian's
// Python (for SciPy/statsmodels reference checks), and a way to run a command.
#pragma once

#include <filesystem>
#include <string>

// Which sanitizer the test program was built with, the same on GCC (which defines
// __SANITIZE_ADDRESS__ / __SANITIZE_THREAD__) and clang (which answers __has_feature).
#if defined(__SANITIZE_ADDRESS__)
#define LIVEPROB_TEST_ASAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define LIVEPROB_TEST_ASAN 1
#endif
#endif
#if defined(__SANITIZE_THREAD__)
#define LIVEPROB_TEST_TSAN 1
#elif defined(__has_feature)
#if __has_feature(thread_sanitizer)
#define LIVEPROB_TEST_TSAN 1
#endif
#endif

namespace liveprob::test {

// The open datasets: $LIVEPROB_OPEN_DATA, else the copy in the repository (tests/data/open).
// Throws (so the test fails, never skips) when the folder is missing.
std::filesystem::path open_data_dir();

std::filesystem::path source_dir();
std::filesystem::path liveprob_binary();

// Debian's interpreter, which sees Debian's python3-scipy / python3-statsmodels.
std::string system_python();

struct CommandResult {
    int exit_code = -1;
    std::string out;  // standard output
};
// Runs `command` through /bin/sh, capturing standard output (standard error passes through).
CommandResult run_command(const std::string& command);

// Each file's SHA-256 as Python's hashlib computes it, one lower-case hex line per file
// (`paths`: space-separated); the exit code is the interpreter's.
CommandResult python_sha256(const std::string& paths);

// A fresh, empty directory for one test (under the build tree's temporary folder).
std::filesystem::path scratch_dir(const std::string& name);

}  // namespace liveprob::test
