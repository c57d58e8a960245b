// adapters/monitoring: the metrics text's histogram buckets and names, and JSON log lines. The
// text format's rules (cumulative buckets, `le` an inclusive upper bound ending at +Inf, `_sum`
// and `_count`, HELP escaping of backslash and newline, the metric-name grammar
// [a-zA-Z_:][a-zA-Z0-9_:]*) are those of the Prometheus "Exposition formats" page, text format
// 0.0.4; a whole scrape is parsed strictly in integration/operations_endpoints_test.
#include <catch2/catch.hpp>

#include <simdjson.h>
#include <spdlog/sinks/ostream_sink.h>
#include <spdlog/spdlog.h>

#include <memory>
#include <sstream>
#include <stdexcept>
#include <string>

#include "liveprob/monitoring/log_format.hpp"
#include "liveprob/monitoring/metrics_text.hpp"

using liveprob::monitoring::LatencyHistogram;
using liveprob::monitoring::MetricsText;

TEST_CASE("a latency histogram counts a delay equal to a bound in that bound's bucket",
          "[unit][monitoring]") {
    LatencyHistogram h({0.001, 0.01});
    h.observe_us(1000);   // exactly 1 ms: le="0.001" (an inclusive upper bound)
    h.observe_us(1001);   // just over: le="0.01"
    h.observe_us(20000);  // 20 ms: only +Inf
    h.observe_us(-5);     // clocks disagreeing: counted as 0
    CHECK(h.bucket_counts() == std::vector<std::uint64_t>{2, 1, 1});
    CHECK(h.count() == 4);
    CHECK(h.sum_seconds() == Approx(0.022001).epsilon(1e-12));
    CHECK_THROWS_AS(LatencyHistogram({0.01, 0.001}), std::logic_error);
    CHECK_THROWS_AS(LatencyHistogram({0.01, 0.01}), std::logic_error);

    const std::string text = MetricsText().histogram("d_seconds", "delays", h).text();
    CHECK(text ==
          "# HELP d_seconds delays\n# TYPE d_seconds histogram\n"
          "d_seconds_bucket{le=\"0.001\"} 2\nd_seconds_bucket{le=\"0.01\"} 3\n"
          "d_seconds_bucket{le=\"+Inf\"} 4\nd_seconds_sum 0.022001\nd_seconds_count 4\n");
}

TEST_CASE("metric names follow the format's grammar and HELP text is escaped",
          "[unit][monitoring]") {
    CHECK(liveprob::monitoring::metric_name("ingest.rejected.too_small") ==
          "ingest_rejected_too_small");
    CHECK(liveprob::monitoring::metric_name("9lives-x") == "_lives_x");
    CHECK_THROWS_AS(MetricsText().counter("a.b", "x", 1), std::logic_error);
    CHECK_THROWS_AS(MetricsText().gauge("", "x", 1), std::logic_error);
    CHECK(MetricsText().counter("a_total", "back\\slash\nnext", 7).text() ==
          "# HELP a_total back\\\\slash\\nnext\n# TYPE a_total counter\na_total 7\n");
    CHECK(MetricsText().gauge("g", "x", 0.5).text() == "# HELP g x\n# TYPE g gauge\ng 0.5\n");
}

TEST_CASE("JSON log lines are one JSON object per line whatever the message holds",
          "[unit][monitoring]") {
    std::ostringstream out;
    auto previous = spdlog::default_logger();
    spdlog::set_default_logger(std::make_shared<spdlog::logger>(
        "json-test", std::make_shared<spdlog::sinks::ostream_sink_st>(out)));
    liveprob::monitoring::use_log_format("json");
    spdlog::warn("client \"x\" said\nbye\t\\ \x01 é");
    liveprob::monitoring::use_log_format("text");
    spdlog::info("plain");
    spdlog::set_default_logger(previous);

    std::istringstream lines(out.str());
    std::string json_line, text_line, extra;
    REQUIRE(std::getline(lines, json_line));
    REQUIRE(std::getline(lines, text_line));
    CHECK_FALSE(std::getline(lines, extra));  // the newline inside the message stayed escaped
    simdjson::dom::parser parser;
    const simdjson::dom::element e = parser.parse(json_line);
    CHECK(std::string(e["level"].get_string().value()) == "warning");
    CHECK(std::string(e["message"].get_string().value()) == "client \"x\" said\nbye\t\\ \x01 é");
    const std::string time(e["time"].get_string().value());
    CHECK(time.size() == 27);  // 2026-05-01T19:04:05.123456Z
    CHECK(time.back() == 'Z');
    CHECK(text_line.find("[info] plain") != std::string::npos);
    CHECK_THROWS_AS(liveprob::monitoring::use_log_format("xml"), std::invalid_argument);
}
