#include "liveprob/report/report_json.hpp"

#include <fmt/format.h>

namespace liveprob::report {

namespace {

// Shortest text that reads back to the same double.
std::string number(double x) { return fmt::format("{}", x); }

void append_calibration(std::string& out, const scoring::CalibrationTable& table) {
    out += "\"calibration\":{";
    for (int k = 0; k < scoring::kOutcomes; ++k) {
        const auto outcome = static_cast<scoring::Outcome>(k);
        out += fmt::format("{}\"{}\":[", k ? "," : "", scoring::outcome_name(outcome));
        const auto& diagram = table.diagram(outcome);
        for (int b = 0; b < scoring::kReliabilityBins; ++b) {
            const auto& bin = diagram[static_cast<std::size_t>(b)];
            out += fmt::format("{}{{\"bin\":{},\"low\":{},\"high\":{},\"n\":{},\"mean_forecast\":{},\"observed_rate\":{}}}",
                               b ? "," : "", b, number(b / 10.0), number((b + 1) / 10.0), bin.count,
                               number(bin.mean_forecast()), number(bin.observed_rate()));
        }
        out += "]";
    }
    out += "}";
}

void append_scores(std::string& out, const scoring::ScoreAccumulator& acc) {
    const auto& cal = acc.calibration();
    out += fmt::format("{{\"n\":{},\"brier\":{},\"log_loss\":{},\"rps\":{},\"ece\":{},", acc.count(),
                       number(acc.mean_brier()), number(acc.mean_log_loss()), number(acc.mean_rps()),
                       number(cal.expected_calibration_error()));
    out += fmt::format("\"ece_by_outcome\":{{\"home\":{},\"draw\":{},\"away\":{}}},",
                       number(cal.expected_calibration_error(scoring::Outcome::home)),
                       number(cal.expected_calibration_error(scoring::Outcome::draw)),
                       number(cal.expected_calibration_error(scoring::Outcome::away)));
    append_calibration(out, cal);
    out += "}";
}

}  // namespace

std::string report_json(const backtest::BacktestResult& r) {
    std::string out = "{\"kind\":\"liveprob-replay-report\",\"version\":1,\n";
    out += fmt::format("\"matches\":{{\"total\":{},\"scored\":{},\"abandoned\":{},\"unfinished\":{},\"unusable\":{}}},\n",
                       r.matches, r.scored, r.abandoned, r.unfinished, r.unusable);
    out += fmt::format("\"messages\":{{\"total\":{},\"rejected\":{},\"duplicates\":{},\"late\":{}}},\n",
                       r.messages, r.rejected, r.duplicates, r.late);
    out += "\"forecasters\":[";
    for (int f = 0; f < backtest::kForecasters; ++f) out += fmt::format("{}\"{}\"", f ? "," : "", backtest::forecaster_name(static_cast<backtest::Forecaster>(f)));
    out += "],\n\"buckets\":[\n";
    for (int b = 0; b < scoring::kBuckets; ++b) {
        out += fmt::format("{}{{\"minute\":{},\"label\":\"{}\",\"n\":{}", b ? ",\n" : "",
                           scoring::kBucketMinutes[static_cast<std::size_t>(b)], scoring::bucket_label(b),
                           r.at(b, backtest::Forecaster::model).count());
        for (int f = 0; f < backtest::kForecasters; ++f) {
            out += fmt::format(",\"{}\":", backtest::forecaster_name(static_cast<backtest::Forecaster>(f)));
            append_scores(out, r.at(b, static_cast<backtest::Forecaster>(f)));
        }
        out += "}";
    }
    out += "\n]}\n";
    return out;
}

}  // namespace liveprob::report
