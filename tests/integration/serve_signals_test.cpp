// serve's signals with real processes: SIGHUP re-reads the configuration (a new log level and
// a new allow-list of feed keys apply; every match stays; serve keeps running), and SIGQUIT
// stops it like SIGTERM (drained, exit 0).
#include <catch2/catch.hpp>

#include <csignal>

#include "live_service_harness.hpp"
#include "liveprob/clients/snapshot_client.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

void write_text(const std::filesystem::path& path, const std::string& text) {
    std::ofstream(path) << text;
}

// Waits until serve's log holds `text` (serve logs as it handles the signal).
bool log_shows(const ServeProcess& serve, const std::string& text) {
    const auto deadline = std::chrono::steady_clock::now() + 30s;
    while (serve.log().find(text) == std::string::npos) {
        if (std::chrono::steady_clock::now() > deadline) return false;
        std::this_thread::sleep_for(20ms);
    }
    return true;
}

}  // namespace

TEST_CASE("SIGHUP re-reads the log level and the allow-list and keeps every match",
          "[integration][serve][signals][curve][sockets]") {
    const auto dir = scratch_dir("serve-sighup");
    const std::string bin = liveprob_binary().string();
    std::filesystem::create_directories(dir / "keys");
    for (const char* name : {"server", "feed", "late"}) {
        ChildProcess keys({bin, "keys", "--dir", (dir / "keys").string(), "--name", name},
                          dir / "keys.out");
        REQUIRE(keys.wait(30s) == 0);
    }
    const auto allowed = dir / "allowed.txt";
    std::filesystem::copy_file(dir / "keys" / "feed.public", allowed);
    const auto config = dir / "service.json";
    write_text(config, fmt::format(R"({{"log_level": "info", "curve_secret_key_file": "{}",
        "curve_allowed_keys_file": "{}", "tick_interval_ms": 600000}})",
                                   (dir / "keys" / "server.secret").string(), allowed.string()));
    // The harness passes --log-level info; the file is what changes here, so no flag for it.
    ServeProcess serve(dir, "serve", {"--config", config.string()});

    const auto send = [&](const std::string& key, std::uint64_t match_id) {
        write_frames(dir / "match.frames", invented_match(match_id));
        ChildProcess sender({bin, "send", "--to", serve.ingest(), (dir / "match.frames").string(),
                             "--server-key", (dir / "keys" / "server.public").string(),
                             "--client-key", (dir / "keys" / key).string(), "--give-up-ms", "1500"},
                            dir / "send.out", dir / "send.err");
        const auto code = sender.wait(60s);
        REQUIRE(code.has_value());
        return *code;
    };
    CHECK(send("feed.secret", 41) == 0);
    CHECK(send("late.secret", 42) == 1);  // not on the list yet

    std::ofstream(allowed, std::ios::app) << read_whole_file(dir / "keys" / "late.public");
    write_text(config, read_whole_file(config).replace(read_whole_file(config).find("\"info\""), 6,
                                                       "\"debug\""));
    serve.process().signal(SIGHUP);
    REQUIRE(log_shows(serve, "SIGHUP: reloaded"));
    CHECK(serve.log().find("SIGHUP: log level info -> debug") != std::string::npos);
    CHECK(serve.log().find("2 feed key(s)") != std::string::npos);
    CHECK(serve.process().running());

    CHECK(send("late.secret", 43) == 0);  // allowed now
    zmq::context_t context(1);
    for (const std::uint64_t id : {41u, 43u}) {
        const auto reply = clients::request_snapshot(context, serve.snapshot(), id, 10s);
        INFO("match " << id);
        CHECK(reply.error.empty());
        CHECK(reply.updates.size() == 1);
    }

    // A configuration that no longer reads changes nothing and stops nothing.
    write_text(config, "{ not json");
    serve.process().signal(SIGHUP);
    REQUIRE(log_shows(serve, "configuration not re-read"));
    CHECK(serve.process().running());

    serve.process().signal(SIGQUIT);
    const auto code = serve.process().wait(60s);
    REQUIRE(code.has_value());
    CHECK(*code == 0);
    CHECK(serve.log().find("SIGQUIT: stopping") != std::string::npos);
}
