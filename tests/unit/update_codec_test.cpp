// Outbound codecs: updates, snapshot request/reply and counters round-trip; decoders name what
// they refuse. (That the update encoder allocates nothing once warm: allocation/.)
#include <catch2/catch.hpp>

#include <cstdlib>
#include <cstring>
#include <limits>

#include "liveprob/protocol/message_checks.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "sample_messages.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {

const UpdateMeta kMeta{4242, 17, 93, 1'790'000'000'000'000, 1'790'000'000'000'150, 48'000};

void check_same(const Outputs& a, const Outputs& b) {
    CHECK(a.status == b.status);
    CHECK(a.clock == b.clock);
    CHECK(a.home_goals == b.home_goals);
    CHECK(a.away_goals == b.away_goals);
    CHECK(a.home_reds == b.home_reds);
    CHECK(a.away_reds == b.away_reds);
    CHECK(a.p_home == b.p_home);
    CHECK(a.p_draw == b.p_draw);
    CHECK(a.p_away == b.p_away);
    CHECK(a.has_advance == b.has_advance);
    CHECK(a.p_advance_home == b.p_advance_home);
    CHECK(a.p_advance_away == b.p_advance_away);
    CHECK(a.expected_home_goals == b.expected_home_goals);
    CHECK(a.expected_away_goals == b.expected_away_goals);
    CHECK(a.next_goal_home == b.next_goal_home);
    CHECK(a.next_goal_away == b.next_goal_away);
    CHECK(a.next_goal_none == b.next_goal_none);
    CHECK(a.p_over == b.p_over);
    CHECK(a.p_both_score == b.p_both_score);
    CHECK(a.goals_added == b.goals_added);
    CHECK(a.tail_mass == b.tail_mass);
    CHECK(a.events_applied == b.events_applied);
    CHECK(a.shootout == b.shootout);
}

MatchSetup named_setup() {
    MatchSetup setup;
    setup.home_name = "Brackwater Albion";
    setup.away_name = "Tidemill \"Town\"";
    setup.competition = "Lantern Coast Cup";
    setup.scheduled_kickoff_us = 1'943'622'000'000'000;
    setup.neutral_venue = true;
    setup.format.extra_time = true;
    setup.format.shootout = true;
    setup.format.first_leg = FirstLegResult{2, 1};
    setup.prior = PriorMeans{1.2, 1.1};
    return setup;
}

std::vector<std::uint8_t> copy(std::span<const std::uint8_t> s) { return {s.begin(), s.end()}; }

}  // namespace

TEST_CASE("an update round-trips with its meta and every output", "[update_codec]") {
    UpdateEncoder encoder;
    const Outputs outputs = test::sample_outputs();
    const auto bytes = copy(encoder.encode(kMeta, outputs));
    const auto decoded = decode_update(bytes);
    REQUIRE(decoded.ok());
    CHECK(decoded.value->meta == kMeta);
    check_same(decoded.value->outputs, outputs);
}

TEST_CASE("an update's stale and journal-failing marks round-trip, each on its own",
          "[update_codec]") {
    UpdateEncoder encoder;
    const Outputs outputs = test::sample_outputs();
    for (const auto& [stale, failing] : {std::pair{true, false}, std::pair{false, true},
                                         std::pair{true, true}, std::pair{false, false}}) {
        UpdateMeta meta = kMeta;
        meta.feed_stale = stale;
        meta.journal_failing = failing;
        const auto decoded = decode_update(copy(encoder.encode(meta, outputs)));
        REQUIRE(decoded.ok());
        CHECK(decoded.value->meta.feed_stale == stale);
        CHECK(decoded.value->meta.journal_failing == failing);
    }
}

TEST_CASE("an update carries the match's details and the shoot-out's kicks (schema 1.2)",
          "[update_codec]") {
    UpdateEncoder encoder;
    Outputs outputs = test::sample_outputs();
    outputs.shootout.first = Side::away;
    outputs.shootout.taken = {3, 4};
    outputs.shootout.scored = {2, 3};
    outputs.shootout.scored_bits = {0b101, 0b1011};
    const MatchSetup setup = named_setup();
    const auto decoded = decode_update(copy(encoder.encode(kMeta, outputs, setup)));
    REQUIRE(decoded.ok());
    check_same(decoded.value->outputs, outputs);
    const MatchDetails& d = decoded.value->details;
    CHECK(d == details_of(setup));
    CHECK(d.known);
    CHECK(d.home_name == "Brackwater Albion");
    CHECK(d.competition == "Lantern Coast Cup");
    CHECK(d.format.first_leg == FirstLegResult{2, 1});

    // Without a setup (as from a writer before 1.2) the details are unknown, never made up.
    const auto bare = decode_update(copy(encoder.encode(kMeta, outputs)));
    REQUIRE(bare.ok());
    CHECK_FALSE(bare.value->details.known);

    // A snapshot reply keeps each update's details.
    SnapshotReplyContents reply;
    reply.updates.push_back({kMeta, outputs, details_of(setup)});
    const auto replied = decode_snapshot_reply(encode_snapshot_reply(reply));
    REQUIRE(replied.ok());
    CHECK(replied.value->updates.at(0).details == details_of(setup));

    outputs.shootout.scored = {4, 3};  // more scored than taken
    const auto refused = decode_update(copy(encoder.encode(kMeta, outputs, setup)));
    CHECK(refused.detail == "bad_value: field 'shootout': more kicks scored than taken");
}

TEST_CASE("the grid is cut to its non-zero square, and a full grid still fits", "[update_codec]") {
    UpdateEncoder encoder;
    Outputs sparse = test::sample_outputs();  // non-zero cells within 5 x 4
    const auto small = encoder.encode(kMeta, sparse).size();
    Outputs full = sparse;
    for (auto& row : full.goals_added) row.fill(1.0 / (kGrid * kGrid));
    const auto full_bytes = copy(encoder.encode(kMeta, full));
    CHECK(small + (kGrid * kGrid - 25) * sizeof(double) <= full_bytes.size());
    CHECK(full_bytes.size() <= kMaxUpdateBytes);
    const auto decoded = decode_update(full_bytes);
    REQUIRE(decoded.ok());
    CHECK(decoded.value->outputs.goals_added == full.goals_added);

    // With names as long as the feed allows, the largest update still fits.
    MatchSetup setup = named_setup();
    setup.home_name = std::string(kMaxNameBytes, 'h');
    setup.away_name = std::string(kMaxNameBytes, 'a');
    setup.competition = std::string(kMaxNameBytes, 'c');
    CHECK(encoder.encode(kMeta, full, setup).size() <= kMaxUpdateBytes);
}

TEST_CASE("the update decoder names what it refuses", "[update_codec]") {
    UpdateEncoder encoder;
    Outputs outputs = test::sample_outputs();
    outputs.p_draw = std::numeric_limits<double>::infinity();
    auto r = decode_update(copy(encoder.encode(kMeta, outputs)));
    CHECK(r.error == DecodeError::bad_value);
    CHECK(r.detail == "bad_value: field 'p_draw': must be a probability, got inf");

    outputs = test::sample_outputs();
    outputs.status = static_cast<MatchStatus>(9);
    r = decode_update(copy(encoder.encode(kMeta, outputs)));
    CHECK(r.detail == "bad_value: field 'status': 9 is not a match status");

    const auto feed_like = encode_snapshot_request(3);
    CHECK(decode_update(feed_like).error == DecodeError::wrong_identifier);
}

TEST_CASE("snapshot requests and replies round-trip", "[snapshot_codec]") {
    const auto request = decode_snapshot_request(encode_snapshot_request(4242));
    REQUIRE(request.ok());
    CHECK(*request.value == 4242);
    CHECK(*decode_snapshot_request(encode_snapshot_request(0)).value == 0);

    SnapshotReplyContents reply;
    reply.updates.push_back({kMeta, test::sample_outputs(), {}});
    UpdateMeta second = kMeta;
    second.match_id = 77;
    Outputs finished = test::sample_outputs();
    finished.status = MatchStatus::finished;
    reply.updates.push_back({second, finished, {}});
    const auto decoded = decode_snapshot_reply(encode_snapshot_reply(reply));
    REQUIRE(decoded.ok());
    REQUIRE(decoded.value->updates.size() == 2);
    CHECK(decoded.value->error.empty());
    CHECK(decoded.value->updates[1].meta == second);
    check_same(decoded.value->updates[1].outputs, finished);

    const auto refused = decode_snapshot_reply(encode_snapshot_reply({"unknown match 42", {}}));
    REQUIRE(refused.ok());
    CHECK(refused.value->error == "unknown match 42");
    CHECK(refused.value->updates.empty());
}

TEST_CASE("a snapshot reply with a bad nested update is refused with its index",
          "[snapshot_codec]") {
    SnapshotReplyContents reply;
    reply.updates.push_back({kMeta, test::sample_outputs(), {}});
    reply.updates.push_back({kMeta, test::sample_outputs(), {}});
    reply.updates[1].outputs.tail_mass = -0.5;
    const auto decoded = decode_snapshot_reply(encode_snapshot_reply(reply));
    CHECK(decoded.error == DecodeError::bad_value);
    CHECK(decoded.detail ==
          "bad_value: update 1: field 'tail_mass': must be a probability, got -0.5");
}

TEST_CASE("counters round-trip in order", "[counters_codec]") {
    const CounterSet counters{1'790'000'000'000'000,
                              {{"inbound_accepted", 1200}, {"inbound_malformed", 3}, {"late", 0}}};
    const auto decoded = decode_counters(encode_counters(counters));
    REQUIRE(decoded.ok());
    CHECK(*decoded.value == counters);
    const CounterSet empty{5, {}};
    CHECK(*decode_counters(encode_counters(empty)).value == empty);
}
