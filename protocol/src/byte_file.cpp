#include "liveprob/protocol/byte_file.hpp"

#include <cerrno>
#include <cstring>
#include <fstream>
#include <iterator>
#include <stdexcept>

namespace liveprob::protocol {

namespace {
std::runtime_error file_error(const char* action, const std::filesystem::path& path) {
    return std::runtime_error(std::string("cannot ") + action + " " + path.string() + ": " +
                              std::strerror(errno));
}
}  // namespace

std::vector<std::uint8_t> read_byte_file(const std::filesystem::path& path) {
    errno = 0;
    std::ifstream in(path, std::ios::binary);
    if (!in) throw file_error("open", path);
    if (std::filesystem::is_directory(path)) {
        throw std::runtime_error("cannot read " + path.string() + ": it is a directory");
    }
    std::vector<std::uint8_t> bytes{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
    if (in.bad()) throw file_error("read", path);
    return bytes;
}

void write_byte_file(const std::filesystem::path& path, std::span<const std::uint8_t> bytes) {
    errno = 0;
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    if (!out) throw file_error("create", path);
    out.write(reinterpret_cast<const char*>(bytes.data()), static_cast<std::streamsize>(bytes.size()));
    out.flush();
    if (!out) throw file_error("write", path);
}

}  // namespace liveprob::protocol
