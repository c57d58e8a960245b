// The invented match of tools/examples/embed_c.c, driven through the C++ engine from an installed
// prefix: every event goes through the wire codec (encoded to FlatBuffers, verified, decoded)
// before the match applies it, and each line is printed exactly as embed_c prints it, so the
// packaging test compares the two outputs byte for byte.
#include <cstdio>
#include <cstdlib>

#include "liveprob/core/match.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/wire/feed_generated.h"  // installed generated header: the schema's identifier

using namespace liveprob::core;

namespace {

std::uint64_t next_seq = 1;

MatchClock at(Period period, double minute) {
    return MatchClock{period, static_cast<std::uint32_t>(minute * 60000.0)};
}

void print_bar(const Match& match, const char* what) {
    const Outputs& out = match.outputs();
    std::printf("%-28s %3u' %d-%d  home %.12f  draw %.12f  away %.12f  next-goal-none %.12f\n",
                what, static_cast<unsigned>(out.clock.clock_ms / 60000u), out.home_goals,
                out.away_goals, out.p_home, out.p_draw, out.p_away, out.next_goal_none);
}

void apply(Match& match, MatchClock clock, MessageBody body, const char* what) {
    InboundMessage m;
    m.header.match_id = match.match_id();
    m.header.source_seq = next_seq++;
    m.header.clock = clock;
    m.body = std::move(body);
    const auto bytes = liveprob::protocol::encode_feed_message(m);
    if (!liveprob::wire::FeedMessageBufferHasIdentifier(bytes.data())) {
        std::fprintf(stderr, "embed_cpp: %s: no feed identifier\n", what);
        std::exit(1);
    }
    const auto decoded = liveprob::protocol::decode_feed_message(bytes);
    if (!decoded.message) {
        std::fprintf(stderr, "embed_cpp: %s: %s\n", what, decoded.detail.c_str());
        std::exit(1);
    }
    const ApplyResult result = match.apply(*decoded.message);
    if (result.verdict == Verdict::rejected) {
        std::printf("%-28s rejected: %s\n", what, reject_reason_name(result.reason));
        return;
    }
    print_bar(match, what);
}

}  // namespace

int main() {
    MatchSetup setup;
    setup.prior = PriorMeans{1.55, 1.05};  // invented demo values, as embed_c
    Match match(2024, setup);
    print_bar(match, "before kick-off");
    apply(match, at(Period::first_half, 0), PeriodStart{Period::first_half}, "kick-off");
    apply(match, at(Period::first_half, 23), Goal{Side::away, false, false}, "away goal");
    for (double minute = 30; minute <= 45; minute += 5)
        if (match.advance_to(at(Period::first_half, minute))) print_bar(match, "clock runs");
    apply(match, at(Period::first_half, 47), PeriodEnd{Period::first_half}, "half-time");
    apply(match, at(Period::second_half, 45), PeriodStart{Period::second_half}, "second half");
    apply(match, at(Period::second_half, 60), RedCard{Side::away, false}, "away red card");
    apply(match, at(Period::second_half, 78), Goal{Side::home, true, false}, "home penalty goal");
    for (double minute = 80; minute <= 90; minute += 5) {
        (void)match.advance_to(at(Period::second_half, minute));
        print_bar(match, "clock runs");
    }
    apply(match, at(Period::second_half, 91), ShootoutKick{Side::home, false},
          "a kick outside a shoot-out");
    apply(match, at(Period::second_half, 95), FinalWhistle{}, "final whistle");
    return 0;
}
