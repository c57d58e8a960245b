// Fingerprints of a run's inputs (parameter files, stream files), so a report says exactly what
// it was made from: SHA-256 (FIPS 180-4) in lower-case hex.
#pragma once

#include <string>
#include <string_view>

namespace liveprob::files {

std::string sha256_hex(std::string_view bytes);
// The SHA-256 of a whole file; throws std::runtime_error naming the file when it cannot be read.
std::string file_sha256_hex(const std::string& path);

}  // namespace liveprob::files
