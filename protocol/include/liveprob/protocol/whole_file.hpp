// Whole files, read at once or replaced atomically: the one place liveprob reads a file into
// memory or replaces one (feeds, journals, recorded streams, parameter, ratings, results and
// endpoints files, reports). Here rather than in adapters because replay-demo reads and writes
// files too and may not use adapters. Errors throw std::runtime_error in one line:
// "<path>: cannot <action> <what>: <reason>", `what` saying which file it is ("the ratings file").
#pragma once

#include <cstdint>
#include <filesystem>
#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::protocol {

std::string read_whole_file(const std::filesystem::path& path, std::string_view what = "the file");
std::vector<std::uint8_t> read_whole_file_bytes(const std::filesystem::path& path,
                                                std::string_view what = "the file");

// Replaces `path` by `contents`: written to a new file beside it, flushed to the disk (fsync),
// renamed over `path`, and the folder flushed. A reader sees the old file or the new one, never
// part of one; a crash leaves one of the two; on failure the old file is untouched and the
// temporary one removed. The new file's mode is 0666 less the umask.
void write_file_atomically(const std::filesystem::path& path,
                           std::span<const std::uint8_t> contents,
                           std::string_view what = "the file");
void write_file_atomically(const std::filesystem::path& path, std::string_view contents,
                           std::string_view what = "the file");

}  // namespace liveprob::protocol
