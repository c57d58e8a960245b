// Matching the team names a feed uses to the names in a ratings file: exact name first, then
// the alias table; an unknown name is an error that lists the closest known names, never a
// silent default.
#pragma once

#include <map>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::fit {

struct UnknownTeamError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// Case-insensitive Levenshtein distance (insert, delete, substitute: cost 1 each).
[[nodiscard]] std::size_t edit_distance(std::string_view a, std::string_view b);

// Up to `count` known names nearest to `name`, nearest first (ties in alphabetical order).
[[nodiscard]] std::vector<std::string> closest_names(std::string_view name,
                                                     const std::vector<std::string>& known,
                                                     std::size_t count = 3);

class TeamNameResolver {
public:
    // `aliases` maps feed names to rating names; every target must be a known name
    // (otherwise UnknownTeamError naming the alias).
    TeamNameResolver(std::vector<std::string> known, std::map<std::string, std::string> aliases);

    // The rating name for `feed_name`; throws UnknownTeamError with the closest names.
    [[nodiscard]] const std::string& resolve(std::string_view feed_name) const;

private:
    std::vector<std::string> known_;  // sorted
    std::map<std::string, std::string, std::less<>> aliases_;
};

}  // namespace liveprob::fit
