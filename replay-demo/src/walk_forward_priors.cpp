#include "liveprob/replay/walk_forward_priors.hpp"

#include <algorithm>
#include <limits>
#include <map>
#include <optional>
#include <stdexcept>

#include "liveprob/engine/fit/calendar.hpp"

namespace liveprob::replay {
namespace {

// The as-of day of the fit that prices a match on `day`.
int as_of_day(int day, RefitSchedule schedule) {
    if (schedule == RefitSchedule::match_day) return day;
    const std::string iso = fit::iso_date(day);  // YYYY-MM-DD
    return *fit::parse_iso_date(iso.substr(0, 8) + "01");
}

}  // namespace

WalkForwardPriors walk_forward_priors(std::span<const fit::MatchResult> history,
                                      std::span<const FixtureToPrice> fixtures, const WalkForwardOptions& options) {
    WalkForwardPriors out;
    out.priors.resize(fixtures.size());
    out.both_sides_rated.assign(fixtures.size(), false);
    std::map<int, std::vector<std::size_t>> by_as_of;  // as-of day -> fixtures it prices
    for (std::size_t i = 0; i < fixtures.size(); ++i) by_as_of[as_of_day(fixtures[i].day, options.schedule)].push_back(i);
    int first_result = std::numeric_limits<int>::max();
    for (const auto& r : history) first_result = std::min(first_result, r.day);

    std::optional<fit::Ratings> previous;
    std::size_t done = 0;
    for (const auto& [as_of, members] : by_as_of) {
        ++done;
        if (as_of <= first_result) {
            out.no_history += members.size();
            if (options.progress) options.progress(done, by_as_of.size());
            continue;
        }
        fit::RatingsFitOptions fit_options = options.fit;
        fit_options.as_of_day = as_of;
        fit_options.start = previous ? &*previous : nullptr;
        try {
            previous = fit::fit_ratings(history, fit_options);
        } catch (const std::invalid_argument&) {  // nothing usable before the day (all decayed away)
            out.no_history += members.size();
            previous.reset();
            if (options.progress) options.progress(done, by_as_of.size());
            continue;
        }
        ++out.refits;
        if (!previous->diagnostics.converged) ++out.not_converged;
        const fit::TeamRating average{};
        for (const std::size_t i : members) {
            const FixtureToPrice& f = fixtures[i];
            const fit::TeamRating* home = previous->find(f.home);
            const fit::TeamRating* away = previous->find(f.away);
            out.unrated_sides += (home ? 0 : 1) + (away ? 0 : 1);
            out.both_sides_rated[i] = home && away && !home->shrunk && !away->shrunk;
            const auto goals = fit::expected_goals(*previous, home ? *home : average, away ? *away : average, f.neutral);
            auto hold = [&](double g) {
                if (g <= options.max_expected_goals) return g;
                ++out.held_at_maximum;
                return options.max_expected_goals;
            };
            out.priors[i] = PriorMeans{hold(goals.home), hold(goals.away)};
        }
        if (options.progress) options.progress(done, by_as_of.size());
    }
    return out;
}

}  // namespace liveprob::replay
