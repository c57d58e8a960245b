// Health and metrics of serve and the gateway over real sockets: both programs run as processes
// with a feed sent through them, their /metrics are scraped over HTTP and parsed strictly as
// the Prometheus text exposition format 0.0.4, and the counters must rise with the events.
// The format rules checked here are those of the format's published description
// (prometheus.io, "Exposition formats", text format 0.0.4).
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <cmath>
#include <limits>
#include <map>
#include <regex>
#include <set>
#include <sstream>
#include <string>

#include "feed_builder.hpp"
#include "live_stack.hpp"
#include "web_clients.hpp"

using namespace liveprob;
using namespace std::chrono_literals;

namespace {

test::HttpAnswer http_get(const std::string& host_port, const std::string& target) {
    return test::http_request(host_port, target);
}

// One scrape, parsed. Throws (failing the test) on any breach of the format's rules:
//  - lines end in '\n'; no empty lines; "# HELP name text" and "# TYPE name type" with a known
//    type, at most one of each per metric, TYPE before the metric's first sample;
//  - metric and label names match [a-zA-Z_:][a-zA-Z0-9_:]* / [a-zA-Z_][a-zA-Z0-9_]*;
//  - a sample is `name{labels} value` with a float value (Go's ParseFloat syntax, +Inf/-Inf/NaN);
//  - a metric's samples are together (one group per name);
//  - a histogram has _bucket samples with rising le ending at le="+Inf", non-decreasing
//    cumulative counts, and _sum and _count with _count equal to the +Inf bucket;
//  - a counter is not negative.
struct Exposition {
    std::map<std::string, std::string> types;  // metric family -> type
    std::map<std::string, double> samples;     // "name" or "name{le=\"0.1\"}" -> value

    double value(const std::string& key) const {
        const auto it = samples.find(key);
        if (it == samples.end()) throw std::runtime_error("no sample " + key);
        return it->second;
    }
};

double parse_value(const std::string& text) {
    if (text == "+Inf") return std::numeric_limits<double>::infinity();
    if (text == "-Inf") return -std::numeric_limits<double>::infinity();
    if (text == "NaN") return std::numeric_limits<double>::quiet_NaN();
    static const std::regex number(R"([-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?)");
    if (!std::regex_match(text, number)) throw std::runtime_error("not a value: '" + text + "'");
    return std::stod(text);
}

Exposition parse_exposition(const std::string& text) {
    static const std::regex help(R"(# HELP ([a-zA-Z_:][a-zA-Z0-9_:]*) (.*))");
    static const std::regex type(
        R"(# TYPE ([a-zA-Z_:][a-zA-Z0-9_:]*) (counter|gauge|histogram|summary|untyped))");
    static const std::regex sample(
        R"(([a-zA-Z_:][a-zA-Z0-9_:]*)(\{([a-zA-Z_][a-zA-Z0-9_]*="[^"\\]*"(,[a-zA-Z_][a-zA-Z0-9_]*="[^"\\]*")*)?\})? (\S+))");
    if (text.empty() || text.back() != '\n') throw std::runtime_error("does not end in a newline");
    Exposition out;
    std::set<std::string> helped, finished_families;
    std::string current_family;
    const auto family_of = [&](const std::string& name) {
        for (const char* suffix : {"_bucket", "_sum", "_count"}) {
            const std::string s = suffix;
            if (name.size() > s.size() && name.compare(name.size() - s.size(), s.size(), s) == 0) {
                const std::string base = name.substr(0, name.size() - s.size());
                if (out.types.count(base) && out.types.at(base) == "histogram") return base;
            }
        }
        return name;
    };
    std::istringstream lines(text);
    std::string line;
    int number = 0;
    while (std::getline(lines, line)) {
        ++number;
        INFO("line " << number << ": " << line);
        std::smatch m;
        if (line.empty()) throw std::runtime_error(fmt::format("empty line {}", number));
        if (std::regex_match(line, m, help)) {
            if (!helped.insert(m[1]).second)
                throw std::runtime_error("second HELP for " + m[1].str());
            continue;
        }
        if (std::regex_match(line, m, type)) {
            if (out.types.count(m[1])) throw std::runtime_error("second TYPE for " + m[1].str());
            out.types[m[1]] = m[2];
            continue;
        }
        if (line[0] == '#')
            throw std::runtime_error("a comment that is neither HELP nor TYPE: " + line);
        if (!std::regex_match(line, m, sample)) throw std::runtime_error("not a sample: " + line);
        const std::string name = m[1];
        const std::string family = family_of(name);
        if (!out.types.count(family)) throw std::runtime_error("sample before its TYPE: " + line);
        if (family != current_family) {
            if (finished_families.count(family))
                throw std::runtime_error("samples of " + family + " not together");
            if (!current_family.empty()) finished_families.insert(current_family);
            current_family = family;
        }
        const double value = parse_value(m[5]);
        if (out.types[family] == "counter" && !(value >= 0))
            throw std::runtime_error("counter < 0: " + line);
        const std::string key = name + (m[2].matched ? m[2].str() : "");
        if (!out.samples.emplace(key, value).second)
            throw std::runtime_error("repeated sample " + key);
    }
    // Histograms: buckets rising in le, cumulative counts non-decreasing, +Inf == _count.
    for (const auto& [family, kind] : out.types) {
        if (kind != "histogram") continue;
        INFO("histogram " << family);
        std::vector<std::pair<double, double>> buckets;  // (le, count)
        const std::string prefix = family + "_bucket{le=\"";
        for (const auto& [key, value] : out.samples) {
            if (key.rfind(prefix, 0) != 0) continue;
            const std::string le = key.substr(prefix.size(), key.size() - prefix.size() - 2);
            if (key.substr(key.size() - 2) != "\"}")
                throw std::runtime_error("label other than le: " + key);
            buckets.emplace_back(parse_value(le), value);
        }
        std::sort(buckets.begin(), buckets.end());
        if (buckets.empty() || !std::isinf(buckets.back().first))
            throw std::runtime_error(family + " has no le=\"+Inf\" bucket");
        for (std::size_t i = 1; i < buckets.size(); ++i) {
            if (buckets[i].second < buckets[i - 1].second)
                throw std::runtime_error(family + " buckets are not cumulative");
        }
        if (out.value(family + "_count") != buckets.back().second)
            throw std::runtime_error(family + "_count differs from the +Inf bucket");
        if (!(out.value(family + "_sum") >= 0)) throw std::runtime_error(family + "_sum < 0");
        // Samples are written in the order of rising le (the format asks for it).
        const auto first = text.find(prefix);
        const auto inf = text.find(prefix + "+Inf\"}");
        if (first == std::string::npos || inf < first ||
            text.find(prefix, inf + 1) != std::string::npos)
            throw std::runtime_error(family + ": +Inf is not the last bucket");
    }
    return out;
}

Exposition scrape(const std::string& host_port) {
    const test::HttpAnswer s = http_get(host_port, "/metrics");
    REQUIRE(s.status == 200);
    CHECK(s.content_type == "text/plain; version=0.0.4; charset=utf-8");
    return parse_exposition(s.body);
}

}  // namespace

TEST_CASE("the exposition parser refuses what breaks the format", "[integration][operations]") {
    const std::string good =
        "# HELP a_total things\n# TYPE a_total counter\na_total 3\n"
        "# HELP d_seconds delays\n# TYPE d_seconds histogram\n"
        "d_seconds_bucket{le=\"0.1\"} 1\nd_seconds_bucket{le=\"+Inf\"} 2\n"
        "d_seconds_sum 0.3\nd_seconds_count 2\n";
    CHECK(parse_exposition(good).value("a_total") == 3);
    CHECK_THROWS(parse_exposition("a_total 3\n"));                  // no TYPE
    CHECK_THROWS(parse_exposition("# TYPE 1a counter\n1a 3\n"));    // bad name
    CHECK_THROWS(parse_exposition("# TYPE a counter\na three\n"));  // bad value
    CHECK_THROWS(parse_exposition("# TYPE a counter\na 3"));        // no final newline
    CHECK_THROWS(parse_exposition("# TYPE a counter\na -1\n"));     // negative counter
    CHECK_THROWS(parse_exposition(                                  // not cumulative
        "# TYPE d histogram\nd_bucket{le=\"0.1\"} 2\nd_bucket{le=\"+Inf\"} 1\nd_sum 1\nd_count "
        "1\n"));
    CHECK_THROWS(parse_exposition(  // count != +Inf
        "# TYPE d histogram\nd_bucket{le=\"0.1\"} 1\nd_bucket{le=\"+Inf\"} 2\nd_sum 1\nd_count "
        "3\n"));
    CHECK_THROWS(parse_exposition(  // no +Inf
        "# TYPE d histogram\nd_bucket{le=\"0.1\"} 1\nd_sum 1\nd_count 1\n"));
}

TEST_CASE("serve and the gateway answer health and metrics, and their counters rise with events",
          "[integration][operations][sockets]") {
    const auto dir = test::scratch_dir("operations-endpoints");
    test::LiveStack stack(dir, 3'600'000,
                          {"--health-address", "127.0.0.1:0", "--counters-ms", "100"});
    const std::string serve_http = test::key_value(stack.serve_endpoints(), "health");
    const std::uint16_t port = stack.start_gateway({"--upstream-silence-ms", "1000"});
    const std::string gateway_http = fmt::format("127.0.0.1:{}", port);

    for (const auto& at : {serve_http, gateway_http}) {
        INFO(at);
        const auto live = http_get(at, "/health/live");
        CHECK(live.status == 200);
        CHECK(live.body == "live\n");
    }
    // serve is ready once started; the gateway once it hears serve (its counters, every 100 ms).
    CHECK(http_get(serve_http, "/health/ready").status == 200);
    const auto ready_by = std::chrono::steady_clock::now() + 10s;
    while (http_get(gateway_http, "/health/ready").status != 200) {
        REQUIRE(std::chrono::steady_clock::now() < ready_by);
        std::this_thread::sleep_for(50ms);
    }

    const Exposition serve_before = scrape(serve_http);
    const Exposition gateway_before = scrape(gateway_http);
    CHECK(serve_before.types.at("liveprob_serve_event_to_publish_seconds") == "histogram");
    CHECK(serve_before.types.at("liveprob_serve_ingest_frames_total") == "counter");
    CHECK(serve_before.types.at("liveprob_serve_matches") == "gauge");
    CHECK(gateway_before.types.at("liveprob_gateway_delivery_seconds") == "histogram");
    CHECK(gateway_before.value("liveprob_gateway_upstream_up") == 1);

    test::WebSocketClient watcher(port);
    REQUIRE_FALSE(watcher.handshake_error());
    watcher.send(R"({"watch":"all"})");
    test::FeedBuilder feed(501);
    core::MatchSetup setup;
    setup.home_name = "Harbour Lights";
    setup.away_name = "Millbrook Rovers";
    setup.prior = core::PriorMeans{1.5, 1.1};
    stack.send(feed.next(setup, core::MatchClock{}));
    stack.send(feed.start(core::Period::first_half, 0.0));
    stack.send(feed.goal(core::Side::home, core::Period::first_half, 12.0));
    REQUIRE(stack.await_update(501, 3));
    REQUIRE(watcher.receive_containing(R"("score":{"home":1,)", 10s));  // the goal

    const Exposition serve_after = scrape(serve_http);
    CHECK(serve_after.value("liveprob_serve_ingest_frames_total") ==
          serve_before.value("liveprob_serve_ingest_frames_total") + 3);
    CHECK(serve_after.value("liveprob_serve_publish_updates_total") >=
          serve_before.value("liveprob_serve_publish_updates_total") + 3);
    CHECK(serve_after.value("liveprob_serve_event_to_publish_seconds_count") >=
          serve_before.value("liveprob_serve_event_to_publish_seconds_count") + 3);
    CHECK(serve_after.value("liveprob_serve_matches") == 1);

    // The gateway counts the frame to the watcher once its write completes: poll briefly.
    const auto delivered_by = std::chrono::steady_clock::now() + 10s;
    Exposition gateway_after = scrape(gateway_http);
    while (gateway_after.value("liveprob_gateway_delivery_seconds_count") < 1) {
        REQUIRE(std::chrono::steady_clock::now() < delivered_by);
        std::this_thread::sleep_for(50ms);
        gateway_after = scrape(gateway_http);
    }
    CHECK(gateway_after.value("liveprob_gateway_updates_received_total") >=
          gateway_before.value("liveprob_gateway_updates_received_total") + 3);
    CHECK(gateway_after.value("liveprob_gateway_frames_sent_total") >
          gateway_before.value("liveprob_gateway_frames_sent_total"));
    CHECK(gateway_after.value("liveprob_gateway_clients_open") == 1);
    CHECK(gateway_after.value("liveprob_gateway_upstream_messages_total") >
          gateway_before.value("liveprob_gateway_upstream_messages_total"));

    // serve gone: the gateway is no longer ready, says why, tells its clients, and logs it.
    stack.serve_process().signal(SIGKILL);
    REQUIRE(watcher.receive_containing(R"("kind":"upstream","state":"lost")", 10s));
    const auto not_ready = http_get(gateway_http, "/health/ready");
    CHECK(not_ready.status == 503);
    CHECK(not_ready.body.find("not ready: nothing from serve for") == 0);
    const Exposition gateway_lost = scrape(gateway_http);
    CHECK(gateway_lost.value("liveprob_gateway_upstream_up") == 0);
    CHECK(gateway_lost.value("liveprob_gateway_upstream_losses_total") == 1);
    const std::string log = test::read_whole_file(dir / "gateway.log");
    CHECK(log.find("gateway: client 127.0.0.1:") != std::string::npos);
    CHECK(log.find("connected (1 open)") != std::string::npos);
    CHECK(log.find("gateway: upstream lost: nothing from serve for") != std::string::npos);
}
