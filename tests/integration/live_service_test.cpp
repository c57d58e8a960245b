// The live service end to end: real `liveprob serve`, `send` and `tap` processes, real ZeroMQ
// sockets on loopback, ephemeral ports. What the service publishes is checked against the
// engine run in this process on the same messages.
#include <catch2/catch.hpp>

#include <csignal>
#include <memory>
#include <random>

#include "json_probe.hpp"
#include "live_service_harness.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/whole_file.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::test;

namespace {

// One number of an update line in the JSON form (protocol/README.md), by JSON Pointer.
double json_number(const std::string& line, const std::string& pointer) {
    return JsonProbe(line).number(pointer);
}

std::vector<std::string> update_lines(const std::string& text) {
    std::vector<std::string> lines;
    std::istringstream in(text);
    std::string line;
    while (std::getline(in, line)) {
        if (!line.empty() && line.front() == '{') lines.push_back(line);
    }
    return lines;
}

std::string bin() { return liveprob_binary().string(); }

// Sends a feed file through `liveprob send` and waits for it to finish.
// Its exit code must be `expected` (1: some messages were never acknowledged).
void send_file(const std::filesystem::path& dir, const std::string& endpoint,
               const std::filesystem::path& feed, std::vector<std::string> extra = {},
               int expected = 0) {
    std::vector<std::string> args = {bin(), "send", "--to", endpoint, feed.string()};
    args.insert(args.end(), extra.begin(), extra.end());
    ChildProcess send(args, dir / "send.out", dir / "send.err");
    const auto code = send.wait(60s);
    REQUIRE(code.has_value());
    INFO(send.output() << read_whole_file(dir / "send.err"));
    REQUIRE(*code == expected);
}

// Starts serve with `extra` and expects it to refuse to start: a non-zero exit, and what it
// printed, for the reason.
std::string refused_start(const std::filesystem::path& dir, const std::string& name,
                          const std::vector<std::string>& extra) {
    std::vector<std::string> args = {bin(),        "serve",
                                     "--ingest",   "tcp://127.0.0.1:*",
                                     "--publish",  "tcp://127.0.0.1:*",
                                     "--snapshot", "tcp://127.0.0.1:*"};
    args.insert(args.end(), extra.begin(), extra.end());
    ChildProcess serve(args, dir / (name + ".out"), dir / (name + ".err"));
    const auto code = serve.wait(20s);
    REQUIRE(code.has_value());
    CHECK(*code != 0);
    return read_whole_file(dir / (name + ".err")) + serve.output();
}

protocol::SnapshotReplyContents snapshot(const ServeProcess& serve, std::uint64_t match_id) {
    zmq::context_t context(1);
    zmq::socket_t dealer(context, zmq::socket_type::dealer);
    dealer.set(zmq::sockopt::linger, 0);
    dealer.set(zmq::sockopt::rcvtimeo, 5000);
    dealer.connect(serve.snapshot());
    const auto request = protocol::encode_snapshot_request(match_id);
    dealer.send(zmq::buffer(request));
    zmq::message_t reply;
    REQUIRE(dealer.recv(reply));
    auto decoded = protocol::decode_snapshot_reply({reply.data<std::uint8_t>(), reply.size()});
    REQUIRE(decoded.ok());
    return *decoded.value;
}

// Polls the snapshot until the match has folded `events` messages (serve works asynchronously).
protocol::DecodedUpdate wait_for_events(const ServeProcess& serve, std::uint64_t match_id,
                                        std::uint64_t events) {
    const auto deadline = std::chrono::steady_clock::now() + 20s;
    for (;;) {
        const auto reply = snapshot(serve, match_id);
        if (reply.error.empty() && reply.updates.size() == 1 &&
            reply.updates[0].outputs.events_applied >= events) {
            return reply.updates[0];
        }
        if (std::chrono::steady_clock::now() > deadline)
            FAIL("match " << match_id << " never reached " << events);
        std::this_thread::sleep_for(50ms);
    }
}

}  // namespace

TEST_CASE("a whole match sent through send and serve reaches tap exactly as the engine computes it",
          "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-whole-match");
    const auto feed = invented_match(101);
    write_frames(dir / "feed.lpf", feed);
    const auto expected = engine_outputs(feed);
    REQUIRE(expected.size() > 20);

    ServeProcess serve(dir, "serve", {"--tick-ms", "600000", "--counters-ms", "100"});
    ChildProcess tap(
        {bin(), "tap", "--from", serve.publish(), "--match", "101", "--format", "jsonl",
         "--events-only", "--counters", "--count", std::to_string(expected.size())},
        dir / "tap.out", dir / "tap.err");
    // Counters reaching tap prove its subscription is live before anything is sent.
    const auto ready_by = std::chrono::steady_clock::now() + 20s;
    while (tap.output().find("counters:") == std::string::npos) {
        REQUIRE(std::chrono::steady_clock::now() < ready_by);
        std::this_thread::sleep_for(20ms);
    }
    send_file(dir, serve.ingest(), dir / "feed.lpf");
    const auto code = tap.wait(30s);
    REQUIRE(code.has_value());
    CHECK(*code == 0);

    const auto lines = update_lines(tap.output());
    REQUIRE(lines.size() == expected.size());
    for (std::size_t i = 0; i < lines.size(); ++i) {
        INFO("update " << i << ": " << lines[i]);
        const Outputs& want = expected[i].outputs;
        CHECK(json_number(lines[i], "/feed_seq") == static_cast<double>(expected[i].input_seq));
        CHECK(json_number(lines[i], "/update_seq") == static_cast<double>(i + 1));
        CHECK(json_number(lines[i], "/full_time/home") == want.p_home);
        CHECK(json_number(lines[i], "/full_time/draw") == want.p_draw);
        CHECK(json_number(lines[i], "/full_time/away") == want.p_away);
        CHECK(json_number(lines[i], "/final_goals_expected/home") == want.expected_home_goals);
        CHECK(json_number(lines[i], "/next_goal/none") == want.next_goal_none);
        CHECK(json_number(lines[i], "/score/home") == want.home_goals);
        CHECK(json_number(lines[i], "/score/away") == want.away_goals);
        CHECK(json_number(lines[i], "/clock_ms") == want.clock.clock_ms);
        // The match's names travel with every update, from the setup.
        const JsonProbe line(lines[i]);
        CHECK(line.text("/match/home") == "Harrow Fen");
        CHECK(line.text("/match/away") == "Lumen Quay");
        CHECK(line.text("/match/competition") == "Estuary Shield");
        CHECK(line.text("/kind") == "update");
    }
    // The last update is the result: the final score with certainty.
    CHECK(json_number(lines.back(), "/score/home") == 2);
    CHECK(json_number(lines.back(), "/score/away") == 1);
}

TEST_CASE("tap stopped by SIGINT or SIGTERM exits 0 and prints its latency summary",
          "[integration][serve][sockets][tap]") {
    const auto dir = scratch_dir("tap-interrupted");
    const auto feed = invented_match(303);
    write_frames(dir / "feed.lpf", feed);
    const auto expected = engine_outputs(feed);

    ServeProcess serve(dir, "serve", {"--tick-ms", "600000", "--counters-ms", "100"});
    const auto start_tap = [&](const std::string& name) {
        return std::make_unique<ChildProcess>(
            std::vector<std::string>{bin(), "tap", "--from", serve.publish(), "--match", "303",
                                     "--format", "jsonl", "--events-only", "--counters",
                                     "--latency"},
            dir / (name + ".out"), dir / (name + ".err"));
    };
    auto by_int = start_tap("tap-int");
    auto by_term = start_tap("tap-term");
    const auto ready_by = std::chrono::steady_clock::now() + 20s;
    for (auto* tap : {by_int.get(), by_term.get()}) {
        while (tap->output().find("counters:") == std::string::npos) {
            REQUIRE(std::chrono::steady_clock::now() < ready_by);
            std::this_thread::sleep_for(20ms);
        }
    }
    send_file(dir, serve.ingest(), dir / "feed.lpf");
    for (auto* tap : {by_int.get(), by_term.get()}) {
        while (update_lines(tap->output()).size() < expected.size()) {
            REQUIRE(std::chrono::steady_clock::now() < ready_by + 20s);
            std::this_thread::sleep_for(20ms);
        }
    }
    // Both wait inside a receive when the signal comes (nothing more is sent).
    by_int->signal(SIGINT);
    by_term->signal(SIGTERM);
    const std::string summary =
        "latency receive-to-tap (us, n=" + std::to_string(expected.size()) + ")";
    for (const auto& [tap, name] :
         {std::pair{by_int.get(), "tap-int"}, {by_term.get(), "tap-term"}}) {
        INFO(name);
        CHECK(tap->wait(20s) == std::optional<int>(0));
        const auto err = read_whole_file(dir / (std::string(name) + ".err"));
        INFO(err);
        CHECK(err.find(summary) != std::string::npos);
        CHECK(err.find("receive-to-publish") != std::string::npos);
        CHECK(err.find("error") == std::string::npos);
    }
}

TEST_CASE("a subscriber that joins late gets the current state from the snapshot socket",
          "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-late-joiner");
    const auto feed = invented_match(202);
    const std::vector<InboundMessage> first_half(feed.begin(), feed.begin() + 14);
    write_frames(dir / "first.lpf", first_half);
    const auto expected = engine_outputs(first_half);

    ServeProcess serve(dir, "serve", {"--tick-ms", "600000"});
    send_file(dir, serve.ingest(), dir / "first.lpf");
    wait_for_events(serve, 202, expected.back().outputs.events_applied);

    // The late joiner: `tap --snapshot` prints the state it has missed, then exits.
    ChildProcess tap({bin(), "tap", "--from", serve.publish(), "--snapshot", serve.snapshot(),
                      "--match", "202", "--format", "jsonl", "--snapshot-only"},
                     dir / "tap.out", dir / "tap.err");
    REQUIRE(tap.wait(20s) == std::optional<int>(0));
    const auto lines = update_lines(tap.output());
    REQUIRE(lines.size() == 1);
    CHECK(json_number(lines[0], "/feed_seq") == static_cast<double>(expected.back().input_seq));
    CHECK(json_number(lines[0], "/full_time/home") == expected.back().outputs.p_home);
    CHECK(json_number(lines[0], "/full_time/away") == expected.back().outputs.p_away);
    CHECK(json_number(lines[0], "/score/home") == 1);
    CHECK(JsonProbe(lines[0]).text("/match/home") == "Harrow Fen");  // snapshots name it too
    CHECK(JsonProbe(lines[0]).text("/source") == "snapshot");

    // An unknown match gets an error, not a hang.
    const auto none = snapshot(serve, 999);
    CHECK(none.updates.empty());
    CHECK(none.error.find("999") != std::string::npos);
}

TEST_CASE("CURVE: goals from an unlisted feed key are never applied, a listed key's are",
          "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-curve");
    for (const char* name : {"server", "listed", "unlisted"}) {
        ChildProcess keys({bin(), "keys", "--dir", dir.string(), "--name", name}, dir / "keys.out",
                          dir / "keys.err");
        REQUIRE(keys.wait(10s) == std::optional<int>(0));
    }
    {
        std::ofstream allow(dir / "allowed.keys");
        allow << "# feeds allowed in\n" << read_whole_file(dir / "listed.public");
    }
    ServeProcess serve(
        dir, "serve",
        {"--tick-ms", "600000", "--counters-ms", "100", "--server-secret-key",
         (dir / "server.secret").string(), "--allowed-feed-keys", (dir / "allowed.keys").string()});
    const auto listed_feed = invented_match(301);
    const auto unlisted_feed = invented_match(302);
    write_frames(dir / "listed.lpf", listed_feed);
    write_frames(dir / "unlisted.lpf", unlisted_feed);
    const std::string server_key = (dir / "server.public").string();
    send_file(dir, serve.ingest(), dir / "listed.lpf",
              {"--server-key", server_key, "--client-key", (dir / "listed.secret").string()});
    // The unlisted feed's handshake is refused: its messages never leave its own window, and
    // send says so.
    send_file(dir, serve.ingest(), dir / "unlisted.lpf",
              {"--server-key", server_key, "--client-key", (dir / "unlisted.secret").string(),
               "--give-up-ms", "1500"},
              1);
    const auto listed =
        wait_for_events(serve, 301, engine_outputs(listed_feed).back().outputs.events_applied);
    CHECK(listed.outputs.home_goals == 2);
    CHECK(listed.outputs.away_goals == 1);
    const auto refused = snapshot(serve, 302);
    CHECK(refused.updates.empty());

    zmq::context_t context(1);
    TestSubscriber sub(context, serve.publish(), "match.");
    const auto counters = sub.next_counters(10s);
    REQUIRE(counters.has_value());
    CHECK(counter(*counters, "curve.refused") >= 1);
    CHECK(counter(*counters, "curve.accepted") >= 1);
    CHECK(counter(*counters, "matches") == 1);
}

TEST_CASE("kill -9 mid-match and restart: the next outputs equal an uninterrupted run's",
          "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-crash");
    const auto feed = invented_match(404);
    const std::size_t split = 20;
    const std::vector<InboundMessage> before(feed.begin(), feed.begin() + split);
    const std::vector<InboundMessage> after(feed.begin() + split, feed.end());
    write_frames(dir / "before.lpf", before);
    write_frames(dir / "after.lpf", after);
    const auto uninterrupted = engine_outputs(feed);
    const auto before_outputs = engine_outputs(before);
    const std::vector<std::string> journal = {"--journal",      (dir / "journal").string(),
                                              "--journal-sync", "every_message",
                                              "--tick-ms",      "600000"};

    std::map<std::string, std::string> endpoints;
    {
        ServeProcess first(dir, "first", journal);
        endpoints = first.endpoints();
        send_file(dir, first.ingest(), dir / "before.lpf");
        wait_for_events(first, 404, before_outputs.back().outputs.events_applied);
        first.process().signal(SIGKILL);
        REQUIRE(first.process().wait(10s) == std::optional<int>(-SIGKILL));
    }
    // A torn record at the end, as a crash in the middle of a write leaves it: the record
    // marker, then a length promising 200 bytes, and two of them.
    {
        std::ofstream torn(dir / "journal" / protocol::journal_segment_name(1),
                           std::ios::binary | std::ios::app);
        const char partial[] = {
            '\xF5', '\x4A', '\x52', '\x0C', static_cast<char>(200), 0, 0, 0, 1, 2, 3, 4, 'L', 'P'};
        torn.write(partial, sizeof partial);
    }
    // Restart on the same endpoints, so the subscriber below reconnects by itself.
    ServeProcess second(dir, "second", journal, endpoints);
    CHECK(second.log().find("torn tail of 14 bytes") != std::string::npos);
    const auto restored = snapshot(second, 404);
    REQUIRE(restored.updates.size() == 1);
    CHECK(same_outputs(restored.updates[0].outputs, before_outputs.back().outputs));
    CHECK(restored.updates[0].meta.input_seq == before_outputs.back().input_seq);
    // The output sequence goes on rising: subscribers skip updates not newer than the last.
    CHECK(restored.updates[0].meta.output_seq > before_outputs.size());

    zmq::context_t context(1);
    TestSubscriber sub(context, second.publish(), transport::match_topic_string(404));
    REQUIRE(sub.next_counters(20s).has_value());
    send_file(dir, second.ingest(), dir / "after.lpf");
    const std::size_t remaining = uninterrupted.size() - before_outputs.size();
    const auto next = sub.updates(remaining, 20s);
    REQUIRE(next.size() == remaining);
    for (std::size_t i = 0; i < remaining; ++i) {
        const auto& want = uninterrupted[before_outputs.size() + i];
        INFO("update after restart " << i);
        CHECK(next[i].meta.input_seq == want.input_seq);
        CHECK(same_outputs(next[i].outputs, want.outputs));
    }
}

TEST_CASE(
    "a damaged journal record: serve skips it, replays every record after it, and "
    "refuses a second serve and a file that is no journal",
    "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-damaged-journal");
    const auto first_match = invented_match(501), second_match = invented_match(502);
    const std::vector<InboundMessage> part_a(first_match.begin(), first_match.begin() + 20);
    const std::vector<InboundMessage> part_b(second_match.begin(), second_match.begin() + 20);
    write_frames(dir / "a.lpf", part_a);
    write_frames(dir / "b.lpf", part_b);
    const std::vector<std::string> journal = {"--journal",      (dir / "journal").string(),
                                              "--journal-sync", "every_message",
                                              "--tick-ms",      "600000",
                                              "--counters-ms",  "100"};
    {
        ServeProcess first(dir, "first", journal);
        send_file(dir, first.ingest(), dir / "a.lpf");
        send_file(dir, first.ingest(), dir / "b.lpf");
        wait_for_events(first, 501, engine_outputs(part_a).back().outputs.events_applied);
        wait_for_events(first, 502, engine_outputs(part_b).back().outputs.events_applied);
        first.process().signal(SIGKILL);
        REQUIRE(first.process().wait(10s).has_value());
    }
    // Record 10 (match 501's red card) gets a damaged length field, mid-file.
    const auto segment = dir / "journal" / protocol::journal_segment_name(1);
    auto bytes = protocol::read_whole_file_bytes(segment);
    std::vector<std::size_t> offsets;
    {
        protocol::JournalRecordReader reader(bytes);
        while (const auto r = reader.next()) offsets.push_back(r->offset);
    }
    REQUIRE(offsets.size() == part_a.size() + part_b.size());
    bytes[offsets[10] + 5] ^= 0x40;  // the length grows by 16 KiB, past the end of the file
    protocol::write_file_atomically(segment, bytes);

    ServeProcess second(dir, "second", journal);
    CHECK(second.log().find("1 damaged record(s)") != std::string::npos);
    CHECK(second.log().find("skipped (length past the end)") != std::string::npos);
    // The state equals a clean run's on the same messages without the damaged one.
    std::vector<InboundMessage> a_without = part_a;
    a_without.erase(a_without.begin() + 10);
    const auto restored_a = snapshot(second, 501);
    REQUIRE(restored_a.updates.size() == 1);
    CHECK(same_outputs(restored_a.updates[0].outputs, engine_outputs(a_without).back().outputs));
    const auto restored_b = snapshot(second, 502);
    REQUIRE(restored_b.updates.size() == 1);
    CHECK(same_outputs(restored_b.updates[0].outputs, engine_outputs(part_b).back().outputs));
    zmq::context_t context(1);
    TestSubscriber sub(context, second.publish(), "service.");
    const auto counters = sub.next_counters(20s);
    REQUIRE(counters.has_value());
    CHECK(counter(*counters, "journal.replayed") == offsets.size() - 1);
    CHECK(counter(*counters, "journal.damaged_records") == 1);
    CHECK(counter(*counters, "journal.torn_bytes") == 0);
    CHECK(protocol::read_whole_file_bytes(segment) == bytes);  // the damage kept, nothing cut

    // A second serve on the same journal refuses to start, naming the holder.
    CHECK(refused_start(dir, "third", {"--journal", (dir / "journal").string()})
              .find("in use by another process") != std::string::npos);
    // A JSON-lines feed passed as the journal by mistake: refused, byte for byte untouched.
    const std::string feed = protocol::to_json_line(part_a[0]) + "\n";
    protocol::write_file_atomically(dir / "feed.jsonl", feed);
    CHECK(refused_start(dir, "wrong", {"--journal", (dir / "feed.jsonl").string()})
              .find("not a journal folder") != std::string::npos);
    CHECK(read_whole_file(dir / "feed.jsonl") == feed);
}

TEST_CASE("garbage frames are counted and dropped and the service keeps serving",
          "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-garbage");
    ServeProcess serve(dir, "serve", {"--tick-ms", "600000", "--counters-ms", "100"});
    zmq::context_t context(1);
    TestSubscriber sub(context, serve.publish(), "match.");
    REQUIRE(sub.next_counters(20s).has_value());

    zmq::socket_t push(context, zmq::socket_type::dealer);
    push.set(zmq::sockopt::linger, 2000);
    push.connect(serve.ingest());
    std::mt19937 random(20261201);  // fixed seed: the same garbage every run
    std::vector<std::uint8_t> noise(300);
    for (int i = 0; i < 20; ++i) {
        for (auto& b : noise) b = static_cast<std::uint8_t>(random());
        push.send(zmq::buffer(noise));
    }
    const auto valid = protocol::encode_feed_message(invented_match(505).front());
    push.send(zmq::buffer(valid.data(), valid.size() / 2));  // truncated
    push.send(zmq::buffer(valid.data(), 3));                 // too small
    std::vector<std::uint8_t> wrong_id = valid;
    for (std::size_t k = 4; k < 8; ++k) wrong_id.at(k) = 'X';  // the file identifier's place
    push.send(zmq::buffer(wrong_id));
    std::vector<std::uint8_t> oversize(protocol::kMaxFeedMessageBytes + 100, 0);
    std::copy(valid.begin(), valid.end(), oversize.begin());
    push.send(zmq::buffer(oversize));
    // Another kind of buffer entirely: an update sent to the ingest socket.
    protocol::UpdateEncoder update_encoder;
    const auto update = update_encoder.encode({}, Outputs{});
    push.send(zmq::buffer(update.data(), update.size()));
    // Three frames: neither a message nor a ticket and a message.
    push.send(zmq::buffer(valid), zmq::send_flags::sndmore);
    push.send(zmq::buffer(valid), zmq::send_flags::sndmore);
    push.send(zmq::buffer(valid));
    // Two frames whose first is no delivery ticket.
    push.send(zmq::buffer(valid), zmq::send_flags::sndmore);
    push.send(zmq::buffer(valid));

    // Still serving: a valid match goes through.
    const auto feed = invented_match(505);
    for (const auto& m : feed) push.send(zmq::buffer(protocol::encode_feed_message(m)));
    const auto expected = engine_outputs(feed);
    const auto got = sub.updates(expected.size(), 20s);
    REQUIRE(got.size() == expected.size());
    CHECK(same_outputs(got.back().outputs, expected.back().outputs));

    std::optional<protocol::CounterSet> counters;
    const auto deadline = std::chrono::steady_clock::now() + 10s;
    do {
        counters = sub.next_counters(5s);
        REQUIRE(counters.has_value());
    } while (counter(*counters, "engine.accepted") < expected.size() - 1 &&
             std::chrono::steady_clock::now() < deadline);
    CHECK(counter(*counters, "ingest.rejected") >= 25);
    CHECK(counter(*counters, "ingest.rejected.oversize") == 1);
    CHECK(counter(*counters, "ingest.rejected.too_small") >= 1);
    CHECK(counter(*counters, "ingest.rejected.wrong_identifier") >= 2);
    CHECK(counter(*counters, "ingest.multipart_dropped") == 1);
    CHECK(counter(*counters, "ingest.bad_ticket") == 1);
    CHECK(serve.process().wait(0ms) == std::nullopt);  // still running
}

TEST_CASE("a subscriber that never reads does not hold up others, and serve's memory stays bounded",
          "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-stalled");
#if defined(LIVEPROB_TEST_ASAN)
    // The address sanitizer holds freed memory back (its quarantine, 256 MiB by default) to catch
    // use after free, so serve's resident memory would grow with every update it frees. This
    // test measures what serve itself keeps: the serve it starts runs without the quarantine.
    const char* inherited = std::getenv("ASAN_OPTIONS");
    const std::string options = std::string(inherited ? inherited : "") + ":quarantine_size_mb=0";
    ::setenv("ASAN_OPTIONS", options.c_str(), 1);
#endif
    // Ticks every 10 ms over 50 live matches: about 5,000 updates a second with no new state,
    // so serve's memory can only grow through what it queues for subscribers.
    ServeProcess serve(dir, "serve",
                       {"--tick-ms", "10", "--counters-ms", "200", "--publish-hwm", "500"});
    zmq::context_t context(1);
    zmq::socket_t stalled(context, zmq::socket_type::sub);  // never reads
    stalled.set(zmq::sockopt::rcvhwm, 10);
    stalled.set(zmq::sockopt::rcvbuf, 4096);
    stalled.set(zmq::sockopt::subscribe, "");
    stalled.connect(serve.publish());
    TestSubscriber reader(context, serve.publish(), "match.", 100000);
    REQUIRE(reader.next_counters(20s).has_value());

    zmq::socket_t push(context, zmq::socket_type::dealer);
    push.set(zmq::sockopt::linger, 5000);
    push.connect(serve.ingest());
    constexpr std::uint64_t kMatches = 50;
    for (std::uint64_t id = 1; id <= kMatches; ++id) {
        const auto feed = invented_match(id);
        for (std::size_t i = 0; i < 10; ++i)
            push.send(zmq::buffer(protocol::encode_feed_message(feed[i])));
    }
    const auto rss_kib = [&] {
        return static_cast<long>(harness::memory_kib(serve.process().pid()));
    };
    // Warm up (every match created, queues to the stalled subscriber full), then measure.
    REQUIRE(reader.updates(2000, 30s, false).size() == 2000);
    const long rss_before = rss_kib();
    const auto received = reader.updates(15000, 60s, false);
    const long rss_after = rss_kib();

    INFO("RSS " << rss_before << " -> " << rss_after << " KiB over " << received.size()
                << " updates");
    // The reading subscriber keeps receiving while the stalled one's queue is full.
    REQUIRE(received.size() == 15000);
    // Memory: bounded by the high-water mark, far below the updates the stalled one never read.
    CHECK(rss_after - rss_before < 8 * 1024);
    CHECK(serve.process().wait(0ms) == std::nullopt);
}

TEST_CASE(
    "disk full for the journal: messages are counted and not applied, and serve keeps serving",
    "[integration][serve][sockets]") {
    // /dev/full accepts the open and fails every write with ENOSPC, as a full disk does.
    const auto dir = scratch_dir("serve-disk-full");
    ServeProcess serve(dir, "serve",
                       {"--journal", "/dev/full", "--journal-sync", "every_message", "--tick-ms",
                        "600000", "--counters-ms", "100"});
    zmq::context_t context(1);
    TestSubscriber sub(context, serve.publish(), "match.");
    REQUIRE(sub.next_counters(20s).has_value());

    zmq::socket_t push(context, zmq::socket_type::dealer);
    push.set(zmq::sockopt::linger, 2000);
    push.connect(serve.ingest());
    const auto feed = invented_match(606);
    for (const auto& m : feed) push.send(zmq::buffer(protocol::encode_feed_message(m)));

    std::optional<protocol::CounterSet> counters;
    const auto deadline = std::chrono::steady_clock::now() + 20s;
    do {
        counters = sub.next_counters(5s);
        REQUIRE(counters.has_value());
    } while (counter(*counters, "journal.write_failed") < feed.size() &&
             std::chrono::steady_clock::now() < deadline);
    CHECK(counter(*counters, "journal.write_failed") == feed.size());
    CHECK(counter(*counters, "journal.frames") == 0);
    CHECK(counter(*counters, "engine.accepted") ==
          0);                              // nothing applied that a restart could not rebuild
    CHECK(sub.updates(1, 500ms).empty());  // so nothing was published for the match
    CHECK(serve.process().wait(0ms) == std::nullopt);  // still running
    CHECK(serve.log().find("No space left on device") != std::string::npos);
}

TEST_CASE(
    "serve refuses to start on a parameter file the engine would refuse and on an unknown "
    "log level, saying why",
    "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-refuses");
    protocol::write_file_atomically(
        dir / "params.json",
        std::string(R"({"kind":"liveprob-model-params","version":1,"quadrature_nodes":20})"));
    CHECK(refused_start(dir, "params", {"--params", (dir / "params.json").string()})
              .find("quadrature_nodes': must be 1..16, got 20") != std::string::npos);
    CHECK(refused_start(dir, "log", {"--log-level", "loud"})
              .find("must be one of trace, debug, info, warn, error, off") != std::string::npos);
}

namespace {
// The match ids of every record in a journal folder's segments.
std::map<std::uint64_t, int> records_per_match(const std::filesystem::path& folder) {
    std::map<std::uint64_t, int> ids;
    for (const auto& segment : protocol::list_journal_segments(folder)) {
        const auto bytes = protocol::read_whole_file_bytes(segment);
        if (bytes.empty()) continue;
        protocol::JournalRecordReader reader(bytes);
        while (const auto record = reader.next()) {
            const auto decoded = protocol::decode_feed_message(record->payload);
            REQUIRE(decoded.message);
            ++ids[decoded.message->header.match_id];
        }
    }
    return ids;
}
}  // namespace

TEST_CASE(
    "a retired match is answered from the journal folder, compacted out of the segments, and "
    "answered the same after a restart",
    "[integration][serve][sockets]") {
    const auto dir = scratch_dir("serve-retired-answer");
    const auto done = invented_match(303);
    auto playing = invented_match(304);
    playing.resize(7);  // kick-off, four clock syncs and the first goal: still in play
    std::vector<InboundMessage> both = done;
    both.insert(both.end(), playing.begin(), playing.end());
    write_frames(dir / "feed.lpf", both);
    const auto done_final = engine_outputs(done).back();
    const auto playing_now = engine_outputs(playing).back();
    const std::vector<std::string> flags = {"--journal",
                                            (dir / "journal").string(),
                                            "--retention-s",
                                            "1",
                                            "--journal-compact-s",
                                            "1",
                                            "--tick-ms",
                                            "100",
                                            "--journal-segment-kib",
                                            "4"};
    const auto check_answers = [&](const ServeProcess& serve) {
        const auto retired = snapshot(serve, 303);
        REQUIRE(retired.updates.size() == 1);
        CHECK(retired.error.empty());
        CHECK(retired.updates[0].outputs.status == core::MatchStatus::finished);
        CHECK(same_outputs(retired.updates[0].outputs, done_final.outputs));
        CHECK(retired.updates[0].meta.input_seq == done_final.input_seq);
        CHECK(retired.updates[0].details ==
              protocol::details_of(std::get<MatchSetup>(done[0].body)));
        CHECK(retired.updates[0].details.known);  // a retired match still names its teams
        const auto live = snapshot(serve, 304);
        REQUIRE(live.updates.size() == 1);
        CHECK(live.updates[0].meta.input_seq == playing_now.input_seq);
        CHECK(live.updates[0].outputs.home_goals == playing_now.outputs.home_goals);
    };
    {
        ServeProcess serve(dir, "first", flags);
        send_file(dir, serve.ingest(), dir / "feed.lpf");
        const auto deadline = std::chrono::steady_clock::now() + 30s;
        while (serve.log().find("journal compacted") == std::string::npos) {
            REQUIRE(std::chrono::steady_clock::now() < deadline);
            std::this_thread::sleep_for(50ms);
        }
        check_answers(serve);
        serve.process().signal(SIGTERM);
        REQUIRE(serve.process().wait(20s) == std::optional<int>(0));
    }
    // The finished match's records are gone from the segments; the live one's all stay.
    const auto held = records_per_match(dir / "journal");
    CHECK(held.count(303) == 0);
    CHECK(held.at(304) == static_cast<int>(playing.size()));
    CHECK(std::filesystem::exists(dir / "journal" / "final-states.lpj"));

    ServeProcess restarted(dir, "second", flags);
    check_answers(restarted);
    CHECK(snapshot(restarted, 305).error.find("unknown match 305") != std::string::npos);
}
