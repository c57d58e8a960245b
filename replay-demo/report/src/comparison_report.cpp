#include "liveprob/report/comparison_report.hpp"

#include <fmt/format.h>

#include <cmath>
#include <string_view>

#include "forecaster_labels.hpp"
#include "html_text.hpp"
#include "liveprob/fit/calendar.hpp"

namespace liveprob::report {

namespace {

using backtest::Evaluation;
using protocol::JsonWriter;

// A CSV field (RFC 4180): quoted when it holds a comma, a quote or a line break.
std::string csv_field(std::string_view text) {
    if (text.find_first_of(",\"\r\n") == std::string_view::npos) return std::string(text);
    std::string out = "\"";
    for (const char c : text) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

void write_difference(JsonWriter& json, const scoring::PairedDifference& d) {
    json.begin_object()
        .member("n", d.n)
        .member("difference", d.difference)
        .member("difference_low", d.difference_low)
        .member("difference_high", d.difference_high)
        .member("relative", d.relative)
        .member("relative_low", d.relative_low)
        .member("relative_high", d.relative_high)
        .member("separated", d.separated())
        .end_object();
}

void write_bucket(JsonWriter& json, const std::vector<std::string>& columns,
                  const backtest::BucketEvaluation& bucket, bool calibrated) {
    json.key("scores").begin_object();
    for (std::size_t c = 0; c < columns.size(); ++c) {
        const auto& s = bucket.columns[c];
        json.key(columns[c])
            .begin_object()
            .member("n", s.n)
            .member("rps", s.rps)
            .member("brier", s.brier)
            .member("log_loss", s.log_loss)
            .member("ece", s.ece);
        if (calibrated)
            json.member("ece_calibrated_mean", s.calibrated.mean)
                .member("ece_calibrated_p95", s.calibrated.p95);
        json.end_object();
    }
    json.end_object();
    json.key("model_against").begin_object();
    for (std::size_t c = 1; c < columns.size(); ++c) {
        json.key(columns[c]);
        write_difference(json, bucket.model_against[c]);
    }
    json.end_object();
}

void write_groups(JsonWriter& json, const char* name, const Evaluation& e,
                  const std::vector<backtest::GroupEvaluation>& groups) {
    json.key(name).begin_array();
    for (const auto& g : groups) {
        json.line_break()
            .begin_object()
            .member("group", g.group)
            .member("matches", g.matches)
            .member("too_small", g.too_small);
        json.key("buckets").begin_array();
        for (int b = 0; b < scoring::kBuckets; ++b) {
            json.begin_object().member("label", scoring::bucket_label(b));
            write_bucket(json, e.columns, g.buckets[static_cast<std::size_t>(b)], false);
            json.end_object();
        }
        json.end_array().end_object();
    }
    json.line_break().end_array();
}

std::string percent(double share) { return fmt::format("{:+.2f}", 100.0 * share); }

// "−1.23 [−2.00, −0.40]" with the cell marked when the interval holds 0.
std::string difference_cell(const scoring::PairedDifference& d) {
    if (d.n == 0) return "<td>—</td>";
    return fmt::format("<td class=\"{}\">{} <small>[{}, {}]</small></td>",
                       d.separated() ? (d.difference < 0 ? "better" : "worse") : "tied",
                       percent(d.relative), percent(d.relative_low), percent(d.relative_high));
}

std::string group_table(const Evaluation& e, const std::vector<backtest::GroupEvaluation>& groups,
                        std::string_view what) {
    // The model against the two references that matter most (independent Poisson, naive Elo),
    // when present, else against every column.
    std::vector<std::size_t> against;
    for (std::size_t c = 1; c < e.columns.size(); ++c)
        if (e.columns[c] == "independent_poisson" || e.columns[c] == "elo_reference")
            against.push_back(c);
    std::string out =
        fmt::format("<div class=\"wide\"><table><tr><th>{}</th><th>matches</th><th>against</th>",
                    html_escape(what));
    for (int b = 0; b < scoring::kBuckets; ++b)
        out += fmt::format("<th>{}</th>", scoring::bucket_label(b));
    out += "</tr>\n";
    for (const auto& g : groups) {
        for (std::size_t k = 0; k < against.size(); ++k) {
            const std::size_t c = against[k];
            out += "<tr>";
            if (k == 0)
                out += fmt::format("<td rowspan=\"{}\">{}{}</td><td rowspan=\"{}\">{}</td>",
                                   against.size(), html_escape(g.group),
                                   g.too_small ? " <small>(n too small to tell apart)</small>" : "",
                                   against.size(), g.matches);
            out += fmt::format("<td>{}</td>", html_escape(forecaster_label(e.columns[c])));
            for (int b = 0; b < scoring::kBuckets; ++b)
                out += difference_cell(g.buckets[static_cast<std::size_t>(b)].model_against[c]);
            out += "</tr>\n";
        }
    }
    return out + "</table></div>\n";
}

}  // namespace

std::string matches_csv(const backtest::ScoredTable& table) {
    std::string out = "match_id,date,competition,home,away,home_goals,away_goals,result";
    for (int b = 0; b < scoring::kBuckets; ++b)
        for (const auto& column : table.columns)
            for (int k = 0; k < scoring::kOutcomes; ++k)
                out += fmt::format(",{}@{}:{}", column, scoring::bucket_label(b),
                                   scoring::outcome_name(static_cast<scoring::Outcome>(k)));
    out += '\n';
    for (const auto& row : table.rows) {
        out += fmt::format("{},{},{},{},{},{},{},{}", row.match_id, fit::iso_date(row.day),
                           csv_field(row.competition), csv_field(row.home), csv_field(row.away),
                           row.regulation_goals[0], row.regulation_goals[1],
                           scoring::outcome_name(row.result));
        for (const auto& bucket : row.forecasts) {
            for (const auto& f : bucket) {
                if (f) out += fmt::format(",{:.6f},{:.6f},{:.6f}", (*f)[0], (*f)[1], (*f)[2]);
                else out += ",,,";
            }
        }
        out += '\n';
    }
    return out;
}

void write_comparison_json(JsonWriter& json, const Evaluation& e) {
    json.key("comparison")
        .begin_object()
        .member("matches", e.matches)
        .member("seed", e.settings.bootstrap.seed)
        .member("resamples", e.settings.bootstrap.resamples)
        .member("level", e.settings.bootstrap.level)
        .member("calibration_draws", e.settings.calibration_draws)
        .member("min_group", e.settings.min_group)
        .member("per_match_csv", "matches.csv");
    json.key("columns").begin_array();
    for (const auto& c : e.columns) json.value(c);
    json.end_array();
    json.key("buckets").begin_array();
    for (int b = 0; b < scoring::kBuckets; ++b) {
        json.line_break()
            .begin_object()
            .member("minute", scoring::kBucketMinutes[static_cast<std::size_t>(b)])
            .member("label", scoring::bucket_label(b));
        write_bucket(json, e.columns, e.buckets[static_cast<std::size_t>(b)], true);
        json.end_object();
    }
    json.line_break().end_array();
    write_groups(json, "by_competition", e, e.by_competition);
    write_groups(json, "by_year", e, e.by_year);
    json.key("warnings").begin_array();
    for (const auto& w : e.warnings) json.value(w);
    json.end_array().end_object();
}

void write_inputs_json(JsonWriter& json, const RunInputs& inputs) {
    json.key("inputs")
        .begin_object()
        .member("program_version", inputs.program_version)
        .member("command_line", inputs.command_line);
    json.key("files").begin_array();
    for (const auto& f : inputs.files)
        json.line_break()
            .begin_object()
            .member("role", f.role)
            .member("path", f.path)
            .member("sha256", f.sha256)
            .end_object();
    json.line_break().end_array().end_object();
}

std::string comparison_html(const Evaluation& e) {
    std::string out = fmt::format(
        "<h2>Forecasters side by side</h2><p>{} matches. RPS of each forecaster (lower is "
        "better), then the model's RPS against each as a relative difference in % with its "
        "paired bootstrap {:.0f}% interval ({} resamples of the matches, seed {}): negative means "
        "the model is better; green where the interval excludes 0 in the model's favour, red "
        "against it, grey where this n cannot tell the two apart.</p>\n",
        e.matches, 100 * e.settings.bootstrap.level, e.settings.bootstrap.resamples,
        e.settings.bootstrap.seed);
    if (!e.warnings.empty()) {
        out += "<div class=\"note\"><b>Too few matches to tell apart:</b><ul>";
        for (const auto& w : e.warnings) out += "<li>" + html_escape(w) + "</li>";
        out += "</ul></div>\n";
    }
    out += "<div class=\"wide\"><table><tr><th>minute</th><th>n</th>";
    for (const auto& c : e.columns)
        out += fmt::format("<th>RPS<br><small>{}</small></th>", html_escape(forecaster_label(c)));
    for (std::size_t c = 1; c < e.columns.size(); ++c)
        out += fmt::format("<th>model vs<br><small>{}</small></th>",
                           html_escape(forecaster_label(e.columns[c])));
    out += "</tr>\n";
    for (int b = 0; b < scoring::kBuckets; ++b) {
        const auto& bucket = e.buckets[static_cast<std::size_t>(b)];
        out += fmt::format("<tr><td>{}</td><td>{}</td>", scoring::bucket_label(b),
                           bucket.columns[0].n);
        for (const auto& s : bucket.columns)
            out += s.n ? fmt::format("<td>{:.5f}</td>", s.rps) : "<td>—</td>";
        for (std::size_t c = 1; c < e.columns.size(); ++c)
            out += difference_cell(bucket.model_against[c]);
        out += "</tr>\n";
    }
    out += "</table></div>\n";
    out += fmt::format(
        "<h3>Expected calibration error</h3><p>Each forecaster's ECE, and in brackets the ECE a "
        "perfectly calibrated forecaster shows on the same forecasts at the same n (outcomes "
        "drawn from the forecasts themselves, {} draws: mean / 95th percentile). An ECE inside "
        "that range is what chance alone gives.</p><div class=\"wide\"><table><tr><th>minute</th>",
        e.settings.calibration_draws);
    for (const auto& c : e.columns)
        out += fmt::format("<th>{}</th>", html_escape(forecaster_label(c)));
    out += "</tr>\n";
    for (int b = 0; b < scoring::kBuckets; ++b) {
        out += fmt::format("<tr><td>{}</td>", scoring::bucket_label(b));
        for (const auto& s : e.buckets[static_cast<std::size_t>(b)].columns) {
            out +=
                s.n ? fmt::format("<td class=\"{}\">{:.4f} <small>({:.4f} / {:.4f})</small></td>",
                                  s.ece > s.calibrated.p95 ? "worse" : "tied", s.ece,
                                  s.calibrated.mean, s.calibrated.p95)
                    : "<td>—</td>";
        }
        out += "</tr>\n";
    }
    out +=
        "</table></div>\n<h3>By competition</h3><p>The model against the references, relative RPS "
        "difference in % with its interval; competitions with fewer matches are pooled.</p>\n";
    out += group_table(e, e.by_competition, "competition");
    out += "<h3>By year</h3>\n" + group_table(e, e.by_year, "year");
    return out;
}

std::string inputs_html(const RunInputs& inputs) {
    std::string out = fmt::format(
        "<h2>Inputs</h2><p>Program version {}. Command: <code>{}</code></p><div "
        "class=\"wide\"><table><tr><th>role"
        "</th><th>file</th><th>SHA-256</th></tr>\n",
        html_escape(inputs.program_version), html_escape(inputs.command_line));
    for (const auto& f : inputs.files)
        out += fmt::format("<tr><td>{}</td><td>{}</td><td><code>{}</code></td></tr>\n",
                           html_escape(f.role), html_escape(f.path), f.sha256);
    return out + "</table></div>\n";
}

std::string matches_html(const backtest::ScoredTable& table, std::size_t rows) {
    std::string out = fmt::format(
        "<h2>Matches</h2><p>Every scored match with every forecaster's forecasts: <a "
        "href=\"matches.csv\">matches.csv</a> ({} rows). The first {} here: home / draw / away "
        "of the model at each minute.</p><div "
        "class=\"wide\"><table><tr><th>date</th><th>competition</th>"
        "<th>match</th><th>score</th>",
        table.rows.size(), std::min(rows, table.rows.size()));
    for (int b = 0; b < scoring::kBuckets; ++b)
        out += fmt::format("<th>{}</th>", scoring::bucket_label(b));
    out += "</tr>\n";
    for (std::size_t i = 0; i < std::min(rows, table.rows.size()); ++i) {
        const auto& r = table.rows[i];
        out += fmt::format("<tr><td>{}</td><td>{}</td><td>{} v {}</td><td>{}-{}</td>",
                           fit::iso_date(r.day), html_escape(r.competition), html_escape(r.home),
                           html_escape(r.away), r.regulation_goals[0], r.regulation_goals[1]);
        for (const auto& bucket : r.forecasts) {
            const auto& f = bucket[0];
            out += f ? fmt::format("<td>{:.2f} / {:.2f} / {:.2f}</td>", (*f)[0], (*f)[1], (*f)[2])
                     : "<td>—</td>";
        }
        out += "</tr>\n";
    }
    return out + "</table></div>\n";
}

}  // namespace liveprob::report
