// A late message re-folds the log from the last checkpoint before its place; with checkpoints
// off it re-folds from the start (the reference). Over random streams with late, out-of-order
// and duplicated messages, and over long matches with late messages at every depth, both give
// the same verdicts, the same state and the same outputs to the bit, after every message.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstddef>
#include <random>
#include <vector>

#include "liveprob/core/match.hpp"
#include "outputs_bitwise.hpp"
#include "random_match_stream.hpp"

using namespace liveprob;
using namespace liveprob::core;
using liveprob::test::bitwise_same;
using liveprob::test::kStreamScale;
using liveprob::test::RandomStream;
using liveprob::test::StreamGenerator;

namespace {

constexpr std::uint64_t kMatch = 6160;

bool same_counters(const MatchCounters& a, const MatchCounters& b) {
    return a.accepted == b.accepted && a.late == b.late && a.duplicates == b.duplicates &&
           a.conflicting_duplicates == b.conflicting_duplicates && a.rejected == b.rejected &&
           a.rejected_by_reason == b.rejected_by_reason;
}

// Applies `arrivals` to a full re-fold match and to one match per checkpoint interval,
// checking after every message that all agree. Returns how many late verdicts were seen.
int check_against_full_refold(const MatchSetup& setup, const ModelParams& params,
                              const std::vector<InboundMessage>& arrivals,
                              const std::vector<std::size_t>& intervals) {
    Match reference(kMatch, setup, params);
    reference.set_refold_checkpoint_interval(0);
    std::vector<Match> candidates;
    for (const std::size_t every : intervals) {
        candidates.emplace_back(kMatch, setup, params);
        candidates.back().set_refold_checkpoint_interval(every);
    }
    int late = 0;
    for (std::size_t i = 0; i < arrivals.size(); ++i) {
        const ApplyResult want = reference.apply(arrivals[i]);
        late += want.verdict == Verdict::late ? 1 : 0;
        for (std::size_t c = 0; c < candidates.size(); ++c) {
            INFO("arrival " << i << ", checkpoint every " << intervals[c]);
            REQUIRE(candidates[c].apply(arrivals[i]) == want);
            REQUIRE(candidates[c].state() == reference.state());
            REQUIRE(candidates[c].priced_clock() == reference.priced_clock());
        }
    }
    for (std::size_t c = 0; c < candidates.size(); ++c) {
        INFO("checkpoint every " << intervals[c]);
        CHECK(same_counters(candidates[c].counters(), reference.counters()));
        CHECK(bitwise_same(candidates[c].outputs(), reference.outputs()));
    }
    return late;
}

}  // namespace

TEST_CASE("re-folding from checkpoints gives the full re-fold's state and outputs to the bit",
          "[property][refold]") {
    StreamGenerator gen(90210, kMatch);
    const std::vector<std::size_t> intervals = {1, 2, 3, 5, 8};
    const int streams = 600 / kStreamScale;
    int late = 0;
    for (int n = 0; n < streams; ++n) {
        const RandomStream s = gen.next();
        std::vector<InboundMessage> arrivals = s.messages;
        for (const auto& m : s.messages) {
            if (gen.rng()() % 6 == 0) arrivals.push_back(m);  // duplicated on the wire
        }
        if (n % 2 == 0) {
            std::shuffle(arrivals.begin(), arrivals.end(), gen.rng());  // any order
        } else {
            // A feed's usual lateness: each message held back a few places at most.
            for (std::size_t i = 0; i + 1 < arrivals.size(); ++i) {
                const std::size_t j = std::min(arrivals.size() - 1, i + gen.rng()() % 6);
                std::swap(arrivals[i], arrivals[j]);
            }
        }
        INFO("stream " << n << " of " << s.messages.size() << " messages");
        late += check_against_full_refold(s.setup, s.params, arrivals, intervals);
    }
    CHECK(late > streams * 3);
}

TEST_CASE("late messages at every depth of a long match agree with the full re-fold",
          "[property][refold]") {
    // A long first half of shots, goals, cancellations, red cards and clock syncs in feed
    // order with gaps in source_seq; then late messages fill gaps at random depths, interleaved
    // with new ones at the head, and duplicates of both.
    std::mt19937_64 rng(4242);
    MatchSetup setup;
    setup.prior = PriorMeans{1.6, 0.9};
    constexpr std::size_t kLength = 3'000;
    constexpr std::uint32_t kStepMs = 1'000;
    auto header = [](std::uint64_t seq, std::uint32_t clock_ms) {
        InboundMessage m;
        m.header = {kMatch, seq, 1'700'000'000'000'000, {Period::first_half, clock_ms}};
        return m;
    };
    auto random_body = [&rng](std::uint64_t seq) -> MessageBody {
        switch (rng() % 7) {
            case 0: return Goal{rng() % 2 == 0 ? Side::home : Side::away};
            case 1: return GoalCancelled{seq > 10 ? seq - 1 - rng() % 10 : 1};
            case 2: return RedCard{rng() % 2 == 0 ? Side::home : Side::away};
            case 3: return ClockSync{rng() % 4 != 0};
            default:
                return ShotXg{rng() % 2 == 0 ? Side::home : Side::away,
                              0.01 * static_cast<double>(rng() % 40)};
        }
    };
    std::vector<InboundMessage> arrivals;
    InboundMessage kick_off = header(3, 0);
    kick_off.body = PeriodStart{Period::first_half};
    arrivals.push_back(kick_off);
    std::vector<std::uint64_t> gaps;  // source_seq values left out of the feed-order part
    for (std::uint64_t i = 1; i < kLength; ++i) {
        const std::uint64_t seq = 3 * (i + 1);
        InboundMessage m = header(seq, static_cast<std::uint32_t>(i) * kStepMs);
        m.body = random_body(seq);
        arrivals.push_back(m);
        gaps.push_back(seq - 1);
        if (i % 3 == 0) gaps.push_back(seq - 2);
    }
    std::shuffle(gaps.begin(), gaps.end(), rng);
    gaps.resize(600);
    for (const std::uint64_t seq : gaps) {
        InboundMessage m = header(seq, static_cast<std::uint32_t>(seq / 3) * kStepMs);
        m.body = random_body(seq);
        arrivals.push_back(m);
        if (rng() % 10 == 0) arrivals.push_back(arrivals[rng() % arrivals.size()]);
    }
    const int late = check_against_full_refold(setup, ModelParams{}, arrivals,
                                               {7, 64, Match::kDefaultRefoldCheckpointInterval});
    CHECK(late >= 500);
}

TEST_CASE("changing the checkpoint interval mid-match changes nothing but the cost",
          "[property][refold]") {
    StreamGenerator gen(777, kMatch);
    for (int n = 0; n < 100 / kStreamScale; ++n) {
        const RandomStream s = gen.next();
        std::vector<InboundMessage> arrivals = s.messages;
        std::shuffle(arrivals.begin(), arrivals.end(), gen.rng());
        Match reference(kMatch, s.setup, s.params);
        reference.set_refold_checkpoint_interval(0);
        Match switching(kMatch, s.setup, s.params);
        for (std::size_t i = 0; i < arrivals.size(); ++i) {
            if (i % 7 == 3) switching.set_refold_checkpoint_interval(1 + i % 4);
            if (i % 11 == 5) switching.set_refold_checkpoint_interval(0);
            REQUIRE(switching.apply(arrivals[i]) == reference.apply(arrivals[i]));
            REQUIRE(switching.state() == reference.state());
        }
        CHECK(bitwise_same(switching.outputs(), reference.outputs()));
    }
}
