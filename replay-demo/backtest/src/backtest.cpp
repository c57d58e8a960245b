#include "liveprob/backtest/backtest.hpp"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <thread>
#include <unordered_map>

namespace liveprob::backtest {

std::vector<MatchMessages> group_by_match(const std::vector<core::InboundMessage>& messages) {
    std::vector<MatchMessages> matches;
    std::unordered_map<std::uint64_t, std::size_t> slot_of;
    for (const auto& m : messages) {
        const auto [it, fresh] = slot_of.try_emplace(m.header.match_id, matches.size());
        if (fresh) matches.emplace_back();
        auto& match = matches[it->second];
        if (std::holds_alternative<core::MatchSetup>(m.body)) {
            // The setup goes first whatever its place in the file; a second one is kept where
            // it stands, and the engine refuses it there.
            if (match.empty() || !std::holds_alternative<core::MatchSetup>(match.front().body)) {
                match.insert(match.begin(), m);
                continue;
            }
        }
        match.push_back(m);
    }
    return matches;
}

namespace {
constexpr std::size_t kMaxProblemsKept = 20;

void add_up(BacktestResult& total, const MatchReplay& replay, std::size_t timelines_wanted) {
    ++total.matches;
    total.messages += replay.messages;
    total.rejected += replay.rejected;
    total.duplicates += replay.duplicates;
    total.late += replay.late;
    total.evaluations += replay.evaluations;
    total.invalid_outputs += replay.invalid_outputs;
    switch (replay.fate) {
        case ReplayFate::abandoned: ++total.abandoned; return;
        case ReplayFate::unfinished: ++total.unfinished; return;
        case ReplayFate::unusable:
            ++total.unusable;
            if (total.problems.size() < kMaxProblemsKept) {
                total.problems.push_back("match " + std::to_string(replay.match_id) + ": " +
                                         replay.problem);
            }
            return;
        case ReplayFate::scored: break;
    }
    ++total.scored;
    for (int b = 0; b < scoring::kBuckets; ++b) {
        for (int f = 0; f < kForecasters; ++f) {
            const auto& forecast =
                replay.forecasts[static_cast<std::size_t>(b)][static_cast<std::size_t>(f)];
            if (forecast)
                total.scores[static_cast<std::size_t>(b)][static_cast<std::size_t>(f)].add(
                    *forecast, replay.result);
        }
    }
    if (replay.timeline && total.timelines.size() < timelines_wanted)
        total.timelines.push_back(*replay.timeline);
}
}  // namespace

std::vector<MatchReplay> replay_matches(const std::vector<MatchMessages>& matches,
                                        const BacktestOptions& options) {
    const auto params = ForecasterParams::derived_from(options.params);
    std::vector<MatchReplay> replays(matches.size());
    std::atomic<std::size_t> next{0}, done{0};
    // Timelines for the first matches only (a few more than wanted, in case some are not scored).
    const std::size_t timeline_matches = options.timelines ? options.timelines * 2 : 0;
    auto work = [&] {
        for (std::size_t i = next.fetch_add(1); i < matches.size(); i = next.fetch_add(1)) {
            const ReferenceMeans* elo = nullptr;
            if (options.elo && !matches[i].empty()) {
                const auto it = options.elo->find(matches[i].front().header.match_id);
                if (it != options.elo->end()) elo = &it->second;
            }
            replays[i] =
                replay_match(matches[i], params, {i < timeline_matches, options.every_event, elo});
            done.fetch_add(1, std::memory_order_relaxed);
        }
    };
    const unsigned threads = std::max(
        1U, std::min<unsigned>(options.threads,
                               static_cast<unsigned>(std::max<std::size_t>(1, matches.size()))));
    std::vector<std::jthread> pool;
    if (options.progress) {
        // Every worker gets a thread of its own; the calling thread only reports (it sleeps).
        for (unsigned t = 0; t < threads; ++t) pool.emplace_back(work);
        while (done.load() < matches.size()) {
            options.progress(done.load(), matches.size());
            std::this_thread::sleep_for(std::chrono::milliseconds(100));
        }
        options.progress(matches.size(), matches.size());
    } else {
        for (unsigned t = 1; t < threads; ++t) pool.emplace_back(work);
        work();
    }
    pool.clear();  // joins
    return replays;
}

BacktestResult sum_replays(const std::vector<MatchReplay>& replays, std::size_t timelines) {
    BacktestResult total;
    for (const auto& replay : replays) add_up(total, replay, timelines);
    return total;
}

BacktestResult run_backtest(const std::vector<MatchMessages>& matches,
                            const BacktestOptions& options) {
    return sum_replays(replay_matches(matches, options), options.timelines);
}

}  // namespace liveprob::backtest
