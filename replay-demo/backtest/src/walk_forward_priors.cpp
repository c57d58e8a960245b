#include "liveprob/backtest/walk_forward_priors.hpp"

#include <algorithm>
#include <atomic>
#include <functional>
#include <limits>
#include <map>
#include <optional>
#include <stdexcept>
#include <thread>

#include "liveprob/fit/calendar.hpp"

namespace liveprob::backtest {
namespace {

// The as-of day of the fit that prices a match on `day`.
int as_of_day(int day, RefitSchedule schedule) {
    if (schedule == RefitSchedule::match_day) return day;
    const std::string iso = fit::iso_date(day);  // YYYY-MM-DD
    return *fit::parse_iso_date(iso.substr(0, 8) + "01");
}

using RefitDays = std::vector<std::pair<int, std::vector<std::size_t>>>;  // as-of day, fixtures

// One chain: the refits of days [begin, end) in order, each warm-started from the one before.
// Writes the priors of its own fixtures only; its counts go to `counts`.
void run_chain(std::span<const fit::MatchResult> history, std::span<const FixtureToPrice> fixtures,
               const WalkForwardOptions& options, const RefitDays& days, std::size_t begin,
               std::size_t end, int first_result, std::vector<core::PriorMeans>& priors,
               std::vector<char>& rated, WalkForwardPriors& counts, std::atomic<std::size_t>& done,
               const std::function<void()>& report) {
    std::optional<fit::Ratings> previous;
    for (std::size_t d = begin; d < end; ++d) {
        const auto& [as_of, members] = days[d];
        auto finished = [&] {
            ++done;
            if (report) report();
        };
        if (as_of <= first_result) {
            counts.no_history += members.size();
            finished();
            continue;
        }
        fit::RatingsFitOptions fit_options = options.fit;
        fit_options.as_of_day = as_of;
        fit_options.start = previous ? &*previous : nullptr;
        try {
            previous = fit::fit_ratings(history, fit_options);
        } catch (
            const std::invalid_argument&) {  // nothing usable before the day (all decayed away)
            counts.no_history += members.size();
            previous.reset();
            finished();
            continue;
        }
        ++counts.refits;
        if (!previous->diagnostics.converged) ++counts.not_converged;
        const fit::TeamRating average{};
        // An unrated side: the mean of its stand-ins the fit rates, else the average side.
        auto stand_in = [&](const std::vector<std::string>& names) {
            fit::TeamRating mean;
            int found = 0;
            for (const auto& name : names)
                if (const fit::TeamRating* r = previous->find(name)) {
                    mean.attack += r->attack;
                    mean.defence += r->defence;
                    ++found;
                }
            if (found == 0) return average;
            mean.attack /= found;
            mean.defence /= found;
            ++counts.stood_in_sides;
            return mean;
        };
        for (const std::size_t i : members) {
            const FixtureToPrice& f = fixtures[i];
            const fit::TeamRating* home = previous->find(f.home);
            const fit::TeamRating* away = previous->find(f.away);
            counts.unrated_sides += (home ? 0 : 1) + (away ? 0 : 1);
            rated[i] = home && away && !home->shrunk && !away->shrunk;
            const auto goals =
                fit::expected_goals(*previous, home ? *home : stand_in(f.home_stand_ins),
                                    away ? *away : stand_in(f.away_stand_ins), f.neutral);
            auto hold = [&](double g) {
                if (g <= options.max_expected_goals) return g;
                ++counts.held_at_maximum;
                return options.max_expected_goals;
            };
            priors[i] = core::PriorMeans{hold(goals.home), hold(goals.away)};
        }
        finished();
    }
}

}  // namespace

WalkForwardPriors walk_forward_priors(std::span<const fit::MatchResult> history,
                                      std::span<const FixtureToPrice> fixtures,
                                      const WalkForwardOptions& options) {
    std::map<int, std::vector<std::size_t>> by_as_of;  // as-of day -> fixtures it prices
    for (std::size_t i = 0; i < fixtures.size(); ++i)
        by_as_of[as_of_day(fixtures[i].day, options.schedule)].push_back(i);
    const RefitDays days(by_as_of.begin(), by_as_of.end());
    int first_result = std::numeric_limits<int>::max();
    for (const auto& r : history) first_result = std::min(first_result, r.day);

    WalkForwardPriors out;
    out.priors.resize(fixtures.size());
    std::vector<char> rated(fixtures.size(), 0);  // not vector<bool>: chains write side by side
    const std::size_t chains =
        std::clamp<std::size_t>(options.chains, 1, std::max<std::size_t>(1, days.size()));
    std::vector<WalkForwardPriors> counts(chains);
    std::atomic<std::size_t> done{0};
    auto chain = [&](std::size_t c, const std::function<void()>& report) {
        run_chain(history, fixtures, options, days, c * days.size() / chains,
                  (c + 1) * days.size() / chains, first_result, out.priors, rated, counts[c], done,
                  report);
    };
    // Chains are handed out in order; the calling thread takes one too and reports progress.
    std::atomic<std::size_t> next{0};
    auto work = [&](const std::function<void()>& report) {
        for (std::size_t c = next.fetch_add(1); c < chains; c = next.fetch_add(1)) chain(c, report);
    };
    {
        std::vector<std::jthread> pool;
        for (unsigned t = 1; t < std::min<std::size_t>(std::max(1U, options.threads), chains);
             ++t) {
            pool.emplace_back([&] { work({}); });
        }
        const std::function<void()> report = [&] {
            if (options.progress) options.progress(done.load(), days.size());
        };
        work(report);
    }  // joins
    if (options.progress) options.progress(days.size(), days.size());

    out.both_sides_rated.assign(rated.begin(), rated.end());
    for (const auto& c : counts) {
        out.refits += c.refits;
        out.not_converged += c.not_converged;
        out.unrated_sides += c.unrated_sides;
        out.stood_in_sides += c.stood_in_sides;
        out.held_at_maximum += c.held_at_maximum;
        out.no_history += c.no_history;
    }
    return out;
}

}  // namespace liveprob::backtest
