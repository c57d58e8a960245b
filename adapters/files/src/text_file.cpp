#include "liveprob/files/text_file.hpp"

#include <fmt/format.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <stdexcept>

namespace liveprob::files {

std::string read_text_file(const std::string& path, const std::string& what) {
    std::FILE* f = std::fopen(path.c_str(), "rb");
    if (!f) throw std::runtime_error(fmt::format("{}: cannot open {}", path, what));
    std::string text;
    char buffer[65536];
    std::size_t n = 0;
    while ((n = std::fread(buffer, 1, sizeof buffer, f)) > 0) text.append(buffer, n);
    const bool failed = std::ferror(f) != 0;
    std::fclose(f);
    if (failed) throw std::runtime_error(fmt::format("{}: read error in {}", path, what));
    return text;
}

void write_text_file_atomically(const std::string& path, const std::string& text,
                                const std::string& what) {
    const std::string temporary = path + ".partial";
    {
        std::ofstream out(temporary, std::ios::binary | std::ios::trunc);
        if (!out) throw std::runtime_error(fmt::format("{}: cannot write {}", path, what));
        out << text;
        out.flush();
        if (!out) throw std::runtime_error(fmt::format("{}: write error in {}", path, what));
    }
    std::error_code ec;
    std::filesystem::rename(temporary, path, ec);
    if (ec) {
        std::filesystem::remove(temporary, ec);
        throw std::runtime_error(fmt::format("{}: cannot replace {}", path, what));
    }
}

}  // namespace liveprob::files
