// `liveprob send` reads its feed as it arrives: from a pipe (`cat f | send -`, `/dev/stdin`), a
// FIFO written a few lines at a time, or a growing file with --follow. Real serve and send
// processes, real pipes and sockets: each test checks what serve folded, message by message.
#include <catch2/catch.hpp>

#include <sys/stat.h>

#include <csignal>

#include "live_service_harness.hpp"
#include "liveprob/clients/snapshot_client.hpp"
#include "liveprob/protocol/json_feed.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

std::string bin() { return liveprob_binary().string(); }

std::vector<std::string> json_lines(const std::vector<core::InboundMessage>& feed) {
    std::vector<std::string> lines;
    for (const auto& m : feed) lines.push_back(protocol::to_json_line(m));
    return lines;
}

void append(const std::filesystem::path& path, const std::vector<std::string>& lines,
            std::size_t from, std::size_t to) {
    std::ofstream out(path, std::ios::app);
    for (std::size_t i = from; i < to; ++i) out << lines[i] << '\n';
}

// How many messages serve has folded for the match (0 before its setup arrives).
std::uint64_t events_applied(const ServeProcess& serve, std::uint64_t match_id) {
    zmq::context_t context(1);
    const auto reply = clients::request_snapshot(context, serve.snapshot(), match_id, 5s);
    if (!reply.error.empty() || reply.updates.size() != 1) return 0;
    return reply.updates[0].outputs.events_applied;
}

void wait_until_applied(const ServeProcess& serve, std::uint64_t match_id, std::uint64_t events) {
    const auto deadline = std::chrono::steady_clock::now() + 20s;
    while (events_applied(serve, match_id) < events) {
        if (std::chrono::steady_clock::now() > deadline)
            FAIL("match " << match_id << " never reached " << events << " messages");
        std::this_thread::sleep_for(50ms);
    }
}

// The number of messages the engine folds for the first `count` messages of a feed.
std::uint64_t folded(const std::vector<core::InboundMessage>& feed, std::size_t count) {
    const std::vector<core::InboundMessage> head(feed.begin(),
                                                 feed.begin() + static_cast<std::ptrdiff_t>(count));
    return engine_outputs(head).size() - 1;  // the first output is the setup's
}

}  // namespace

TEST_CASE("send reads a pipe to its end: cat FILE | send - and send /dev/stdin deliver every line",
          "[integration][send][sockets]") {
    const auto dir = scratch_dir("send-pipe");
    ServeProcess serve(dir, "serve", {"--tick-ms", "600000"});
    for (const auto& [match_id, source] :
         std::vector<std::pair<std::uint64_t, std::string>>{{301, "-"}, {302, "/dev/stdin"}}) {
        const auto feed = invented_match(match_id);
        const auto file = dir / fmt::format("{}.jsonl", match_id);
        append(file, json_lines(feed), 0, feed.size());
        const std::string command = fmt::format("cat '{}' | '{}' send --to '{}' {}", file.string(),
                                                bin(), serve.ingest(), source);
        ChildProcess send({"/bin/sh", "-c", command}, dir / "send.out", dir / "send.err");
        const auto code = send.wait(30s);
        REQUIRE(code.has_value());
        INFO(send.output() << read_whole_file(dir / "send.err"));
        CHECK(*code == 0);
        CHECK(send.output().find(fmt::format("sent {} messages", feed.size())) !=
              std::string::npos);
        wait_until_applied(serve, match_id, folded(feed, feed.size()));
        CHECK(events_applied(serve, match_id) == folded(feed, feed.size()));
    }
}

TEST_CASE("send sends each line as it arrives through a FIFO, before the writer has finished",
          "[integration][send][sockets]") {
    const auto dir = scratch_dir("send-fifo");
    ServeProcess serve(dir, "serve", {"--tick-ms", "600000"});
    const auto feed = invented_match(303);
    const auto lines = json_lines(feed);
    const auto fifo = dir / "feed.fifo";
    std::filesystem::remove(fifo);
    REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
    ChildProcess send({bin(), "send", "--to", serve.ingest(), fifo.string()}, dir / "send.out",
                      dir / "send.err");
    {
        std::ofstream writer(fifo);  // opens once send has opened the other end
        const std::size_t half = lines.size() / 2;
        for (std::size_t i = 0; i < half; ++i) writer << lines[i] << '\n';
        writer.flush();
        // The first half reaches serve while the FIFO is still open: nothing waits for the end.
        wait_until_applied(serve, 303, folded(feed, half));
        CHECK(send.running());
        for (std::size_t i = half; i < lines.size(); ++i) writer << lines[i] << '\n';
    }
    const auto code = send.wait(30s);
    REQUIRE(code.has_value());
    CHECK(*code == 0);
    wait_until_applied(serve, 303, folded(feed, feed.size()));
    CHECK(send.output().find(fmt::format("sent {} messages", feed.size())) != std::string::npos);
}

TEST_CASE("send --follow sends what is appended to a growing file and ends cleanly on SIGTERM",
          "[integration][send][sockets]") {
    const auto dir = scratch_dir("send-follow");
    ServeProcess serve(dir, "serve", {"--tick-ms", "600000"});
    const auto feed = invented_match(304);
    const auto lines = json_lines(feed);
    const auto file = dir / "growing.jsonl";
    const std::size_t third = lines.size() / 3;
    append(file, lines, 0, third);
    ChildProcess send({bin(), "send", "--to", serve.ingest(), "--follow", file.string()},
                      dir / "send.out", dir / "send.err");
    wait_until_applied(serve, 304, folded(feed, third));
    // Half a line, then its end: a line is sent only once it is whole.
    const std::string split = lines[third];
    {
        std::ofstream out(file, std::ios::app);
        out << split.substr(0, split.size() / 2) << std::flush;
    }
    std::this_thread::sleep_for(300ms);
    {
        std::ofstream out(file, std::ios::app);
        out << split.substr(split.size() / 2) << '\n';
    }
    append(file, lines, third + 1, lines.size());
    wait_until_applied(serve, 304, folded(feed, feed.size()));
    CHECK(send.running());  // following: the end of the file is not the end of the feed
    send.signal(SIGTERM);
    const auto code = send.wait(10s);
    REQUIRE(code.has_value());
    CHECK(*code == 0);
    CHECK(send.output().find(fmt::format("sent {} messages", feed.size())) != std::string::npos);
    CHECK(events_applied(serve, 304) == folded(feed, feed.size()));
}

TEST_CASE("a bad line in a stream is reported with its line and field, counted, and the rest sent",
          "[integration][send][sockets]") {
    const auto dir = scratch_dir("send-bad-line");
    ServeProcess serve(dir, "serve", {"--tick-ms", "600000"});
    const auto feed = invented_match(305);
    auto lines = json_lines(feed);
    lines.insert(lines.begin() + 3,
                 R"({"match": 305, "seq": 999, "time_us": 1, "period": )"
                 R"("first_half", "clock": "10:00", "type": "goal", "side": "hme"})");
    const auto file = dir / "bad.jsonl";
    append(file, lines, 0, lines.size());
    const std::string command =
        fmt::format("'{}' send --to '{}' - < '{}'", bin(), serve.ingest(), file.string());
    ChildProcess send({"/bin/sh", "-c", command}, dir / "send.out", dir / "send.err");
    const auto code = send.wait(30s);
    REQUIRE(code.has_value());
    CHECK(*code == 1);
    const std::string errors = read_whole_file(dir / "send.err");
    CHECK(errors.find("line 4: field 'side'") != std::string::npos);
    CHECK(send.output().find(fmt::format("sent {} messages", feed.size())) != std::string::npos);
    CHECK(send.output().find("1 refused") != std::string::npos);
    wait_until_applied(serve, 305, folded(feed, feed.size()));
}

TEST_CASE("a provider's feed piped through send --mapping reaches serve as the native feed does",
          "[integration][send][feed_mapping][sockets]") {
    const auto dir = scratch_dir("send-mapping");
    const auto mappings = source_dir() / "protocol" / "mappings";
    // The native sample, match by match, through the engine in this process.
    std::map<std::uint64_t, std::vector<core::InboundMessage>> native;
    {
        protocol::JsonFeedReader reader;
        std::istringstream in(read_whole_file(mappings / "native.sample.jsonl"));
        std::string line;
        std::size_t number = 0;
        while (std::getline(in, line)) {
            auto r = reader.read_line(line, ++number);
            REQUIRE(r.kind == protocol::JsonLineKind::message);
            native[r.message->header.match_id].push_back(std::move(*r.message));
        }
    }
    REQUIRE(native.size() == 5);
    for (const std::string provider : {"harbour", "meadow"}) {
        INFO("provider " << provider);
        ServeProcess serve(dir, "serve-" + provider, {"--tick-ms", "600000"});
        const std::string command =
            fmt::format("cat '{}' | '{}' send --to '{}' --mapping '{}' -",
                        (mappings / (provider + ".sample.jsonl")).string(), bin(), serve.ingest(),
                        (mappings / (provider + ".rules.json")).string());
        ChildProcess send({"/bin/sh", "-c", command}, dir / "send.out", dir / "send.err");
        const auto code = send.wait(30s);
        REQUIRE(code.has_value());
        INFO(send.output() << read_whole_file(dir / "send.err"));
        CHECK(*code == 0);
        CHECK(send.output().find("sent 190 messages") != std::string::npos);
        for (const auto& [match_id, feed] : native) {
            const auto expected = engine_outputs(feed);
            wait_until_applied(serve, match_id, expected.back().outputs.events_applied);
            zmq::context_t context(1);
            const auto reply = clients::request_snapshot(context, serve.snapshot(), match_id, 5s);
            REQUIRE(reply.updates.size() == 1);
            const core::Outputs& got = reply.updates[0].outputs;
            const core::Outputs& want = expected.back().outputs;
            CHECK(got.events_applied == want.events_applied);
            CHECK(got.home_goals == want.home_goals);
            CHECK(got.away_goals == want.away_goals);
            CHECK(got.p_home == want.p_home);
            CHECK(got.p_draw == want.p_draw);
            CHECK(got.p_away == want.p_away);
            CHECK(got.expected_home_goals == want.expected_home_goals);
        }
    }
}
