#include "liveprob/report/report_json.hpp"

#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::report {

namespace {

using protocol::JsonWriter;

void write_calibration(JsonWriter& json, const scoring::CalibrationTable& table) {
    json.key("calibration").begin_object();
    for (int k = 0; k < scoring::kOutcomes; ++k) {
        const auto outcome = static_cast<scoring::Outcome>(k);
        json.key(scoring::outcome_name(outcome)).begin_array();
        const auto& diagram = table.diagram(outcome);
        for (int b = 0; b < scoring::kReliabilityBins; ++b) {
            const auto& bin = diagram[static_cast<std::size_t>(b)];
            json.begin_object()
                .member("bin", b)
                .member("low", b / 10.0)
                .member("high", (b + 1) / 10.0)
                .member("n", bin.count)
                .member("mean_forecast", bin.mean_forecast())
                .member("observed_rate", bin.observed_rate())
                .end_object();
        }
        json.end_array();
    }
    json.end_object();
}

void write_scores(JsonWriter& json, const scoring::ScoreAccumulator& acc) {
    const auto& cal = acc.calibration();
    json.begin_object()
        .member("n", acc.count())
        .member("brier", acc.mean_brier())
        .member("log_loss", acc.mean_log_loss())
        .member("rps", acc.mean_rps())
        .member("ece", cal.expected_calibration_error());
    json.key("ece_by_outcome")
        .begin_object()
        .member("home", cal.expected_calibration_error(scoring::Outcome::home))
        .member("draw", cal.expected_calibration_error(scoring::Outcome::draw))
        .member("away", cal.expected_calibration_error(scoring::Outcome::away))
        .end_object();
    write_calibration(json, cal);
    json.end_object();
}

}  // namespace

std::string report_json(const backtest::BacktestResult& r, const Comparison* comparison) {
    std::string out;
    // Compact, with a line per section and per bucket for a person skimming the file.
    JsonWriter json(out);
    json.begin_object().member("kind", "liveprob-replay-report").member("version", 1).line_break();
    json.key("matches")
        .begin_object()
        .member("total", r.matches)
        .member("scored", r.scored)
        .member("abandoned", r.abandoned)
        .member("unfinished", r.unfinished)
        .member("unusable", r.unusable)
        .end_object()
        .line_break();
    json.key("messages")
        .begin_object()
        .member("total", r.messages)
        .member("rejected", r.rejected)
        .member("duplicates", r.duplicates)
        .member("late", r.late)
        .end_object()
        .line_break();
    json.key("forecasters").begin_array();
    for (int f = 0; f < backtest::kForecasters; ++f) {
        json.value(backtest::forecaster_name(static_cast<backtest::Forecaster>(f)));
    }
    json.end_array().line_break();
    json.key("buckets").begin_array();
    for (int b = 0; b < scoring::kBuckets; ++b) {
        json.line_break()
            .begin_object()
            .member("minute", scoring::kBucketMinutes[static_cast<std::size_t>(b)])
            .member("label", scoring::bucket_label(b))
            .member("n", r.at(b, backtest::Forecaster::model).count());
        for (int f = 0; f < backtest::kForecasters; ++f) {
            const auto forecaster = static_cast<backtest::Forecaster>(f);
            json.key(backtest::forecaster_name(forecaster));
            write_scores(json, r.at(b, forecaster));
        }
        json.end_object();
    }
    json.line_break().end_array();
    if (comparison) {
        json.line_break();
        write_comparison_json(json, comparison->evaluation);
        json.line_break();
        write_inputs_json(json, comparison->inputs);
    }
    json.end_object();
    out.push_back('\n');
    return out;
}

}  // namespace liveprob::report
