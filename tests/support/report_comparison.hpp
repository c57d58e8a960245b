// What the backtest tests read from a replay's report.json: per bucket, the RPS of the model,
// independent Poisson and the Elo reference, the model against each (relative difference with
// its paired bootstrap interval), and the model's ECE beside a calibrated forecaster's.
#pragma once

#include <simdjson.h>
#include <catch2/catch.hpp>

#include <filesystem>
#include <string>
#include <vector>

#include <fmt/format.h>

namespace liveprob::test {

struct Difference {
    double relative = 0, low = 0, high = 0;
};

struct ComparedBucket {
    std::string label;
    std::uint64_t n = 0;
    double rps_model = 0, rps_ip = 0, rps_elo = 0;
    double ece = 0, ece_calibrated_mean = 0, ece_calibrated_p95 = 0;
    Difference vs_elo, vs_ip;
};

inline double report_number(simdjson::dom::element e, const char* a, const char* b, const char* c) {
    double v = 0;
    REQUIRE(e[a][b][c].get_double().get(v) == simdjson::SUCCESS);
    return v;
}

// Every bucket of the comparison, or with `scored_only` those with n > 0.
inline std::vector<ComparedBucket> read_comparison(const std::filesystem::path& path,
                                                   bool scored_only = false) {
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    REQUIRE(parser.load(path.string()).get(root) == simdjson::SUCCESS);
    simdjson::dom::array buckets;
    REQUIRE(root["comparison"]["buckets"].get_array().get(buckets) == simdjson::SUCCESS);
    std::vector<ComparedBucket> out;
    for (simdjson::dom::element b : buckets) {
        ComparedBucket x;
        std::string_view label;
        REQUIRE(b["label"].get_string().get(label) == simdjson::SUCCESS);
        x.label = label;
        REQUIRE(b["scores"]["model"]["n"].get_uint64().get(x.n) == simdjson::SUCCESS);
        if (scored_only && x.n == 0) continue;
        x.rps_model = report_number(b, "scores", "model", "rps");
        x.rps_ip = report_number(b, "scores", "independent_poisson", "rps");
        x.rps_elo = report_number(b, "scores", "elo_reference", "rps");
        x.ece = report_number(b, "scores", "model", "ece");
        x.ece_calibrated_mean = report_number(b, "scores", "model", "ece_calibrated_mean");
        x.ece_calibrated_p95 = report_number(b, "scores", "model", "ece_calibrated_p95");
        x.vs_elo = {report_number(b, "model_against", "elo_reference", "relative"),
                    report_number(b, "model_against", "elo_reference", "relative_low"),
                    report_number(b, "model_against", "elo_reference", "relative_high")};
        x.vs_ip = {report_number(b, "model_against", "independent_poisson", "relative"),
                   report_number(b, "model_against", "independent_poisson", "relative_low"),
                   report_number(b, "model_against", "independent_poisson", "relative_high")};
        out.push_back(x);
    }
    return out;
}

// "-1.23 [ -2.00, -0.40]": a relative difference in % with its interval.
inline std::string percent_cell(const Difference& d) {
    return fmt::format("{:+6.2f} [{:+6.2f},{:+6.2f}]", 100 * d.relative, 100 * d.low, 100 * d.high);
}

}  // namespace liveprob::test
