// The ratings file `liveprob fit` writes and `liveprob prior` reads (JSON; fields documented in
// tools/README-fit.md), and the alias file that maps feed names to rating names
// (CSV with the header "feed_name,rating_name").
#pragma once

#include <map>
#include <string>

#include "liveprob/fit/dixon_coles.hpp"

namespace liveprob::files {

std::string ratings_to_json(const fit::Ratings& ratings);
void save_ratings_file(const fit::Ratings& ratings, const std::string& path);
// Throws std::runtime_error naming the file, the key and the reason.
fit::Ratings load_ratings_file(const std::string& path);

std::map<std::string, std::string> load_alias_file(const std::string& path);

}  // namespace liveprob::files
