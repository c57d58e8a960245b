#include "liveprob/report/report_html.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <string_view>

#include "html_text.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "liveprob/report/comparison_report.hpp"
#include "liveprob/report/report_json.hpp"

namespace liveprob::report {

namespace {

// The report's own plain palette: one colour per forecaster and per outcome.
constexpr std::array<std::string_view, backtest::kForecasters> kForecasterColour{
    "#1f5fa8", "#9a9a9a", "#d08a1e", "#3c8d4f", "#8a4fa8"};
constexpr std::array<std::string_view, scoring::kOutcomes> kOutcomeColour{"#1f5fa8", "#7a7a7a",
                                                                          "#b8322a"};

std::string score_table(const backtest::BacktestResult& r) {
    std::string out = "<table><tr><th>minute</th><th>n</th>";
    auto present = [&](int f) { return r.at(0, static_cast<backtest::Forecaster>(f)).count() > 0; };
    for (const char* score : {"RPS", "Brier", "log loss"}) {
        for (int f = 0; f < backtest::kForecasters; ++f)
            if (present(f))
                out += fmt::format("<th>{}<br><small>{}</small></th>", score,
                                   backtest::forecaster_name(static_cast<backtest::Forecaster>(f)));
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
    return out + "</table>\n";
}

// RPS by bucket, one line per forecaster.
std::string rps_chart(const backtest::BacktestResult& r) {
    constexpr double width = 560, height = 240, left = 50, bottom = 30, top = 10;
    double high = 0.0;
    for (int b = 0; b < scoring::kBuckets; ++b)
        for (int f = 0; f < backtest::kForecasters; ++f)
            high = std::max(high, r.at(b, static_cast<backtest::Forecaster>(f)).mean_rps());
    high = high > 0 ? high * 1.1 : 1.0;
    auto x = [&](int b) { return left + (width - left - 10) * b / (scoring::kBuckets - 1); };
    auto y = [&](double v) { return top + (height - top - bottom) * (1.0 - v / high); };
    std::string out = fmt::format(
        "<svg width=\"{}\" height=\"{}\" role=\"img\"><title>RPS by minute</title>", width, height);
    out += fmt::format("<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#444\"/>", left,
                       y(0), width - 10, y(0));
    for (int b = 0; b < scoring::kBuckets; ++b)
        out += fmt::format(
            "<text x=\"{:.1f}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">{}</text>", x(b),
            height - 10, scoring::bucket_label(b));
    for (int t = 0; t <= 4; ++t)
        out += fmt::format(
            "<text x=\"{}\" y=\"{:.1f}\" font-size=\"10\" text-anchor=\"end\">{:.3f}</text>",
            left - 4, y(high * t / 4) + 3, high * t / 4);
    for (int f = 0; f < backtest::kForecasters; ++f) {
        if (r.at(0, static_cast<backtest::Forecaster>(f)).count() == 0) continue;
        std::string points;
        for (int b = 0; b < scoring::kBuckets; ++b)
            points += fmt::format("{:.1f},{:.1f} ", x(b),
                                  y(r.at(b, static_cast<backtest::Forecaster>(f)).mean_rps()));
        out +=
            fmt::format("<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"2\" points=\"{}\"/>",
                        kForecasterColour[static_cast<std::size_t>(f)], points);
        out += fmt::format("<text x=\"{}\" y=\"{}\" font-size=\"11\" fill=\"{}\">{}</text>",
                           left + 10 + 110 * f, top + 12,
                           kForecasterColour[static_cast<std::size_t>(f)],
                           backtest::forecaster_name(static_cast<backtest::Forecaster>(f)));
    }
    return out + "</svg>\n";
}

// One reliability diagram: observed rate against mean forecast per bin, dot area by count.
std::string reliability_chart(const scoring::ReliabilityDiagram& diagram, scoring::Outcome outcome,
                              std::string_view caption) {
    constexpr double size = 150, pad = 18;
    auto pos = [&](double v) { return pad + (size - 2 * pad) * v; };
    auto flip = [&](double v) { return size - pos(v); };
    std::uint64_t most = 1;
    for (const auto& bin : diagram) most = std::max(most, bin.count);
    std::string out =
        fmt::format("<svg width=\"{0}\" height=\"{0}\" role=\"img\"><title>{1}</title>", size,
                    html_escape(caption));
    out += fmt::format(
        "<rect x=\"{0}\" y=\"{0}\" width=\"{1}\" height=\"{1}\" fill=\"none\" stroke=\"#bbb\"/>",
        pad, size - 2 * pad);
    out += fmt::format(
        "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#bbb\" stroke-dasharray=\"3\"/>",
        pos(0), flip(0), pos(1), flip(1));
    for (const auto& bin : diagram) {
        if (!bin.count) continue;
        const double radius =
            1.5 + 4.5 * std::sqrt(static_cast<double>(bin.count) / static_cast<double>(most));
        out += fmt::format(
            "<circle cx=\"{:.1f}\" cy=\"{:.1f}\" r=\"{:.1f}\" fill=\"{}\"><title>n={} forecast "
            "{:.3f} observed {:.3f}</title></circle>",
            pos(bin.mean_forecast()), flip(bin.observed_rate()), radius,
            kOutcomeColour[static_cast<std::size_t>(outcome)], bin.count, bin.mean_forecast(),
            bin.observed_rate());
    }
    out += fmt::format("<text x=\"{}\" y=\"12\" font-size=\"11\">{}</text>", pad,
                       html_escape(caption));
    return out + "</svg>";
}

std::string timeline_chart(const backtest::Timeline& t) {
    constexpr double width = 620, height = 170, left = 34, top = 22, bottom = 22;
    double last = 90.0;
    for (const auto& p : t.points) last = std::max(last, p.minute);
    auto x = [&](double minute) { return left + (width - left - 10) * minute / last; };
    auto y = [&](double p) { return top + (height - top - bottom) * (1.0 - p); };
    std::string out =
        fmt::format("<svg width=\"{}\" height=\"{}\" role=\"img\"><title>{} v {}</title>", width,
                    height, html_escape(t.home_name), html_escape(t.away_name));
    out += fmt::format("<text x=\"{}\" y=\"14\" font-size=\"12\">{} v {}</text>", left,
                       html_escape(t.home_name), html_escape(t.away_name));
    for (const double minute : {0.0, 45.0, 90.0}) {
        out += fmt::format(
            "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"#ddd\"/><text "
            "x=\"{0:.1f}\" y=\"{3}\" font-size=\"10\" text-anchor=\"middle\">{4}</text>",
            x(minute), top, height - bottom, height - 8, minute);
    }
    for (const auto& m : t.marks) {
        const bool goal = m.kind == backtest::TimelineMark::Kind::goal;
        const std::string_view colour = m.kind == backtest::TimelineMark::Kind::goal_cancelled
                                            ? "#999"
                                            : kOutcomeColour[m.side == core::Side::home ? 0 : 2];
        out += fmt::format(
            "<line x1=\"{0:.1f}\" y1=\"{1}\" x2=\"{0:.1f}\" y2=\"{2}\" stroke=\"{3}\" "
            "{4}><title>{5} {6} {7:.0f}'</title></line>",
            x(m.minute), top, height - bottom, colour,
            goal ? "stroke-width=\"2\"" : "stroke-dasharray=\"4 3\"",
            m.kind == backtest::TimelineMark::Kind::goal       ? "goal"
            : m.kind == backtest::TimelineMark::Kind::red_card ? "red card"
                                                               : "goal cancelled",
            side_name(m.side), m.minute);
    }
    for (int k = 0; k < scoring::kOutcomes; ++k) {
        std::string points;
        for (const auto& p : t.points)
            points += fmt::format("{:.1f},{:.1f} ", x(p.minute),
                                  y(p.forecast[static_cast<std::size_t>(k)]));
        out += fmt::format(
            "<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"1.6\" points=\"{}\"/>",
            kOutcomeColour[static_cast<std::size_t>(k)], points);
    }
    return out + "</svg>\n";
}

}  // namespace

std::string report_html(const backtest::BacktestResult& r, const ReportHeading& heading,
                        const Comparison* comparison) {
    std::string out =
        "<!doctype html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>" +
        html_escape(heading.title) +
        "</title><style>body{font-family:sans-serif;margin:2em;color:#222;max-width:1100px}"
        "table{border-collapse:collapse;font-size:13px}td,th{border:1px solid #ccc;padding:3px "
        "6px;text-align:right}.better{background:#e3f1e3}.worse{background:#f6e0de}.tied{color:#"
        "555}"
        ".note{background:#f6f1e3;padding:8px;border-left:4px solid #d08a1e}.grid "
        "svg{margin:2px}</style></head><body>\n";
    out += "<h1>" + html_escape(heading.title) + "</h1>\n";
    out +=
        "<p class=\"note\">Every figure here is a model estimate scored after the fact, not a fact "
        "and not advice.</p>\n";
    out += fmt::format(
        "<p>{}<br>Matches: {} scored, {} abandoned, {} unfinished, {} unusable. Messages: {} ({} "
        "refused by the engine, {} duplicates, {} late).</p>\n",
        html_escape(heading.source), r.scored, r.abandoned, r.unfinished, r.unusable, r.messages,
        r.rejected, r.duplicates, r.late);
    out +=
        "<h2>Scores by minute</h2><p>Lower is better. <b>fixed_prior</b>: the pre-match forecast "
        "held all match; <b>uniform_timing_no_state</b>: the engine with a flat goal-timing "
        "profile and no score-state or red-card effects; <b>independent_poisson</b>: the same "
        "priors and timing profile, no state effects, no strength update; "
        "<b>elo_reference</b>: the naive Elo reference (walk-forward Elo ratings as commonly "
        "published for national teams, Poisson means log-linear in the rating difference "
        "fitted on the ten years before, independent Poisson over the remaining share of the "
        "earlier goal-minute histogram), when the run was given its data.</p>\n";
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
        "</div><h2>Match timelines</h2><p>Home win (blue), draw (grey), away win (red) against the "
        "clock; solid lines are goals, dashed red cards, grey a goal cancelled on review.</p>\n";
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
