// Acknowledged ingest with real processes: `send` bursts ~30,000 messages into `serve`, serve is
// killed (SIGKILL) or stopped (SIGTERM) part-way, and every message send reports acknowledged
// must be in the journal and applied by a restarted serve; send must say how many were not.
// Also: send exits non-zero when nobody listens, or when its CURVE key is not allowed.
// No timing assertions: the deadlines below only bound a hung run.
#include <catch2/catch.hpp>

#include <csignal>
#include <regex>
#include <set>

#include "live_service_harness.hpp"
#include "liveprob/clients/snapshot_client.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/whole_file.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

constexpr std::uint64_t kMatches = 1035;  // 29 messages each: 30,015 in the burst

// Every invented match without its final whistle, so each stays live and one snapshot request
// for every live match shows what a serve has applied.
std::vector<core::InboundMessage> burst_feed() {
    std::vector<core::InboundMessage> feed;
    for (std::uint64_t id = 1; id <= kMatches; ++id) {
        auto match = invented_match(10'000 + id);
        match.pop_back();
        feed.insert(feed.end(), match.begin(), match.end());
    }
    return feed;
}

// Every record in the journal folder (read only; the folder may still be locked).
std::multiset<std::vector<std::uint8_t>> journal_records(const std::filesystem::path& folder) {
    std::multiset<std::vector<std::uint8_t>> out;
    for (const auto& segment : protocol::list_journal_segments(folder)) {
        const auto bytes = protocol::read_whole_file_bytes(segment, "segment");
        if (bytes.empty()) continue;
        protocol::JournalRecordReader reader(bytes);
        while (const auto r = reader.next()) out.emplace(r->payload.begin(), r->payload.end());
    }
    return out;
}

std::uint64_t journal_bytes(const std::filesystem::path& folder) {
    std::uint64_t total = 0;
    std::error_code ec;
    for (const auto& segment : protocol::list_journal_segments(folder))
        total += std::filesystem::file_size(segment, ec);
    return total;
}

// "... A of M acknowledged ..." from send's summary line.
std::pair<std::uint64_t, std::uint64_t> acknowledged(const std::string& output) {
    std::smatch m;
    if (!std::regex_search(output, m, std::regex(R"((\d+) of (\d+) acknowledged)"))) return {0, 0};
    return {std::stoull(m[1]), std::stoull(m[2])};
}

// What a serve applied per match: events_applied of every live match, by id.
std::map<std::uint64_t, std::uint64_t> applied_per_match(const ServeProcess& serve) {
    zmq::context_t context(1);
    const auto reply = clients::request_snapshot(context, serve.snapshot(), 0, 30s);
    REQUIRE(reply.error.empty());
    std::map<std::uint64_t, std::uint64_t> out;
    for (const auto& u : reply.updates) out[u.meta.match_id] = u.outputs.events_applied;
    return out;
}

// Checks that the first `acked` messages of `feed` are in the journal and folded by `serve`.
void check_acknowledged_kept(const std::vector<core::InboundMessage>& feed, std::uint64_t acked,
                             const std::filesystem::path& journal, const ServeProcess& serve) {
    const auto records = journal_records(journal);
    std::uint64_t missing = 0;
    std::map<std::uint64_t, std::vector<core::InboundMessage>> per_match;
    for (std::uint64_t i = 0; i < acked; ++i) {
        if (!records.contains(protocol::encode_feed_message(feed[i]))) ++missing;
        per_match[feed[i].header.match_id].push_back(feed[i]);
    }
    CHECK(missing == 0);
    const auto applied = applied_per_match(serve);
    std::uint64_t short_matches = 0;
    for (const auto& [id, messages] : per_match) {
        const std::uint64_t expected = engine_outputs(messages).size() - 1;  // minus the setup's
        const auto it = applied.find(id);
        if (it == applied.end() || it->second < expected) ++short_matches;
    }
    CHECK(short_matches == 0);
}

// Waits until serve has journaled a good part of the burst (so the signal lands mid-burst).
void wait_for_journal(const std::filesystem::path& journal, std::uint64_t bytes,
                      ChildProcess& send) {
    const auto deadline = std::chrono::steady_clock::now() + 120s;
    while (journal_bytes(journal) < bytes) {
        REQUIRE(send.running());
        REQUIRE(std::chrono::steady_clock::now() < deadline);
        std::this_thread::sleep_for(5ms);
    }
}

}  // namespace

TEST_CASE(
    "serve killed or stopped mid-burst: what send reports acknowledged is journaled and "
    "applied after restart, and send reports the rest",
    "[integration][serve][send][ack][sockets]") {
    const int sig = GENERATE(SIGKILL, SIGTERM);
    const auto dir = scratch_dir(fmt::format("acked-burst-{}", sig));
    const auto feed = burst_feed();
    write_frames(dir / "burst.frames", feed);
    const auto journal = dir / "journal";
    const std::string ingest = fmt::format("ipc://{}", (dir / "ingest.sock").string());

    ServeProcess first(dir, "serve1", {"--journal", journal.string(), "--tick-ms", "600000"},
                       {{"ingest", ingest}});
    // Paced (not a timing check) so that the signal lands while the burst is on its way.
    ChildProcess send(
        {liveprob_binary().string(), "send", "--to", ingest, (dir / "burst.frames").string(),
         "--rate", "15000", "--resend-ms", "600000", "--give-up-ms", "4000"},
        dir / "send.out", dir / "send.err");
    wait_for_journal(journal, 400'000, send);  // about a tenth of the burst
    first.process().signal(sig);
    const auto served = first.process().wait(60s);
    REQUIRE(served.has_value());
    if (sig == SIGTERM) CHECK(*served == 0);  // a clean, drained stop

    const auto code = send.wait(120s);
    REQUIRE(code.has_value());
    const std::string said = send.output() + read_whole_file(dir / "send.err");
    INFO(said);
    CHECK(*code == 1);
    const auto [acked, total] = acknowledged(said);
    CHECK(total > 0);
    CHECK(acked < total);  // the stop came mid-burst
    CHECK(said.find(fmt::format("{} never acknowledged", total - acked)) != std::string::npos);
    if (sig == SIGTERM) {
        INFO(first.log());
        CHECK(first.log().find("SIGTERM: stopping") != std::string::npos);
    }

    ServeProcess second(dir, "serve2", {"--journal", journal.string(), "--tick-ms", "600000"},
                        {{"ingest", ingest}});
    check_acknowledged_kept(feed, acked, journal, second);
}

TEST_CASE(
    "send resends what a killed serve never acknowledged once serve is back, and then "
    "every message is acknowledged and applied",
    "[integration][serve][send][ack][sockets]") {
    const auto dir = scratch_dir("acked-resend");
    const auto feed = burst_feed();
    write_frames(dir / "burst.frames", feed);
    const auto journal = dir / "journal";
    const std::string ingest = fmt::format("ipc://{}", (dir / "ingest.sock").string());

    auto first = std::make_unique<ServeProcess>(
        dir, "serve1",
        std::vector<std::string>{"--journal", journal.string(), "--tick-ms", "600000"},
        std::map<std::string, std::string>{{"ingest", ingest}});
    ChildProcess send(
        {liveprob_binary().string(), "send", "--to", ingest, (dir / "burst.frames").string(),
         "--rate", "15000", "--resend-ms", "1000", "--give-up-ms", "120000"},
        dir / "send.out", dir / "send.err");
    wait_for_journal(journal, 400'000, send);
    first->process().signal(SIGKILL);
    REQUIRE(first->process().wait(60s).has_value());
    first.reset();

    ServeProcess second(dir, "serve2", {"--journal", journal.string(), "--tick-ms", "600000"},
                        {{"ingest", ingest}});
    const auto code = send.wait(300s);
    REQUIRE(code.has_value());
    const std::string said = send.output() + read_whole_file(dir / "send.err");
    INFO(said);
    CHECK(*code == 0);
    CHECK(said.find(fmt::format("{0} of {0} acknowledged", feed.size())) != std::string::npos);
    check_acknowledged_kept(feed, feed.size(), journal, second);
}

TEST_CASE("send exits non-zero, saying none was acknowledged, when nobody listens",
          "[integration][send][ack][sockets]") {
    const auto dir = scratch_dir("acked-no-listener");
    const auto feed = invented_match(77);
    write_frames(dir / "match.frames", feed);
    ChildProcess send({liveprob_binary().string(), "send", "--to",
                       fmt::format("ipc://{}", (dir / "nobody.sock").string()),
                       (dir / "match.frames").string(), "--give-up-ms", "1500"},
                      dir / "send.out", dir / "send.err");
    const auto code = send.wait(60s);
    REQUIRE(code.has_value());
    const std::string said = send.output() + read_whole_file(dir / "send.err");
    INFO(said);
    CHECK(*code == 1);
    // It stops reading at the first message it cannot hand over.
    CHECK(said.find("0 of 1 acknowledged") != std::string::npos);
    CHECK(said.find("gave up") != std::string::npos);
}

TEST_CASE(
    "send exits non-zero when its CURVE key is not on serve's allow-list or the server key "
    "is wrong",
    "[integration][send][ack][curve][sockets]") {
    const auto dir = scratch_dir("acked-curve");
    const std::string bin = liveprob_binary().string();
    std::filesystem::create_directories(dir / "keys");
    for (const char* name : {"server", "feed", "stranger", "impostor"}) {
        ChildProcess keys({bin, "keys", "--dir", (dir / "keys").string(), "--name", name},
                          dir / "keys.out");
        REQUIRE(keys.wait(30s) == 0);
    }
    std::filesystem::copy_file(dir / "keys" / "feed.public", dir / "allowed.txt");
    ServeProcess serve(
        dir, "serve",
        {"--server-secret-key", (dir / "keys" / "server.secret").string(), "--allowed-feed-keys",
         (dir / "allowed.txt").string(), "--tick-ms", "600000"});
    const auto feed = invented_match(88);
    write_frames(dir / "match.frames", feed);
    const auto run = [&](const std::string& server_key, const std::string& client_key) {
        ChildProcess send({bin, "send", "--to", serve.ingest(), (dir / "match.frames").string(),
                           "--server-key", (dir / "keys" / server_key).string(), "--client-key",
                           (dir / "keys" / client_key).string(), "--give-up-ms", "1500"},
                          dir / "send.out", dir / "send.err");
        const auto code = send.wait(60s);
        REQUIRE(code.has_value());
        return std::make_pair(*code, send.output() + read_whole_file(dir / "send.err"));
    };
    {
        const auto [code, said] = run("server.public", "stranger.secret");  // not allowed
        INFO(said);
        CHECK(code == 1);
        CHECK(said.find(" 0 of ") != std::string::npos);
        CHECK(said.find("gave up") != std::string::npos);
    }
    {
        const auto [code, said] = run("impostor.public", "feed.secret");  // wrong server key
        INFO(said);
        CHECK(code == 1);
        CHECK(said.find(" 0 of ") != std::string::npos);
        CHECK(said.find("gave up") != std::string::npos);
    }
    {
        const auto [code, said] = run("server.public", "feed.secret");  // the right pair
        INFO(said);
        CHECK(code == 0);
        CHECK(said.find(fmt::format("{0} of {0} acknowledged", feed.size())) != std::string::npos);
    }
}
