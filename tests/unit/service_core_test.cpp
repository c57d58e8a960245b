// The service core (adapters/service/service_core.hpp) driven without sockets, on a simulated
// clock: bytes in, actions out. The record log is a real journal folder (or /dev/full, which
// fails every write with ENOSPC as a full disk does).
#include <catch2/catch.hpp>

#include <chrono>
#include <cmath>
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "feed_builder.hpp"
#include "liveprob/files/journal.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/ingest_ack_codec.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/sharding.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/service/journal_record_log.hpp"
#include "liveprob/service/service_core.hpp"
#include "test_env.hpp"

using namespace liveprob;
using namespace liveprob::service;
using core::InboundMessage;
using core::Period;
using core::Side;
using std::chrono::milliseconds;
using std::chrono::seconds;

namespace {

// Time moves only when the test says so.
class SimulatedClock final : public ServiceClock {
public:
    ServiceTime now() override {
        return {
            std::chrono::steady_clock::time_point{} + elapsed_,
            kWallStartUs + std::chrono::duration_cast<std::chrono::microseconds>(elapsed_).count()};
    }
    void advance(std::chrono::steady_clock::duration d) { elapsed_ += d; }
    static constexpr std::int64_t kWallStartUs = 1'900'000'000'000'000;

private:
    std::chrono::steady_clock::duration elapsed_{seconds(1000)};
};

// Everything the core asked for, in order: "journal <match>", "publish <match>", "ack <peer>",
// "counters".
struct Recorder final : ServiceActions {
    void publish_update(const protocol::UpdateMeta& meta,
                        std::span<const std::uint8_t> bytes) override {
        auto decoded = protocol::decode_update(bytes);
        REQUIRE(decoded.ok());
        CHECK(decoded.value->meta == meta);
        events.push_back("publish " + std::to_string(meta.match_id));
        updates.push_back(*decoded.value);
    }
    void publish_counters(std::span<const std::uint8_t> bytes) override {
        auto decoded = protocol::decode_counters(bytes);
        REQUIRE(decoded.ok());
        events.push_back("counters");
        counters.clear();
        for (const auto& [name, value] : decoded.value->values) counters[name] = value;
    }
    void acknowledge(std::string_view peer, std::span<const std::uint8_t> bytes) override {
        auto decoded = protocol::decode_ingest_ack(bytes);
        REQUIRE(decoded.ok());
        events.push_back("ack " + std::string(peer));
        acks.push_back(*decoded.value);
    }
    std::vector<std::string> events;
    std::vector<protocol::DecodedUpdate> updates;
    std::vector<protocol::IngestAckContents> acks;
    std::map<std::string, std::uint64_t> counters;
};

// serve's record log on a real journal, noting each write among the recorder's events and
// letting the test look at the service at the moment of the write.
class WatchedJournal final : public RecordLog {
public:
    WatchedJournal(const std::filesystem::path& path, files::JournalSync sync, Recorder& recorder)
        : journal_(path, sync, milliseconds(200)), log_(journal_), recorder_(recorder) {
        journal_.replay([](std::span<const std::uint8_t>) {});
    }
    void append(std::span<const std::uint8_t> record) override {
        const auto decoded = protocol::decode_feed_message(record);
        REQUIRE(decoded.message);
        if (on_append) on_append(*decoded.message);
        log_.append(record);  // throws on a failed write, before it is noted
        recorder_.events.push_back("journal " + std::to_string(decoded.message->header.match_id));
    }
    bool awaiting_sync() const override { return log_.awaiting_sync(); }
    void sync(std::chrono::steady_clock::time_point now, bool force) override {
        log_.sync(now, force);
    }
    std::function<void(const InboundMessage&)> on_append;

private:
    files::Journal journal_;
    JournalRecordLog log_;
    Recorder& recorder_;
};

// A journal whose disk fills up and empties on the test's word: while `full`, records go to
// /dev/full, which fails every write with ENOSPC.
struct FillingDisk final : RecordLog {
    FillingDisk(const std::filesystem::path& folder, Recorder& recorder)
        : working(folder, files::JournalSync::every_message, recorder),
          device("/dev/full", files::JournalSync::every_message, recorder) {}
    RecordLog& current() { return full ? static_cast<RecordLog&>(device) : working; }
    void append(std::span<const std::uint8_t> r) override { current().append(r); }
    bool awaiting_sync() const override { return false; }  // every_message: synced on append
    void sync(std::chrono::steady_clock::time_point now, bool force) override {
        current().sync(now, force);
    }
    WatchedJournal working;
    WatchedJournal device;
    bool full = false;
};

std::vector<std::uint8_t> bytes(const InboundMessage& m) {
    return protocol::encode_feed_message(m);
}

InboundMessage setup_of(test::FeedBuilder& feed) {
    core::MatchSetup setup;
    setup.home_name = "Harbour Town";
    setup.away_name = "Millbrook Rovers";
    setup.prior = core::PriorMeans{1.4, 1.1};
    return feed.next(setup, core::MatchClock{Period::pre_match, 0});
}

CoreSettings settings_with(std::uint32_t retention_s = 600, std::uint32_t waiting_ttl_s = 60,
                           std::uint32_t cap = 50000) {
    ServiceConfig config;
    config.retention_s = retention_s;
    config.waiting_ttl_s = waiting_ttl_s;
    config.match_message_cap = cap;
    return core_settings(config);
}

struct Harness {
    explicit Harness(CoreSettings settings = settings_with(), RecordLog* log = nullptr,
                     FinalStateStore* final_states = nullptr)
        : core(core::ModelParams{}, std::move(settings), clock, recorder, log, final_states) {}
    Intake send(const InboundMessage& m, std::optional<Delivery> delivery = {}) {
        return core.ingest(bytes(m), delivery);
    }
    std::map<std::string, std::uint64_t>& counters() {
        core.publish_counters();
        return recorder.counters;
    }
    SimulatedClock clock;
    Recorder recorder;
    ServiceCore core;
};

}  // namespace

TEST_CASE("service core: each message is journaled before it is applied, then published",
          "[unit][service_core]") {
    const auto dir = test::scratch_dir("core-journal-order");
    SimulatedClock clock;
    Recorder actions;
    std::optional<WatchedJournal> journal;
    journal.emplace(dir / "journal", files::JournalSync::every_message, actions);
    ServiceCore core(core::ModelParams{}, settings_with(), clock, actions, &*journal);

    test::FeedBuilder feed(31);
    core.ingest(bytes(setup_of(feed)));
    core.ingest(bytes(feed.start(Period::first_half, 0)));
    // At the goal's write, the match does not have the goal yet.
    std::optional<std::uint16_t> home_goals_at_write;
    journal->on_append = [&](const InboundMessage&) {
        home_goals_at_write = core.registry().find(31)->match.state().goals(Side::home);
    };
    actions.events.clear();
    actions.updates.clear();
    CHECK(core.ingest(bytes(feed.goal(Side::home, Period::first_half, 12))) == Intake::durable);
    CHECK(home_goals_at_write == 0);
    CHECK(actions.events == std::vector<std::string>{"journal 31", "publish 31"});
    REQUIRE(actions.updates.size() == 1);
    CHECK(actions.updates[0].outputs.home_goals == 1);
    CHECK(actions.updates[0].meta.input_seq == feed.last_seq());

    // What was journaled rebuilds the same state: a second core restored from the folder.
    journal.reset();
    files::Journal reread(dir / "journal", files::JournalSync::none, milliseconds(200));
    Recorder restored_actions;
    ServiceCore restored(core::ModelParams{}, settings_with(), clock, restored_actions, nullptr);
    reread.replay([&](std::span<const std::uint8_t> r) { restored.restore(r); });
    CHECK(restored_actions.events.empty());  // nothing published while restoring
    restored.finish_restore();
    REQUIRE(restored_actions.updates.size() == 1);  // then each match once
    CHECK(restored_actions.updates[0].outputs.home_goals == 1);
    CHECK(restored_actions.updates[0].meta.output_seq ==
          static_cast<std::uint64_t>(clock.now().wall_us) + 1);
}

TEST_CASE(
    "service core: a message that cannot be journaled is neither applied, published nor "
    "acknowledged, and is counted",
    "[unit][service_core]") {
    Recorder actions;
    SimulatedClock clock;
    FillingDisk log(test::scratch_dir("core-journal-full") / "journal", actions);
    ServiceCore core(core::ModelParams{}, settings_with(), clock, actions, &log);
    test::FeedBuilder feed(32);
    REQUIRE(core.ingest(bytes(setup_of(feed)), Delivery{"feed-a", 1}) == Intake::durable);
    REQUIRE(core.ingest(bytes(feed.start(Period::first_half, 0)), Delivery{"feed-a", 2}) ==
            Intake::durable);
    core.settle_acks();
    REQUIRE(actions.acks.size() == 1);
    CHECK(actions.acks[0].durable == std::vector<protocol::TicketRange>{{1, 2}});

    log.full = true;
    actions.events.clear();
    actions.acks.clear();
    CHECK(core.ingest(bytes(feed.goal(Side::away, Period::first_half, 20)),
                      Delivery{"feed-a", 3}) == Intake::not_journaled);
    core.settle_acks();
    CHECK(actions.events.empty());  // not journaled, not published, nothing acknowledged
    CHECK(core.journal_failing());
    CHECK(core.registry().find(32)->match.state().goals(Side::away) == 0);
    core.publish_counters();
    CHECK(actions.counters["journal.write_failed"] == 1);
    CHECK(actions.counters["journal.frames"] == 2);
    CHECK(actions.counters["engine.accepted"] == 1);  // the kick-off alone

    // Space returns: the feed's resend goes through.
    log.full = false;
    CHECK(core.ingest(bytes(feed.with_seq(3, core::Goal{Side::away, false, false},
                                          test::at_minute(Period::first_half, 20))),
                      Delivery{"feed-a", 3}) == Intake::durable);
    CHECK(core.registry().find(32)->match.state().goals(Side::away) == 1);
    CHECK_FALSE(core.journal_failing());
}

TEST_CASE("service core: acknowledgements name durable and refused tickets per feed",
          "[unit][service_core]") {
    ServiceConfig config;
    config.shard = "0/2";
    Harness h(core_settings(config));
    // One match id of each shard.
    std::uint64_t ours = 1, theirs = 1;
    while (protocol::shard_of(ours, 2) != 0) ++ours;
    while (protocol::shard_of(theirs, 2) != 1) ++theirs;
    test::FeedBuilder mine(ours), other(theirs);
    CHECK(h.send(setup_of(mine), Delivery{"a", 10}) == Intake::durable);
    CHECK(h.send(setup_of(other), Delivery{"a", 11}) == Intake::refused);
    const std::vector<std::uint8_t> garbage(40, 0x5A);
    CHECK(h.core.ingest(garbage, Delivery{"b", 7}) == Intake::refused);
    CHECK(h.send(mine.start(Period::first_half, 0), Delivery{"a", 12}) == Intake::durable);
    CHECK(h.recorder.acks.empty());  // owed until the batch is settled
    h.core.settle_acks();
    REQUIRE(h.recorder.acks.size() == 2);
    CHECK(h.recorder.events[h.recorder.events.size() - 2] == "ack a");
    CHECK(h.recorder.events.back() == "ack b");
    CHECK(h.recorder.acks[0].durable == std::vector<protocol::TicketRange>{{10, 10}, {12, 12}});
    CHECK(h.recorder.acks[0].refused == std::vector<protocol::TicketRange>{{11, 11}});
    CHECK(h.recorder.acks[1].refused == std::vector<protocol::TicketRange>{{7, 7}});
    const auto& c = h.counters();
    CHECK(c.at("ingest.not_our_shard") == 1);
    CHECK(c.at("ingest.rejected") == 1);
    CHECK(c.at("ack.durable") == 2);
    CHECK(c.at("ack.refused") == 2);
    CHECK(c.at("ack.messages") == 2);
}

TEST_CASE(
    "service core: waiting messages expire on the simulated clock, and a setup after that "
    "finds none of them",
    "[unit][service_core]") {
    Harness h(settings_with(600, 60));
    test::FeedBuilder early(40), late(41);
    const InboundMessage early_setup = setup_of(early), late_setup = setup_of(late);
    // Both matches' kick-off and a goal arrive before their setups.
    for (test::FeedBuilder* feed : {&early, &late}) {
        h.send(feed->start(Period::first_half, 0));
        h.send(feed->goal(Side::home, Period::first_half, 4));
    }
    CHECK(h.counters().at("ingest.waiting_for_setup") == 4);
    CHECK(h.recorder.updates.empty());

    h.clock.advance(seconds(59));
    h.core.tick();
    h.send(early_setup);  // within the time to live: both held messages applied
    REQUIRE(h.core.registry().find(40) != nullptr);
    CHECK(h.core.registry().find(40)->match.state().goals(Side::home) == 1);
    CHECK(h.counters().at("ingest.waiting_expired") == 0);

    h.clock.advance(seconds(1));  // 60 s after the first held message
    h.core.tick();
    CHECK(h.counters().at("ingest.waiting_expired") == 2);
    h.send(late_setup);
    REQUIRE(h.core.registry().find(41) != nullptr);
    CHECK(h.core.registry().find(41)->match.state().goals(Side::home) == 0);
    CHECK(h.core.registry().find(41)->match.state().status == core::MatchStatus::not_started);
}

TEST_CASE("service core: past the per-match cap messages are refused, counted and change nothing",
          "[unit][service_core]") {
    Harness h(settings_with(600, 60, 3));
    test::FeedBuilder feed(50);
    h.send(setup_of(feed));
    h.send(feed.start(Period::first_half, 0));
    h.send(feed.goal(Side::home, Period::first_half, 5));
    const std::size_t published = h.recorder.updates.size();
    // Refused, yet durable: journaled and acknowledged as taken, so the feed does not resend.
    CHECK(h.send(feed.goal(Side::away, Period::first_half, 6)) == Intake::durable);
    CHECK(h.send(feed.goal(Side::away, Period::first_half, 7)) == Intake::durable);
    CHECK(h.recorder.updates.size() == published);
    CHECK(h.core.registry().find(50)->match.state().goals(Side::away) == 0);
    CHECK(h.counters().at("ingest.over_match_cap") == 2);
    // Another match is not held back by it.
    test::FeedBuilder other(51);
    h.send(setup_of(other));
    CHECK(h.recorder.updates.back().meta.match_id == 51);
}

TEST_CASE("service core: duplicates and late messages are counted, and a late goal is folded in",
          "[unit][service_core]") {
    Harness h;
    test::FeedBuilder feed(60);
    h.send(setup_of(feed));
    h.send(feed.start(Period::first_half, 0));
    const InboundMessage first_goal = feed.goal(Side::home, Period::first_half, 10);
    const InboundMessage second_goal = feed.goal(Side::away, Period::first_half, 20);
    h.send(second_goal);  // out of order: the earlier goal comes after it
    h.send(first_goal);
    const std::size_t published = h.recorder.updates.size();
    h.send(first_goal);                             // the same message again
    CHECK(h.recorder.updates.size() == published);  // a duplicate publishes nothing
    const auto& c = h.counters();
    CHECK(c.at("engine.duplicate") == 1);
    CHECK(c.at("engine.late") == 1);
    CHECK(c.at("engine.accepted") ==
          2);  // the kick-off and the later goal (the setup is not an event)
    const auto& last = h.recorder.updates.back();
    CHECK(last.outputs.home_goals == 1);
    CHECK(last.outputs.away_goals == 1);
}

TEST_CASE(
    "service core: a finished match is retired after the retention and then unknown to "
    "snapshots",
    "[unit][service_core]") {
    Harness h(settings_with(300));
    test::FeedBuilder done(70), playing(71);
    for (test::FeedBuilder* feed : {&done, &playing}) {
        h.send(setup_of(*feed));
        h.send(feed->start(Period::first_half, 0));
    }
    h.send(done.end(Period::first_half, 46));
    h.send(done.start(Period::second_half, 45));
    h.send(done.whistle(Period::second_half, 94));
    const auto snapshot_of = [&](std::uint64_t id) {
        const auto parts = h.core.answer_snapshot(protocol::encode_snapshot_request(id));
        REQUIRE(parts.size() == 1);
        auto reply = protocol::decode_snapshot_reply(parts[0]);
        REQUIRE(reply.ok());
        return *reply.value;
    };
    CHECK(snapshot_of(70).updates.size() == 1);

    h.clock.advance(seconds(299));
    h.recorder.updates.clear();
    h.core.tick();
    // The tick republishes the live match only; the finished one is still answerable.
    REQUIRE(h.recorder.updates.size() == 1);
    CHECK(h.recorder.updates[0].meta.match_id == 71);
    CHECK(snapshot_of(70).updates.size() == 1);
    CHECK(h.counters().at("matches.retired") == 0);

    h.clock.advance(seconds(1));
    h.core.tick();
    CHECK(h.counters().at("matches.retired") == 1);
    CHECK(h.core.registry().find(70) == nullptr);
    CHECK(snapshot_of(70).error == "unknown match 70");
    CHECK(h.core.registry().find(71) != nullptr);    // live matches stay, however old
    CHECK(h.counters().at("engine.accepted") == 5);  // its verdicts stay in the totals
}

TEST_CASE("service core: the tick moves a running match's clock by the simulated time",
          "[unit][service_core]") {
    Harness h;
    test::FeedBuilder feed(80);
    h.send(setup_of(feed));
    h.send(feed.start(Period::first_half, 10));
    h.clock.advance(seconds(90));
    h.recorder.updates.clear();
    h.core.tick();
    REQUIRE(h.recorder.updates.size() == 1);
    const auto& tick = h.recorder.updates[0];
    CHECK(tick.outputs.clock.clock_ms == 10 * 60'000 + 90'000);
    CHECK(tick.meta.receive_time_us == 0);  // a tick reflects no new message
    CHECK(tick.meta.publish_time_us == h.clock.now().wall_us);
    CHECK(h.counters().at("publish.ticks") == 1);
}

TEST_CASE("service core: with clock interpolation the ticks stay within 1e-12 of exact ones",
          "[unit][service_core][interpolation]") {
    CoreSettings interpolating = settings_with();
    interpolating.clock_interpolation = true;
    Harness exact;
    Harness drifting(std::move(interpolating));
    test::FeedBuilder feed(81);
    for (const auto& m : {setup_of(feed), feed.start(Period::first_half, 0),
                          feed.goal(Side::away, Period::first_half, 3)}) {
        exact.send(m);
        drifting.send(m);
    }
    exact.recorder.updates.clear();
    drifting.recorder.updates.clear();
    for (int s = 0; s < 20 * 60; ++s) {  // 20 minutes of a 1 Hz timer
        exact.clock.advance(seconds(1));
        drifting.clock.advance(seconds(1));
        exact.core.tick();
        drifting.core.tick();
    }
    REQUIRE(exact.recorder.updates.size() == 20 * 60);
    REQUIRE(drifting.recorder.updates.size() == exact.recorder.updates.size());
    double worst = 0.0;
    int differing = 0;
    for (std::size_t k = 0; k < exact.recorder.updates.size(); ++k) {
        const auto& a = exact.recorder.updates[k].outputs;
        const auto& b = drifting.recorder.updates[k].outputs;
        REQUIRE(a.clock == b.clock);
        for (const auto& [x, y] : {std::pair{a.p_home, b.p_home},
                                   {a.p_draw, b.p_draw},
                                   {a.p_away, b.p_away},
                                   {a.next_goal_home, b.next_goal_home},
                                   {a.expected_home_goals, b.expected_home_goals},
                                   {a.goals_added[1][2], b.goals_added[1][2]}}) {
            worst = std::max(worst, std::abs(x - y));
        }
        differing += a.p_home != b.p_home ? 1 : 0;
    }
    CHECK(worst <= 1e-12);
    CHECK(differing > 20 * 60 / 2);  // the interpolant priced most ticks
}

TEST_CASE("service core: a snapshot of every live match comes in parts, each under the limit",
          "[unit][service_core]") {
    Harness h;
    const std::uint64_t matches = protocol::kSnapshotUpdatesPerPart + 5;
    for (std::uint64_t id = 1; id <= matches; ++id) {
        test::FeedBuilder feed(id);
        h.send(setup_of(feed));
    }
    const auto parts = h.core.answer_snapshot(protocol::encode_snapshot_request(0));
    REQUIRE(parts.size() == 2);
    std::vector<std::span<const std::uint8_t>> frames;
    for (const auto& part : parts) {
        CHECK(part.size() <= protocol::kMaxSnapshotReplyBytes);
        frames.emplace_back(part);
    }
    const auto whole = protocol::decode_snapshot_reply_parts(frames);
    REQUIRE(whole.ok());
    CHECK(whole.value->updates.size() == matches);
    CHECK(h.counters().at("snapshot.requests") == 1);
}

TEST_CASE(
    "service core: a match whose feed falls silent in play is marked stale, then no longer "
    "ticked, and its next message wakes it",
    "[unit][service_core]") {
    CoreSettings settings = settings_with();
    settings.feed_stale_after = seconds(300);
    settings.feed_dormant_after = seconds(1800);
    Harness h(std::move(settings));
    test::FeedBuilder silent(90), waiting(91);
    h.send(setup_of(silent));
    h.send(silent.start(Period::first_half, 0));
    h.send(setup_of(waiting));  // not started: silence before kick-off is normal
    const auto tick_of = [&](std::uint64_t id) -> std::optional<protocol::DecodedUpdate> {
        h.recorder.updates.clear();
        h.core.tick();
        for (const auto& u : h.recorder.updates) {
            if (u.meta.match_id == id) return u;
        }
        return std::nullopt;
    };

    h.clock.advance(seconds(299));
    const auto quiet = tick_of(90);
    REQUIRE(quiet.has_value());
    CHECK_FALSE(quiet->meta.feed_stale);
    CHECK(h.counters().at("matches.stale") == 0);

    h.clock.advance(seconds(1));  // 300 s of silence in play
    auto tick = tick_of(90);
    REQUIRE(tick.has_value());
    CHECK(tick->meta.feed_stale);
    CHECK(tick->outputs.clock.clock_ms == 300'000);  // still drifting on the clock alone
    auto other = tick_of(91);
    REQUIRE(other.has_value());
    CHECK_FALSE(other->meta.feed_stale);
    CHECK(h.counters().at("matches.stale") == 1);
    // A late joiner's snapshot says so too.
    const auto reply = protocol::decode_snapshot_reply(
        h.core.answer_snapshot(protocol::encode_snapshot_request(90)).at(0));  // one part
    REQUIRE(reply.ok());
    REQUIRE(reply.value->updates.size() == 1);
    CHECK(reply.value->updates[0].meta.feed_stale);

    h.clock.advance(seconds(1500));  // 1800 s: both matches go dormant
    CHECK_FALSE(tick_of(90).has_value());
    CHECK(h.recorder.updates.empty());
    CHECK(h.counters().at("ticks.stopped_silent") == 2);
    CHECK(h.counters().at("matches.dormant") == 2);
    h.clock.advance(seconds(3600));
    CHECK_FALSE(tick_of(90).has_value());
    CHECK(h.counters().at("ticks.stopped_silent") == 2);  // counted once per silence

    // The feed speaks again: an update without the mark at once, and ticks again.
    h.recorder.updates.clear();
    h.send(silent.goal(Side::home, Period::first_half, 20));
    REQUIRE(h.recorder.updates.size() == 1);
    CHECK_FALSE(h.recorder.updates[0].meta.feed_stale);
    CHECK(h.recorder.updates[0].outputs.home_goals == 1);
    tick = tick_of(90);
    REQUIRE(tick.has_value());
    CHECK_FALSE(tick->meta.feed_stale);
    CHECK(h.counters().at("matches.dormant") == 1);  // the one still waiting for kick-off
}

TEST_CASE(
    "service core: while the journal cannot be written every update says so, until a "
    "message is journaled again",
    "[unit][service_core]") {
    Recorder actions;
    SimulatedClock clock;
    FillingDisk log(test::scratch_dir("core-journal-failing") / "journal", actions);
    ServiceCore core(core::ModelParams{}, settings_with(), clock, actions, &log);
    test::FeedBuilder a(100), b(101);
    core.ingest(bytes(setup_of(a)));
    core.ingest(bytes(a.start(Period::first_half, 0)));
    core.ingest(bytes(setup_of(b)));
    REQUIRE_FALSE(actions.updates.empty());
    for (const auto& u : actions.updates) CHECK_FALSE(u.meta.journal_failing);

    log.full = true;
    CHECK(core.ingest(bytes(a.goal(Side::away, Period::first_half, 3))) == Intake::not_journaled);
    clock.advance(seconds(1));
    actions.updates.clear();
    core.tick();
    REQUIRE(actions.updates.size() == 2);  // both live matches, the one that lost a goal too
    for (const auto& u : actions.updates) CHECK(u.meta.journal_failing);
    const auto reply = protocol::decode_snapshot_reply(
        core.answer_snapshot(protocol::encode_snapshot_request(0)).at(0));
    REQUIRE(reply.ok());
    REQUIRE(reply.value->updates.size() == 2);
    for (const auto& u : reply.value->updates) CHECK(u.meta.journal_failing);

    log.full = false;
    actions.updates.clear();
    CHECK(core.ingest(bytes(b.start(Period::first_half, 0))) == Intake::durable);
    REQUIRE(actions.updates.size() == 1);
    CHECK_FALSE(actions.updates[0].meta.journal_failing);
    clock.advance(seconds(1));
    actions.updates.clear();
    core.tick();
    REQUIRE(actions.updates.size() == 2);
    for (const auto& u : actions.updates) CHECK_FALSE(u.meta.journal_failing);
}

namespace {

// serve's journal folder as the core sees it: the record log and the final-state store.
struct JournalFolder {
    explicit JournalFolder(const std::filesystem::path& path,
                           std::uint64_t segment_bytes = files::kDefaultJournalSegmentBytes)
        : journal(path, files::JournalSync::none, milliseconds(200), segment_bytes), log(journal),
          file(path, files::JournalSync::none), final_states(file) {}
    // A core on this folder, restored from it as serve restores at start.
    void restore_into(ServiceCore& core) {
        journal.replay([&](std::span<const std::uint8_t> r) { core.restore(r); });
        core.finish_restore();
    }
    files::Journal journal;
    JournalRecordLog log;
    files::FinalStateFile file;
    JournalFinalStates final_states;
};

protocol::SnapshotReplyContents snapshot_of(ServiceCore& core, std::uint64_t id) {
    const auto parts = core.answer_snapshot(protocol::encode_snapshot_request(id));
    REQUIRE(parts.size() == 1);
    auto reply = protocol::decode_snapshot_reply(parts[0]);
    REQUIRE(reply.ok());
    return *reply.value;
}

// The figures a client reads from an update, compared between two answers for one match.
void check_same_state(const protocol::DecodedUpdate& a, const protocol::DecodedUpdate& b) {
    CHECK(a.meta.match_id == b.meta.match_id);
    CHECK(a.meta.input_seq == b.meta.input_seq);
    CHECK(a.outputs.status == b.outputs.status);
    CHECK(a.outputs.clock.period == b.outputs.clock.period);
    CHECK(a.outputs.clock.clock_ms == b.outputs.clock.clock_ms);
    CHECK(a.outputs.home_goals == b.outputs.home_goals);
    CHECK(a.outputs.away_goals == b.outputs.away_goals);
    CHECK(a.outputs.events_applied == b.outputs.events_applied);
    CHECK(a.outputs.p_home == b.outputs.p_home);
    CHECK(a.outputs.p_draw == b.outputs.p_draw);
    CHECK(a.outputs.p_away == b.outputs.p_away);
    CHECK(a.outputs.expected_home_goals == b.outputs.expected_home_goals);
}

// A whole short match: setup, kick-off, a home goal, half-time, the second half, the whistle.
std::vector<InboundMessage> finished_match(test::FeedBuilder& feed) {
    return {setup_of(feed),
            feed.start(Period::first_half, 0),
            feed.goal(Side::home, Period::first_half, 20),
            feed.end(Period::first_half, 46),
            feed.start(Period::second_half, 45),
            feed.whistle(Period::second_half, 94)};
}

std::uint64_t segment_bytes_in(const std::filesystem::path& folder) {
    std::uint64_t total = 0;
    for (const auto& segment : protocol::list_journal_segments(folder))
        total += std::filesystem::file_size(segment);
    return total;
}

}  // namespace

TEST_CASE(
    "service core: a retired match is answered with its final update from the final-state "
    "store, refuses a resent setup, and stays answered after a restart",
    "[unit][service_core]") {
    const auto dir = test::scratch_dir("core-final-states") / "journal";
    protocol::DecodedUpdate final_update;
    {
        JournalFolder folder(dir);
        Harness h(settings_with(300), &folder.log, &folder.final_states);
        folder.restore_into(h.core);
        test::FeedBuilder done(70), playing(71);
        for (const auto& m : finished_match(done)) h.core.ingest(bytes(m));
        h.core.ingest(bytes(setup_of(playing)));
        h.core.ingest(bytes(playing.start(Period::first_half, 0)));
        final_update = h.recorder.updates[h.recorder.updates.size() - 3];
        REQUIRE(final_update.meta.match_id == 70);
        REQUIRE(final_update.outputs.status == core::MatchStatus::finished);

        h.clock.advance(seconds(300));
        h.core.tick();
        CHECK(h.core.registry().find(70) == nullptr);  // out of memory...
        const auto answer = snapshot_of(h.core, 70);   // ...and still answered
        CHECK(answer.error.empty());
        REQUIRE(answer.updates.size() == 1);
        check_same_state(answer.updates[0], final_update);
        CHECK(answer.updates[0].meta.output_seq == final_update.meta.output_seq);
        CHECK(answer.updates[0].meta.publish_time_us == h.clock.now().wall_us);
        CHECK(snapshot_of(h.core, 0).updates.size() == 1);  // "every live match": 71 alone
        CHECK(snapshot_of(h.core, 72).error == "unknown match 72");

        // A feed resending the finished match's setup does not bring it back as a new match.
        test::FeedBuilder resent(70);
        CHECK(h.core.ingest(bytes(setup_of(resent))) == Intake::refused);
        CHECK(h.core.registry().find(70) == nullptr);
        const auto& c = h.counters();
        CHECK(c.at("matches.retired") == 1);
        CHECK(c.at("final_states.kept") == 1);
        CHECK(c.at("snapshot.final_states") == 1);
        CHECK(c.at("ingest.after_retirement") == 1);
        CHECK(c.at("journal.frames") == 8);  // the refused setup never reached the journal
    }
    // Restarted on the same folder: the retired match is not rebuilt from its records (they
    // are refused as after its retirement), and its final update is answered as before.
    JournalFolder folder(dir);
    Harness h(settings_with(300), &folder.log, &folder.final_states);
    folder.restore_into(h.core);
    CHECK(h.core.registry().find(70) == nullptr);
    CHECK(h.core.registry().find(71) != nullptr);
    CHECK(h.counters().at("ingest.after_retirement") == 6);
    const auto answer = snapshot_of(h.core, 70);
    REQUIRE(answer.updates.size() == 1);
    check_same_state(answer.updates[0], final_update);
}

TEST_CASE(
    "service core: compaction drops retired matches' records, the journal shrinks, and a "
    "restart from it equals a restart from the uncompacted journal",
    "[unit][service_core]") {
    const auto scratch = test::scratch_dir("core-compaction");
    const auto dir = scratch / "journal";
    const auto uncompacted = scratch / "uncompacted";
    constexpr std::uint64_t kSegmentBytes = 1024;  // a few records each: many closed segments
    CoreSettings settings = settings_with(300);
    settings.compact_every = seconds(600);
    const std::vector<std::uint64_t> finished_ids = {80, 81, 82};
    const std::vector<std::uint64_t> live_ids = {83, 84, 85};
    std::uint64_t bytes_before = 0;
    {
        JournalFolder folder(dir, kSegmentBytes);
        Harness h(settings, &folder.log, &folder.final_states);
        folder.restore_into(h.core);
        // Finished and live matches interleaved, so most segments hold both.
        std::vector<test::FeedBuilder> live, done;
        for (const auto id : live_ids) live.emplace_back(id);
        for (const auto id : finished_ids) done.emplace_back(id);
        for (auto& feed : live) {
            h.core.ingest(bytes(setup_of(feed)));
            h.core.ingest(bytes(feed.start(Period::first_half, 0)));
        }
        for (std::size_t i = 0; i < done.size(); ++i) {
            for (const auto& m : finished_match(done[i])) h.core.ingest(bytes(m));
            h.core.ingest(bytes(live[i].goal(i % 2 == 0 ? Side::home : Side::away,
                                             Period::first_half, 10.0 + double(i))));
        }
        h.clock.advance(seconds(300));
        h.core.tick();  // retires the finished three; compaction is not due yet
        CHECK(h.counters().at("matches.retired") == 3);
        CHECK(h.counters().at("journal.compactions") == 0);
        // After their retirement the live matches go on.
        h.core.ingest(bytes(live[0].goal(Side::away, Period::first_half, 30)));
        std::filesystem::copy(dir, uncompacted, std::filesystem::copy_options::recursive);
        bytes_before = segment_bytes_in(dir);

        h.clock.advance(seconds(300));
        h.core.tick();
        const auto& c = h.counters();
        CHECK(c.at("journal.compactions") == 1);
        CHECK(c.at("journal.compacted_records") == 3 * 6);  // every record of the three
        CHECK(c.at("journal.compaction_failed") == 0);
        h.core.ingest(bytes(live[1].goal(Side::home, Period::first_half, 31)));  // appends on
        h.core.ingest(bytes(live[1].goal(Side::home, Period::first_half, 32)));
        h.clock.advance(seconds(600));
        h.core.tick();  // nothing retired since: no compaction for nothing
        CHECK(h.counters().at("journal.compactions") == 1);
    }
    const std::uint64_t bytes_after = segment_bytes_in(dir);
    CHECK(bytes_after < bytes_before);
    // The second run's goals, added to the uncompacted copy too, so both hold the same input.
    {
        JournalFolder copy(uncompacted, kSegmentBytes);
        copy.journal.replay([](std::span<const std::uint8_t>) {});
        test::FeedBuilder again(84, 4);  // setup, kick-off and one goal came before
        copy.journal.append(bytes(again.goal(Side::home, Period::first_half, 31)));
        copy.journal.append(bytes(again.goal(Side::home, Period::first_half, 32)));
    }

    JournalFolder compacted_folder(dir, kSegmentBytes), full_folder(uncompacted, kSegmentBytes);
    Harness compacted(settings, &compacted_folder.log, &compacted_folder.final_states);
    Harness full(settings, &full_folder.log, &full_folder.final_states);
    compacted_folder.restore_into(compacted.core);
    full_folder.restore_into(full.core);
    CHECK(compacted.core.registry().matches().size() == live_ids.size());
    CHECK(full.core.registry().matches().size() == live_ids.size());
    for (const auto id : live_ids) {
        INFO("live match " << id);
        const auto a = snapshot_of(compacted.core, id);
        const auto b = snapshot_of(full.core, id);
        REQUIRE(a.updates.size() == 1);
        REQUIRE(b.updates.size() == 1);
        check_same_state(a.updates[0], b.updates[0]);
    }
    CHECK(snapshot_of(compacted.core, 84).updates[0].outputs.home_goals == 2);
    for (const auto id : finished_ids) {
        INFO("retired match " << id);
        CHECK(compacted.core.registry().find(id) == nullptr);
        const auto a = snapshot_of(compacted.core, id);
        const auto b = snapshot_of(full.core, id);
        REQUIRE(a.updates.size() == 1);
        REQUIRE(b.updates.size() == 1);
        check_same_state(a.updates[0], b.updates[0]);
        CHECK(a.updates[0].outputs.status == core::MatchStatus::finished);
    }
    // The uncompacted journal still held the retired matches' records: refused at replay.
    CHECK(full.counters().at("ingest.after_retirement") == 3 * 6);
    CHECK(compacted.counters().at("ingest.after_retirement") == 0);
}
