#include "liveprob/adapters/endpoints_file.hpp"

#include "liveprob/adapters/csv_line.hpp"
#include "liveprob/adapters/text_file.hpp"

namespace liveprob::adapters {

std::map<std::string, std::string> read_endpoints_file(const std::string& path) {
    std::map<std::string, std::string> out;
    for_each_text_line(read_text_file(path, "the endpoints file"), [&](int, std::string_view line) {
        const auto eq = line.find('=');
        if (eq != std::string_view::npos) out.emplace(line.substr(0, eq), line.substr(eq + 1));
    });
    return out;
}

}  // namespace liveprob::adapters
