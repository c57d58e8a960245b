// The service's configuration file.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <set>

#include "liveprob/files/journal.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "liveprob/service/service_config.hpp"
#include "test_env.hpp"

using namespace liveprob::files;
using namespace liveprob::service;

namespace {
std::string error_of(const std::string& json) {
    try {
        parse_service_config(json, "svc.json");
    } catch (const ConfigError& e) {
        return e.what();
    }
    return "";
}
}  // namespace

TEST_CASE("configuration: keys override defaults, endpoints default to loopback", "[unit][serve]") {
    const ServiceConfig defaults;
    CHECK(defaults.ingest_endpoint.rfind("tcp://127.0.0.1:", 0) == 0);
    CHECK(defaults.publish_endpoint.rfind("tcp://127.0.0.1:", 0) == 0);
    CHECK(defaults.snapshot_endpoint.rfind("tcp://127.0.0.1:", 0) == 0);
    CHECK(defaults.tick_interval_ms == 1000);

    const auto c = parse_service_config(
        R"({"tick_interval_ms": 250, "journal_path": "j.lpf", "journal_sync": "every_message",
            "publish_high_water_mark": 77, "curve_publish": false, "log_level": "warn"})",
        "svc.json");
    CHECK(c.tick_interval_ms == 250);
    CHECK(c.journal_path == "j.lpf");
    CHECK(c.journal_sync == JournalSync::every_message);
    CHECK(c.publish_high_water_mark == 77);
    CHECK(c.log_level == "warn");
}

TEST_CASE("configuration: every error names the key and the reason", "[unit][serve]") {
    CHECK(error_of(R"({"tick_interval_ms": 0})") ==
          "svc.json: tick_interval_ms: must be between 10 and 3600000, got 0");
    CHECK(error_of(R"({"tick_interval_ms": "fast"})") ==
          "svc.json: tick_interval_ms: must be a whole number");
    CHECK(error_of(R"({"tick_intervall_ms": 5})") == "svc.json: tick_intervall_ms: unknown key");
    CHECK(error_of(R"({"journal_sync": "sometimes"})")
              .find("svc.json: journal_sync: must be one of") == 0);
    CHECK(error_of(R"({"ingest_endpoint": "localhost"})")
              .find("svc.json: ingest_endpoint: must be an endpoint") == 0);
    CHECK(error_of(R"({"curve_publish": 1})") == "svc.json: curve_publish: must be true or false");
    CHECK(error_of("[1, 2]") == "svc.json: must hold one JSON object");
    CHECK(error_of("{").find("svc.json: not valid JSON") == 0);
    // A key or value holding a newline (JSON's "\n") is quoted escaped: the error stays one line.
    CHECK(error_of(R"({"publish_\nendpoint": "tcp://127.0.0.1:1"})") ==
          R"(svc.json: publish_\nendpoint: unknown key)");
    CHECK(error_of(R"({"journal_sync": "none\u0001"})").find(R"(got "none\x01")") !=
          std::string::npos);

    ServiceConfig c;
    c.curve_secret_key_file = "server.secret";
    CHECK_THROWS_WITH(validate_service_config(c), Catch::Contains("curve_allowed_keys_file"));
    ServiceConfig same;
    same.publish_endpoint = same.ingest_endpoint;
    CHECK_THROWS_AS(validate_service_config(same), ConfigError);
    // A silent match is marked stale before its ticks stop; either bound may be off.
    ServiceConfig silence;
    silence.feed_stale_s = 600;
    silence.feed_dormant_s = 600;
    CHECK_THROWS_WITH(validate_service_config(silence),
                      Catch::StartsWith("feed_dormant_s: must be more than feed_stale_s (600)"));
    silence.feed_dormant_s = 0;
    CHECK_NOTHROW(validate_service_config(silence));
}

TEST_CASE("configuration: cluster mode refuses what the feed stream and the leases replace",
          "[unit][serve]") {
    CHECK(error_of(R"({"cluster_servers": "tcp://127.0.0.1:4222"})")
              .find("svc.json: cluster_servers: must be nats://host:port URLs") == 0);
    CHECK(error_of(R"({"cluster_engine_name": "engine a"})") ==
          "svc.json: cluster_engine_name: letters, digits, - and _ only");
    ServiceConfig cluster;
    cluster.cluster_servers = "nats://127.0.0.1:4222,nats://127.0.0.1:4223";
    CHECK_NOTHROW(validate_service_config(cluster));
    ServiceConfig journaled = cluster;
    journaled.journal_path = "journal";
    CHECK_THROWS_WITH(validate_service_config(journaled), Catch::StartsWith("journal_path:"));
    ServiceConfig sharded = cluster;
    sharded.shard = "1/2";
    CHECK_THROWS_WITH(validate_service_config(sharded), Catch::StartsWith("shard:"));
}

TEST_CASE("configuration: flags and file values are checked alike, by the one key table",
          "[unit][serve]") {
    ServiceConfig c;
    const auto key = [](std::string_view name) {
        for (const ConfigKey& k : config_keys()) {
            if (k.name == name) return k;
        }
        FAIL("no key " << name);
        return ConfigKey{};
    };
    set_config_value(c, key("tick_interval_ms"), "250", "--tick-ms");
    CHECK(c.tick_interval_ms == 250);
    set_config_value(c, key("journal_sync"), "none", "--journal-sync");
    CHECK(c.journal_sync == liveprob::files::JournalSync::none);
    set_config_value(c, key("curve_publish"), "true", "--encrypt-publish");
    CHECK(c.curve_publish);
    CHECK_THROWS_WITH(set_config_value(c, key("tick_interval_ms"), "5", "--tick-ms"),
                      "--tick-ms: must be between 10 and 3600000, got 5");
    CHECK_THROWS_WITH(set_config_value(c, key("tick_interval_ms"), "5s", "--tick-ms"),
                      "--tick-ms: must be a whole number");
    CHECK_THROWS_WITH(set_config_value(c, key("shard"), "3/3", "--shard"),
                      Catch::StartsWith("--shard: "));
    CHECK_THROWS_WITH(
        set_config_value(c, key("log_level"), "loud", "--log-level"),
        R"(--log-level: must be one of trace, debug, info, warn, error, off, got "loud")");

    // Every key once: names and flags unique, every member of ServiceConfig reachable.
    std::set<std::string_view> names, flags;
    for (const ConfigKey& k : config_keys()) {
        CHECK(names.insert(k.name).second);
        CHECK(flags.insert(k.flag).second);
    }
    CHECK(names.size() == 33);
}

TEST_CASE("configuration: the README's table of keys is the key table", "[unit][serve]") {
    const std::string readme = liveprob::protocol::read_whole_file(liveprob::test::source_dir() /
                                                                   "adapters/service/README.md");
    const std::string begin =
        "<!-- config-keys:begin (made from config_keys(); a test checks it) -->\n";
    const std::string end = "<!-- config-keys:end -->";
    const auto from = readme.find(begin);
    const auto to = readme.find(end);
    REQUIRE(from != std::string::npos);
    REQUIRE(to != std::string::npos);
    const std::string table = readme.substr(from + begin.size(), to - from - begin.size());
    INFO("the table config_key_table_markdown() makes, to paste into adapters/service/README.md:\n"
         << config_key_table_markdown());
    CHECK(table == config_key_table_markdown());
}
