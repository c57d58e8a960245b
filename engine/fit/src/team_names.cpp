#include "liveprob/fit/team_names.hpp"

#include <algorithm>
#include <cctype>
#include <numeric>

namespace liveprob::fit {

std::size_t edit_distance(std::string_view a, std::string_view b) {
    auto lower = [](char c) {
        return static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    };
    std::vector<std::size_t> row(b.size() + 1);
    std::iota(row.begin(), row.end(), std::size_t{0});
    for (std::size_t i = 1; i <= a.size(); ++i) {
        std::size_t diagonal = row[0];
        row[0] = i;
        for (std::size_t j = 1; j <= b.size(); ++j) {
            const std::size_t above = row[j];
            const std::size_t substitute = diagonal + (lower(a[i - 1]) == lower(b[j - 1]) ? 0 : 1);
            row[j] = std::min({above + 1, row[j - 1] + 1, substitute});
            diagonal = above;
        }
    }
    return row[b.size()];
}

std::vector<std::string> closest_names(std::string_view name, const std::vector<std::string>& known,
                                       std::size_t count) {
    std::vector<std::pair<std::size_t, std::string>> scored;
    scored.reserve(known.size());
    for (const auto& k : known) scored.emplace_back(edit_distance(name, k), k);
    std::sort(scored.begin(), scored.end());
    std::vector<std::string> out;
    for (std::size_t i = 0; i < scored.size() && i < count; ++i) out.push_back(scored[i].second);
    return out;
}

namespace {
std::string unknown_message(std::string_view what, std::string_view name,
                            const std::vector<std::string>& known) {
    std::string msg = std::string(what) + " '" + std::string(name) + "' is not in the ratings";
    const auto near = closest_names(name, known);
    if (!near.empty()) {
        msg += "; closest known names: ";
        for (std::size_t i = 0; i < near.size(); ++i) msg += (i ? ", '" : "'") + near[i] + "'";
    }
    return msg;
}
}  // namespace

TeamNameResolver::TeamNameResolver(std::vector<std::string> known,
                                   std::map<std::string, std::string> aliases)
    : known_(std::move(known)) {
    std::sort(known_.begin(), known_.end());
    for (auto& [feed, rating] : aliases) {
        if (!std::binary_search(known_.begin(), known_.end(), rating))
            throw UnknownTeamError(
                unknown_message("alias target for '" + feed + "':", rating, known_));
        aliases_.emplace(feed, std::move(rating));
    }
}

const std::string& TeamNameResolver::resolve(std::string_view feed_name) const {
    const auto it = std::lower_bound(known_.begin(), known_.end(), feed_name);
    if (it != known_.end() && *it == feed_name) return *it;
    if (const auto a = aliases_.find(feed_name); a != aliases_.end()) return a->second;
    throw UnknownTeamError(unknown_message("team", feed_name, known_));
}

}  // namespace liveprob::fit
