// The endpoints file `serve --endpoints-file` and `relay --endpoints-file` write: one
// "name=endpoint" line per bound socket (ingest, publish, snapshot), so that tools started
// next to them find ephemeral ports.
#pragma once

#include <map>
#include <string>

namespace liveprob::files {

// name -> endpoint. Throws std::runtime_error naming the file when it cannot be read.
std::map<std::string, std::string> read_endpoints_file(const std::string& path);

}  // namespace liveprob::files
