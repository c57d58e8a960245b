// The endpoints file `serve --endpoints-file` and `relay --endpoints-file` write: one
// "name=endpoint" line per bound socket (ingest, publish, snapshot), so that tools started
// next to them find ephemeral ports.
#pragma once

#include <map>
#include <string>
#include <utility>
#include <vector>

namespace liveprob::files {

// name -> endpoint. Throws std::runtime_error naming the file when it cannot be read.
std::map<std::string, std::string> read_endpoints_file(const std::string& path);

// Writes the "name=endpoint" lines in the order given, replacing the file atomically (a tool
// polling for it never reads half of it).
void write_endpoints_file(const std::string& path,
                          const std::vector<std::pair<std::string, std::string>>& endpoints);

}  // namespace liveprob::files
