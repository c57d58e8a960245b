// DIR/index.html: a page a person opens, with inline SVG charts (score by bucket, reliability
// diagrams per outcome and bucket, per-match probability timelines with goals and cards).
#pragma once

#include <filesystem>
#include <string>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/report/report_json.hpp"

namespace liveprob::report {

struct ReportHeading {
    std::string title = "Replay report";
    std::string source;  // what was replayed, one line
};

std::string report_html(const backtest::BacktestResult& result, const ReportHeading& heading,
                        const Comparison* comparison = nullptr);

// Writes DIR/index.html and DIR/report.json (creating DIR), and with a comparison
// DIR/matches.csv.
void write_report(const std::filesystem::path& dir, const backtest::BacktestResult& result,
                  const ReportHeading& heading, const Comparison* comparison = nullptr);

}  // namespace liveprob::report
