#include "liveprob/report/report_html.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <string_view>
#include <utility>
#include <vector>

#include "forecaster_labels.hpp"
#include "html_text.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "liveprob/report/comparison_report.hpp"
#include "liveprob/report/report_json.hpp"
#include "liveprob/report/time_axis.hpp"

namespace liveprob::report {

namespace {

// The report's own plain palette: one colour per forecaster and per outcome.
constexpr std::array<std::string_view, backtest::kForecasters> kForecasterColour{
    "#1f5fa8", "#9a9a9a", "#d08a1e", "#3c8d4f", "#8a4fa8"};
constexpr std::array<std::string_view, scoring::kOutcomes> kOutcomeColour{"#1f5fa8", "#7a7a7a",
                                                                          "#b8322a"};

std::string label_of(backtest::Forecaster f) {
    return forecaster_label(backtest::forecaster_name(f));
}

std::string score_table(const backtest::BacktestResult& r) {
    std::string out = "<div class=\"wide\"><table><tr><th>minute</th><th>n</th>";
    auto present = [&](int f) { return r.at(0, static_cast<backtest::Forecaster>(f)).count() > 0; };
    for (const char* score : {"RPS", "Brier", "log loss"}) {
        for (int f = 0; f < backtest::kForecasters; ++f)
            if (present(f))
                out += fmt::format("<th>{}<br><small>{}</small></th>", score,
                                   label_of(static_cast<backtest::Forecaster>(f)));
    }
    out += "<th>ECE<br><small>model</small></th></tr>\n";
    for (int b = 0; b < scoring::kBuckets; ++b) {
        out += fmt::format("<tr><td>{}</td><td>{}</td>", scoring::bucket_label(b),
                           r.at(b, backtest::Forecaster::model).count());
        for (int s = 0; s < 3; ++s) {
            for (int f = 0; f < backtest::kForecasters; ++f) {
                if (!present(f)) continue;
                const auto& acc = r.at(b, static_cast<backtest::Forecaster>(f));
                const double v = s == 0   ? acc.mean_rps()
                                 : s == 1 ? acc.mean_brier()
                                          : acc.mean_log_loss();
                out += fmt::format("<td>{:.4f}</td>", v);
            }
        }
        out += fmt::format(
            "<td>{:.4f}</td></tr>\n",
            r.at(b, backtest::Forecaster::model).calibration().expected_calibration_error());
    }
    return out + "</table></div>\n";
}

// An SVG that scales down to the page's width, never wider than drawn.
std::string svg_open(double width, double height, std::string_view title) {
    return fmt::format(
        "<svg viewBox=\"0 0 {0} {1}\" width=\"{0}\" height=\"{1}\" role=\"img\"><title>{2}</title>",
        width, height, html_escape(title));
}

// A legend as HTML under a chart: it wraps on a narrow page instead of being clipped.
std::string legend_html(const std::vector<std::pair<std::string, std::string_view>>& keys) {
    std::string out = "<p class=\"legend\">";
    for (const auto& [label, colour] : keys)
        out += fmt::format("<span><i style=\"background:{}\"></i>{}</span>", colour,
                           html_escape(label));
    return out + "</p>\n";
}

// RPS by bucket, one line per forecaster; y-axis mean RPS, x-axis the minute read.
std::string rps_chart(const backtest::BacktestResult& r) {
    constexpr double width = 600, height = 250, left = 58, right = 14, bottom = 34, top = 12;
    double high = 0.0;
    for (int b = 0; b < scoring::kBuckets; ++b)
        for (int f = 0; f < backtest::kForecasters; ++f)
            high = std::max(high, r.at(b, static_cast<backtest::Forecaster>(f)).mean_rps());
    high = high > 0 ? high * 1.1 : 1.0;
    auto x = [&](int b) { return left + (width - left - right) * b / (scoring::kBuckets - 1); };
    auto y = [&](double v) { return top + (height - top - bottom) * (1.0 - v / high); };
    std::string out = svg_open(width, height, "RPS by minute");
    out += fmt::format(
        "<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2:.1f}\" stroke=\"#444\"/><line x1=\"{0}\" "
        "y1=\"{2:.1f}\" x2=\"{3}\" y2=\"{2:.1f}\" stroke=\"#444\"/>",
        left, top, y(0), width - right);
    for (int b = 0; b < scoring::kBuckets; ++b)
        out += fmt::format(
            "<text x=\"{:.1f}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">{}</text>", x(b),
            height - bottom + 15, scoring::bucket_label(b));
    out += fmt::format(
        "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">minute of the "
        "forecast</text>",
        left + (width - left - right) / 2, height - 3);
    for (int t = 0; t <= 4; ++t)
        out += fmt::format(
            "<line x1=\"{0}\" x2=\"{1}\" y1=\"{2:.1f}\" y2=\"{2:.1f}\" stroke=\"#eee\"/><text "
            "x=\"{3}\" y=\"{4:.1f}\" font-size=\"10\" text-anchor=\"end\">{5:.3f}</text>",
            left + 1, width - right, y(high * t / 4), left - 4, y(high * t / 4) + 3, high * t / 4);
    out += fmt::format(
        "<text transform=\"translate(12 {}) rotate(-90)\" font-size=\"11\" "
        "text-anchor=\"middle\">mean RPS</text>",
        top + (height - top - bottom) / 2);
    std::vector<std::pair<std::string, std::string_view>> keys;
    for (int f = 0; f < backtest::kForecasters; ++f) {
        if (r.at(0, static_cast<backtest::Forecaster>(f)).count() == 0) continue;
        std::string points;
        for (int b = 0; b < scoring::kBuckets; ++b)
            points += fmt::format("{:.1f},{:.1f} ", x(b),
                                  y(r.at(b, static_cast<backtest::Forecaster>(f)).mean_rps()));
        const auto colour = kForecasterColour[static_cast<std::size_t>(f)];
        out +=
            fmt::format("<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"2\" points=\"{}\"/>",
                        colour, points);
        keys.emplace_back(label_of(static_cast<backtest::Forecaster>(f)), colour);
    }
    return out + "</svg>\n" + legend_html(keys);
}

// One reliability diagram: observed rate (y) against mean forecast (x) per bin, dot area by
// count, both axes 0 to 1.
std::string reliability_chart(const scoring::ReliabilityDiagram& diagram, scoring::Outcome outcome,
                              std::string_view caption) {
    constexpr double size = 170, left = 30, pad = 18, bottom = 22;
    const double inner = size - left - pad;
    auto px = [&](double v) { return left + inner * v; };
    auto py = [&](double v) { return size - bottom - inner * v; };
    std::uint64_t most = 1;
    for (const auto& bin : diagram) most = std::max(most, bin.count);
    std::string out = svg_open(size, size, caption);
    out += fmt::format(
        "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"none\" stroke=\"#bbb\"/>", px(0),
        py(1), inner, inner);
    out += fmt::format(
        "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#bbb\" stroke-dasharray=\"3\"/>",
        px(0), py(0), px(1), py(1));
    for (const double v : {0.0, 0.5, 1.0}) {
        out += fmt::format(
            "<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"9\" text-anchor=\"end\">{}</text>"
            "<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"9\" text-anchor=\"middle\">{}</text>",
            left - 3, py(v) + 3, v, px(v), size - bottom + 10, v);
    }
    out += fmt::format(
        "<text x=\"{:.1f}\" y=\"{}\" font-size=\"9\" text-anchor=\"middle\">forecast</text>"
        "<text transform=\"translate(8 {:.1f}) rotate(-90)\" font-size=\"9\" "
        "text-anchor=\"middle\">observed</text>",
        px(0.5), size - 2, py(0.5));
    for (const auto& bin : diagram) {
        if (!bin.count) continue;
        const double radius =
            1.5 + 4.5 * std::sqrt(static_cast<double>(bin.count) / static_cast<double>(most));
        out += fmt::format(
            "<circle cx=\"{:.1f}\" cy=\"{:.1f}\" r=\"{:.1f}\" fill=\"{}\"><title>n={} forecast "
            "{:.3f} observed {:.3f}</title></circle>",
            px(bin.mean_forecast()), py(bin.observed_rate()), radius,
            kOutcomeColour[static_cast<std::size_t>(outcome)], bin.count, bin.mean_forecast(),
            bin.observed_rate());
    }
    out += fmt::format("<text x=\"{}\" y=\"12\" font-size=\"11\">{}</text>", left,
                       html_escape(caption));
    return out + "</svg>";
}

// One match: home win, draw and away win against the clock, each period in its own stretch
// (stoppage shaded after the period's nominal end), y-axis in %, goals and cards as lines.
std::string timeline_chart(const backtest::Timeline& t) {
    constexpr double width = 640, height = 200, left = 42, right = 12, top = 24, bottom = 40;
    const TimeAxis axis(t);
    const double plot_bottom = height - bottom;
    auto x = [&](core::Period period, double minute) {
        return left + (width - left - right) * axis.position(period, minute) / axis.length();
    };
    auto y = [&](double p) { return top + (plot_bottom - top) * (1.0 - p); };
    const std::string title = t.home_name + " v " + t.away_name;
    std::string out = svg_open(width, height, title);
    out += fmt::format("<text x=\"{}\" y=\"14\" font-size=\"12\" font-weight=\"bold\">{}</text>",
                       left, html_escape(title));
    for (const double p : {0.0, 0.25, 0.5, 0.75, 1.0})
        out += fmt::format(
            "<line x1=\"{0}\" x2=\"{1}\" y1=\"{2:.1f}\" y2=\"{2:.1f}\" stroke=\"#eee\"/><text "
            "x=\"{3}\" y=\"{4:.1f}\" font-size=\"10\" text-anchor=\"end\">{5:.0f}%</text>",
            left, width - right, y(p), left - 4, y(p) + 3, p * 100);
    out += fmt::format(
        "<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"#444\"/><line x1=\"{0}\" "
        "y1=\"{2}\" x2=\"{3}\" y2=\"{2}\" stroke=\"#444\"/>",
        left, top, plot_bottom, width - right);
    for (const auto& s : axis.stretches()) {
        const double step = s.nominal > 20 ? 15.0 : s.nominal;
        for (double m = 0; m <= s.nominal + 1e-9; m += step) {
            const double at = x(s.period, s.start + m);
            out += fmt::format(
                "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"#e4e4e4\"/>",
                at, top, plot_bottom);
            if (m > 0 || s.period == core::Period::first_half)
                out += fmt::format(
                    "<text x=\"{:.1f}\" y=\"{}\" font-size=\"10\" "
                    "text-anchor=\"middle\">{:.0f}'</text>",
                    at, plot_bottom + 13, s.start + m);
        }
        if (s.over > 0) {
            const double from = x(s.period, s.start + s.nominal);
            const double to = x(s.period, s.start + s.nominal + s.over);
            out += fmt::format(
                "<rect x=\"{0:.1f}\" y=\"{1}\" width=\"{2:.1f}\" height=\"{3}\" fill=\"#f3efe4\"/>"
                "<text x=\"{4:.1f}\" y=\"{5}\" font-size=\"9\" text-anchor=\"middle\" "
                "fill=\"#8a7a50\">+{6:.0f}</text>",
                from, top, to - from, plot_bottom - top, (from + to) / 2, plot_bottom + 25,
                std::ceil(s.over));
        }
        if (s.period == core::Period::extra_first)
            out += fmt::format(
                "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"#8a7a50\" "
                "stroke-dasharray=\"3 3\"/><text x=\"{3:.1f}\" y=\"{1}\" font-size=\"9\" "
                "fill=\"#8a7a50\">extra time: the result at full time is known</text>",
                x(s.period, s.start), top - 4, plot_bottom, x(s.period, s.start) + 3);
    }
    out += fmt::format(
        "<text x=\"{}\" y=\"{}\" font-size=\"10\" text-anchor=\"middle\">match minute (stoppage "
        "shaded)</text>",
        left + (width - left - right) / 2, height - 3);
    for (const auto& m : t.marks) {
        const bool goal = m.kind == backtest::TimelineMark::Kind::goal;
        const std::string_view colour = m.kind == backtest::TimelineMark::Kind::goal_cancelled
                                            ? "#999"
                                            : kOutcomeColour[m.side == core::Side::home ? 0 : 2];
        out += fmt::format(
            "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"{3}\" "
            "{4}><title>{5} {6} {7}'</title></line>",
            x(m.period, m.minute), top, plot_bottom, colour,
            goal ? "stroke-width=\"2\"" : "stroke-dasharray=\"4 3\"",
            m.kind == backtest::TimelineMark::Kind::goal       ? "goal"
            : m.kind == backtest::TimelineMark::Kind::red_card ? "red card"
                                                               : "goal cancelled",
            side_name(m.side), minute_label(m.period, m.minute, t));
    }
    for (int k = 0; k < scoring::kOutcomes; ++k) {
        std::string points;
        for (const auto& p : t.points)
            points += fmt::format("{:.1f},{:.1f} ", x(p.period, p.minute),
                                  y(p.forecast[static_cast<std::size_t>(k)]));
        out += fmt::format(
            "<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"1.6\" points=\"{}\"/>",
            kOutcomeColour[static_cast<std::size_t>(k)], points);
    }
    out += "</svg>\n";
    return "<figure>" + out +
           legend_html({{t.home_name + " win", kOutcomeColour[0]},
                        {"draw", kOutcomeColour[1]},
                        {t.away_name + " win", kOutcomeColour[2]}}) +
           "</figure>\n";
}

}  // namespace

std::string report_html(const backtest::BacktestResult& r, const ReportHeading& heading,
                        const Comparison* comparison) {
    std::string out =
        "<!doctype html><html lang=\"en\"><head><meta charset=\"utf-8\"><meta "
        "name=\"viewport\" content=\"width=device-width, initial-scale=1\"><title>" +
        html_escape(heading.title) +
        "</title><style>body{font-family:sans-serif;margin:0 auto;padding:1em "
        "clamp(0.5em,3vw,2em);color:#222;max-width:1100px}"
        "svg{max-width:100%;height:auto}.wide{overflow-x:auto;max-width:100%}"
        "table{border-collapse:collapse;font-size:13px}td,th{border:1px solid #ccc;padding:3px "
        "6px;text-align:right}.better{background:#e3f1e3}.worse{background:#f6e0de}.tied{color:#"
        "555}"
        ".note{background:#f6f1e3;padding:8px;border-left:4px solid #d08a1e}.grid "
        "svg{margin:2px}.legend{font-size:13px;margin:0.2em 0 1em}.legend span{margin-right:1.2em;"
        "white-space:nowrap}.legend i{display:inline-block;width:1.4em;height:0.35em;"
        "vertical-align:middle;margin-right:0.4em}figure{margin:0 0 1em}</style></head><body>\n";
    out += "<h1>" + html_escape(heading.title) + "</h1>\n";
    out +=
        "<p class=\"note\">Every figure here is a model estimate scored after the fact, not a fact "
        "and not advice. Where such estimates are shown beside betting content, local rules on "
        "gambling advertising and responsible-gambling messages apply.</p>\n";
    out += fmt::format(
        "<p>{}<br>Matches: {} scored, {} abandoned, {} unfinished, {} unusable. Messages: {} ({} "
        "refused by the engine, {} duplicates, {} late).</p>\n",
        html_escape(heading.source), r.scored, r.abandoned, r.unfinished, r.unusable, r.messages,
        r.rejected, r.duplicates, r.late);
    out +=
        "<h2>Scores by minute</h2><p>Lower is better. <b>Pre-match forecast, held</b>: the "
        "forecast before kick-off kept all match; <b>flat timing, no state effects</b>: the "
        "engine with a flat goal-timing profile and no score-state or red-card effects; "
        "<b>independent Poisson</b>: the same priors and timing profile, no state effects, no "
        "strength update; <b>Elo reference</b>: the naive Elo reference (walk-forward Elo "
        "ratings as commonly published for national teams, Poisson means log-linear in the "
        "rating difference fitted on the ten years before, independent Poisson over the "
        "remaining share of the earlier goal-minute histogram), when the run was given its "
        "data. The JSON report and matches.csv name them <code>fixed_prior</code>, "
        "<code>uniform_timing_no_state</code>, <code>independent_poisson</code> and "
        "<code>elo_reference</code>.</p>\n";
    out += rps_chart(r) + score_table(r);
    if (comparison) out += comparison_html(comparison->evaluation);
    out +=
        "<h2>Reliability of the model</h2><p>Observed frequency against forecast probability, ten "
        "bins; on the dashed line a forecast of p happens p of the time. Dot size grows with the "
        "bin's count.</p><div class=\"grid\">\n";
    for (int k = 0; k < scoring::kOutcomes; ++k) {
        out += "<div>";
        for (int b = 0; b < scoring::kBuckets; ++b) {
            const auto outcome = static_cast<scoring::Outcome>(k);
            out += reliability_chart(
                r.at(b, backtest::Forecaster::model).calibration().diagram(outcome), outcome,
                fmt::format("{} at {}", scoring::outcome_name(outcome), scoring::bucket_label(b)));
        }
        out += "</div>\n";
    }
    out +=
        "</div><h2>Match timelines</h2><p>The model's result at full time against the match "
        "clock, each period with its own room for stoppage time (shaded); solid vertical lines "
        "are goals, dashed red cards, grey a goal cancelled on review.</p>\n";
    for (const auto& t : r.timelines) out += timeline_chart(t);
    if (comparison) out += matches_html(comparison->table, 40) + inputs_html(comparison->inputs);
    return out + "</body></html>\n";
}

void write_report(const std::filesystem::path& dir, const backtest::BacktestResult& result,
                  const ReportHeading& heading, const Comparison* comparison) {
    std::filesystem::create_directories(dir);
    if (comparison)
        protocol::write_file_atomically(dir / "matches.csv", matches_csv(comparison->table),
                                        "the per-match table");
    protocol::write_file_atomically(dir / "report.json", report_json(result, comparison),
                                    "the JSON report");
    protocol::write_file_atomically(dir / "index.html", report_html(result, heading, comparison),
                                    "the HTML report");
}

}  // namespace liveprob::report
