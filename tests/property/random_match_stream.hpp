// Random but plausible match streams for property tests: goals, shots with xG, red cards,
// corrections, clock syncs, stoppage, extra time and shoot-outs where the format needs them,
// and a sprinkling of impossible messages. Seeded, so every failure can be replayed.
#pragma once

#include <algorithm>
#include <cstdint>
#include <limits>
#include <random>
#include <utility>
#include <vector>

#include "feed_builder.hpp"
#include "liveprob/core/match_state.hpp"
#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"
#include "test_env.hpp"

namespace liveprob::test {

struct RandomStream {
    core::MatchSetup setup;
    core::ModelParams params;  // drawn per stream: the properties hold for any parameters
    std::vector<core::InboundMessage> messages;
};

class StreamGenerator {
public:
    StreamGenerator(std::uint64_t seed, std::uint64_t match_id) : rng_(seed), match_id_(match_id) {}

    RandomStream next() {
        RandomStream s;
        s.setup.prior = core::PriorMeans{uniform(0.4, 2.8), uniform(0.3, 2.4)};
        const double kind = uniform(0.0, 1.0);
        if (kind > 0.6) {
            s.setup.format.extra_time = true;
            s.setup.format.shootout = true;
            if (kind > 0.85) s.setup.format.first_leg = core::FirstLegResult{count(3), count(3)};
        }
        s.params = random_params();
        Writer w{*this, s.setup.format, FeedBuilder(match_id_, 1 + count(1000)), {}, {}, {}, {}};
        w.play();
        s.messages = std::move(w.out);
        return s;
    }

    std::mt19937_64& rng() noexcept { return rng_; }

private:
    struct Writer {
        StreamGenerator& g;
        const core::CompetitionFormat& format;
        FeedBuilder feed;
        std::vector<core::InboundMessage> out;
        std::vector<std::pair<std::uint64_t, core::Side>> goal_seqs;
        std::vector<std::uint64_t> card_seqs;
        std::array<int, 2> score{};

        void emit(core::InboundMessage m) { out.push_back(std::move(m)); }
        core::Side side() {
            return g.uniform(0.0, 1.0) < 0.55 ? core::Side::home : core::Side::away;
        }
        int aggregate_diff() const {
            int d = score[0] - score[1];
            if (format.first_leg) d += format.first_leg->home_goals - format.first_leg->away_goals;
            return d;
        }

        // Returns false when the match was abandoned during the period.
        bool play_period(core::Period p) {
            const double start = period_start_ms(format, p) / 60'000.0;
            const double end = period_nominal_end_ms(format, p) / 60'000.0;
            const double stoppage = std::round(g.uniform(0.0, 7.0) * 10.0) / 10.0;
            emit(feed.start(p, start));
            bool announced = false;
            for (double t = start + g.exponential(3.0); t < end + stoppage;
                 t += g.exponential(3.0)) {
                const double u = g.uniform(0.0, 1.0);
                if (!announced && t > end - 1.0) {
                    emit(feed.next(
                        core::StoppageAnnounced{p, static_cast<std::uint16_t>(std::ceil(stoppage))},
                        at_minute(p, t)));
                    announced = true;
                } else if (u < 0.10) {
                    const core::Side s = side();
                    emit(feed.goal(s, p, t));
                    goal_seqs.emplace_back(feed.last_seq(), s);
                    score[static_cast<std::size_t>(index(s))] += 1;
                } else if (u < 0.35) {
                    emit(feed.shot(side(), std::min(1.0, g.exponential(0.1)), p, t));
                } else if (u < 0.37) {
                    emit(feed.red(side(), p, t));
                    card_seqs.push_back(feed.last_seq());
                } else if (u < 0.39 && !goal_seqs.empty()) {
                    const auto [seq, scorer] = goal_seqs.back();
                    emit(feed.next(core::GoalCancelled{seq}, at_minute(p, t)));
                    goal_seqs.pop_back();
                    auto& goals = score[static_cast<std::size_t>(index(scorer))];
                    goals = std::max(0, goals - 1);
                } else if (u < 0.40 && !card_seqs.empty()) {
                    emit(feed.next(core::CardRescinded{card_seqs.back()}, at_minute(p, t)));
                    card_seqs.pop_back();
                } else if (u < 0.41) {
                    score = {static_cast<int>(g.count(4)), static_cast<int>(g.count(4))};
                    emit(feed.next(core::ScoreCorrection{static_cast<std::uint16_t>(score[0]),
                                                         static_cast<std::uint16_t>(score[1])},
                                   at_minute(p, t)));
                } else if (u < 0.44) {
                    emit_impossible(p, t);
                } else if (u < 0.445) {
                    emit(feed.next(core::MatchAbandoned{"weather"}, at_minute(p, t)));
                    return false;
                } else {
                    emit(feed.next(core::ClockSync{g.uniform(0.0, 1.0) < 0.95}, at_minute(p, t)));
                }
            }
            emit(feed.end(p, end + stoppage));
            return true;
        }

        void emit_impossible(core::Period p, double t) {
            switch (g.count(5)) {
                case 0: emit(feed.kick(side(), true)); break;
                case 1: emit(feed.goal(side(), core::Period::extra_second, 110)); break;
                case 2:
                    emit(feed.shot(side(), std::numeric_limits<double>::quiet_NaN(), p, t));
                    break;
                case 3:
                    emit(feed.next(core::GoalCancelled{feed.last_seq() + 1000}, at_minute(p, t)));
                    break;
                default:
                    emit(feed.next(core::PeriodStart{core::Period::first_half}, at_minute(p, t)));
                    break;
            }
        }

        void play() {
            for (core::Period p : {core::Period::first_half, core::Period::second_half}) {
                if (!play_period(p)) return;
            }
            core::Period last = core::Period::second_half;
            if (format.extra_time && aggregate_diff() == 0) {
                for (core::Period p : {core::Period::extra_first, core::Period::extra_second}) {
                    if (!play_period(p)) return;
                }
                last = core::Period::extra_second;
            }
            if (format.shootout && aggregate_diff() == 0) {
                emit(feed.start(core::Period::shootout, 120));
                core::ShootoutTally tally;
                tally.first = side();
                while (!shootout_decided(tally) && tally.taken[0] + tally.taken[1] < 40) {
                    const core::Side s = shootout_next_kicker(tally);
                    const bool scored = g.uniform(0.0, 1.0) < 0.75;
                    emit(feed.kick(s, scored));
                    tally.taken[static_cast<std::size_t>(index(s))] += 1;
                    if (scored) tally.scored[static_cast<std::size_t>(index(s))] += 1;
                }
                emit(feed.end(core::Period::shootout, 120));
                last = core::Period::shootout;
            }
            const double end = period_nominal_end_ms(format, last) / 60'000.0;
            emit(feed.whistle(last, last == core::Period::shootout ? 120 : end + 8));
        }
    };

    core::ModelParams random_params() {
        core::ModelParams p;
        if (uniform(0.0, 1.0) < 0.2) p.kappa = std::numeric_limits<double>::infinity();
        else p.kappa = uniform(3.0, 60.0);
        p.quadrature_nodes = 2 + count(4);
        p.score_state = {uniform(0.8, 1.0), 1.0, uniform(1.0, 1.3)};
        p.red_cards.own_per_card = uniform(0.55, 0.9);
        p.red_cards.opponent_per_card = uniform(1.0, 1.5);
        p.xg_weight = uniform(0.0, 1.0);
        p.shootout.conversion = uniform(0.65, 0.85);
        return p;
    }

    double uniform(double a, double b) {
        return std::uniform_real_distribution<double>(a, b)(rng_);
    }
    double exponential(double mean) {
        return std::exponential_distribution<double>(1.0 / mean)(rng_);
    }
    std::uint16_t count(int n) {
        return static_cast<std::uint16_t>(std::uniform_int_distribution<int>(0, n - 1)(rng_));
    }

    std::mt19937_64 rng_;
    std::uint64_t match_id_;
};

// Fewer streams under the sanitizers, which run the same code several times slower.
#if defined(LIVEPROB_TEST_ASAN) || defined(LIVEPROB_TEST_TSAN)
inline constexpr int kStreamScale = 5;
#else
inline constexpr int kStreamScale = 1;
#endif

}  // namespace liveprob::test
