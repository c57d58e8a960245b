// Whole-file reading for the small text inputs (parameter, ratings, alias and results files).
#pragma once

#include <string>

namespace liveprob::files {

// The file's bytes; throws std::runtime_error "<path>: cannot open <what>" or a read error.
std::string read_text_file(const std::string& path, const std::string& what);

// Writes `text` to a temporary file beside `path`, then renames it over `path`: readers never
// see half a file and a failed write leaves the old file in place.
void write_text_file_atomically(const std::string& path, const std::string& text,
                                const std::string& what);

}  // namespace liveprob::files
