// What a late message costs a long match: core::Match inserts it in the log and re-folds, from
// the start (checkpoints off, the reference) or from the last checkpoint before its place (the
// default). One run measures both, so the ratio needs no second run.
//
// A match holds N messages in feed order (a first half of shots with xG, a goal every 500),
// with even source_seq values; late messages take the odd ones. Each late message is timed
// alone (Match::apply, no pricing): median and p99 over the samples. Two depths: "near", 8
// entries behind the newest while new messages go on arriving (a feed's usual lateness), and
// "deep", in the middle of the log (a checkpoint saves only the first half there). "300 late"
// is the time 300 near-late messages (not the new ones between them) hold the service's
// single loop. N = 200,000 is the case the issue measured; serve caps a match at 50,000.
//   liveprob_bench_late_refold            (plain program: prints a table)
#include <algorithm>
#include <chrono>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "bench_messages.hpp"
#include "liveprob/core/match.hpp"

namespace {

using namespace liveprob;
using namespace liveprob::core;
using SteadyClock = std::chrono::steady_clock;

constexpr std::uint64_t kId = 77;
constexpr std::uint32_t kFirstHalfSpanMs = 4'000'000;  // within the half's latest clock

std::uint32_t clock_of(std::size_t i, std::size_t n) {
    return static_cast<std::uint32_t>(i * (kFirstHalfSpanMs / n));
}

bool g_all_goals = false;  // the hostile case: a feed of nothing but goals

MessageBody body_of(std::size_t i) {
    if (g_all_goals) return Goal{i % 2 == 0 ? Side::home : Side::away};
    if (i % 500 == 250) return Goal{i % 1000 == 250 ? Side::home : Side::away};
    return ShotXg{i % 2 == 0 ? Side::home : Side::away, 0.04};
}

// Entry i of the log has source_seq 2 * (i + 1); entry 0 is the kick-off.
Match long_match(std::size_t n, std::size_t span, std::size_t checkpoint_every) {
    MatchSetup setup;
    setup.prior = PriorMeans{1.4, 1.1};
    Match match(kId, setup, ModelParams{});
    match.set_refold_checkpoint_interval(checkpoint_every);
    (void)match.apply(
        bench::message(kId, 2, Period::first_half, 0, PeriodStart{Period::first_half}));
    for (std::size_t i = 1; i < n; ++i) {
        (void)match.apply(
            bench::message(kId, 2 * (i + 1), Period::first_half, clock_of(i, span), body_of(i)));
    }
    return match;
}

double percentile(std::vector<double> v, double q) {
    std::sort(v.begin(), v.end());
    return v[static_cast<std::size_t>(q * static_cast<double>(v.size() - 1))];
}

struct Figures {
    double median_us = 0.0;
    double p99_us = 0.0;
    double total_ms = 0.0;
};

// `samples` late messages into a fresh match of n messages. Near: a live feed goes on, so
// before each late message a new one arrives at the head (untimed), and the late one lands 8
// entries behind the newest. Deep: walking back from the middle of the log, one gap each.
Figures late_messages(std::size_t n, std::size_t checkpoint_every, std::size_t samples, bool deep,
                      std::size_t* checkpoint_bytes = nullptr) {
    const std::size_t span = n + samples;  // the clock spacing leaves room for the head's growth
    Match match = long_match(n, span, checkpoint_every);
    std::vector<double> us;
    us.reserve(samples);
    double total_ns = 0.0;
    for (std::size_t k = 0; k < samples; ++k) {
        std::size_t entry = n / 2 - k;
        if (!deep) {
            const std::size_t head = n + k;
            (void)match.apply(bench::message(kId, 2 * (head + 1), Period::first_half,
                                             clock_of(head, span), body_of(head)));
            entry = head - 8;
        }
        const InboundMessage m = bench::message(kId, 2 * (entry + 1) + 1, Period::first_half,
                                                clock_of(entry, span), ShotXg{Side::home, 0.03});
        const auto t0 = SteadyClock::now();
        const ApplyResult r = match.apply(m);
        const auto t1 = SteadyClock::now();
        if (r.verdict != Verdict::late) {
            std::fprintf(stderr, "unexpected verdict %s\n", verdict_name(r.verdict));
            std::exit(1);
        }
        const double ns = std::chrono::duration<double, std::nano>(t1 - t0).count();
        us.push_back(ns / 1000.0);
        total_ns += ns;
    }
    if (checkpoint_bytes) *checkpoint_bytes = match.refold_checkpoint_bytes();
    return {percentile(us, 0.5), percentile(us, 0.99), total_ns / 1e6};
}

}  // namespace

int main() {
    const std::size_t every = Match::kDefaultRefoldCheckpointInterval;
    std::printf("late message into a match of N messages: Match::apply, microseconds\n");
    std::printf("%-8s %-5s %6s | %12s %12s | %12s %12s | %8s %9s\n", "N", "depth", "samples",
                "full median", "full p99", "ckpt median", "ckpt p99", "ratio", "ckpt KiB");
    for (const std::size_t n : {1'000U, 10'000U, 50'000U, 200'000U}) {
        for (const bool deep : {false, true}) {
            const std::size_t samples = n >= 50'000 ? 300 : 1000;  // the full re-fold's time
            const std::size_t use = std::min(samples, n / 2 - 16);
            std::size_t bytes = 0;
            const Figures full = late_messages(n, 0, use, deep);
            const Figures ckpt = late_messages(n, every, use, deep, &bytes);
            std::printf("%-8zu %-5s %6zu | %12.1f %12.1f | %12.1f %12.1f | %7.1fx %9.1f\n", n,
                        deep ? "deep" : "near", use, full.median_us, full.p99_us, ckpt.median_us,
                        ckpt.p99_us, full.median_us / ckpt.median_us,
                        static_cast<double>(bytes) / 1024.0);
        }
    }
    std::printf("\n300 near-late messages into a live match of 50,000: the loop's time\n");
    const Figures full = late_messages(50'000, 0, 300, false);
    const Figures ckpt = late_messages(50'000, every, 300, false);
    std::printf("full re-fold %.1f ms, from checkpoints (every %zu) %.2f ms, ratio %.0fx\n",
                full.total_ms, every, ckpt.total_ms, full.total_ms / ckpt.total_ms);

    // Each checkpoint copies the goal records: their spacing grows with them (bounded bytes).
    g_all_goals = true;
    std::size_t bytes = 0;
    const Figures goals_full = late_messages(50'000, 0, 300, false);
    const Figures goals = late_messages(50'000, every, 300, false, &bytes);
    std::printf(
        "\n50,000 goals, near-late: full median %.1f us, from checkpoints median %.1f us"
        " p99 %.1f us, checkpoints %.1f KiB (%.2f bytes a message)\n",
        goals_full.median_us, goals.median_us, goals.p99_us, static_cast<double>(bytes) / 1024.0,
        static_cast<double>(bytes) / 50'300.0);
    return 0;
}
