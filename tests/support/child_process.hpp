// Programs a test starts (serve, gateway, a browser) and the files they write: the process
// class is the harnesses' own (tools/harness/child_process.hpp), stopped when the test ends
// however it ends; its output goes to a log file in the test's scratch folder.
#pragma once

#include <chrono>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>

#include "harness/child_process.hpp"

namespace liveprob::test {

using harness::ChildProcess;

inline std::string read_whole_file(const std::filesystem::path& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream text;
    text << in.rdbuf();
    return text.str();
}

// The file's contents once it exists (written whole, then renamed, by the programs here).
inline std::string wait_for_file(
    const std::filesystem::path& path,
    std::chrono::milliseconds limit = std::chrono::milliseconds(10000)) {
    const auto deadline = std::chrono::steady_clock::now() + limit;
    while (!std::filesystem::exists(path)) {
        if (std::chrono::steady_clock::now() > deadline) {
            throw std::runtime_error("no file " + path.string() + " in time");
        }
        std::this_thread::sleep_for(std::chrono::milliseconds(20));
    }
    return read_whole_file(path);
}

// "key=value" lines (serve's endpoints file) -> value of `key`.
inline std::string key_value(const std::string& text, const std::string& key) {
    std::istringstream lines(text);
    for (std::string line; std::getline(lines, line);) {
        if (line.rfind(key + "=", 0) == 0) return line.substr(key.size() + 1);
    }
    throw std::runtime_error("no " + key + " in: " + text);
}

}  // namespace liveprob::test
