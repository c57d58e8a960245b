// Whole-file byte helpers for journals, recorded streams and feed files. Errors throw
// std::runtime_error with the path and the reason in one line.
#pragma once

#include <cstdint>
#include <filesystem>
#include <span>
#include <vector>

namespace liveprob::protocol {

std::vector<std::uint8_t> read_byte_file(const std::filesystem::path& path);
void write_byte_file(const std::filesystem::path& path, std::span<const std::uint8_t> bytes);

}  // namespace liveprob::protocol
