#include "liveprob/files/endpoints_file.hpp"

#include "liveprob/files/csv_line.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::files {

std::map<std::string, std::string> read_endpoints_file(const std::string& path) {
    std::map<std::string, std::string> out;
    for_each_text_line(protocol::read_whole_file(path, "the endpoints file"),
                       [&](int, std::string_view line) {
                           const auto eq = line.find('=');
                           if (eq != std::string_view::npos)
                               out.emplace(line.substr(0, eq), line.substr(eq + 1));
                       });
    return out;
}

void write_endpoints_file(const std::string& path,
                          const std::vector<std::pair<std::string, std::string>>& endpoints) {
    std::string text;
    for (const auto& [name, endpoint] : endpoints) text += name + "=" + endpoint + "\n";
    protocol::write_file_atomically(path, text, "the endpoints file");
}

}  // namespace liveprob::files
