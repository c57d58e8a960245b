// DIR/index.html: a page a person opens, with inline SVG charts (score by bucket, reliability
// diagrams per outcome and bucket, per-match probability timelines with goals and cards).
#pragma once

#include <filesystem>
#include <string>

#include "liveprob/backtest/backtest.hpp"

namespace liveprob::report {

struct ReportHeading {
    std::string title = "Replay report";
    std::string source;  // what was replayed, one line
};

std::string report_html(const backtest::BacktestResult& result, const ReportHeading& heading);

// Writes DIR/index.html and DIR/report.json (creating DIR).
void write_report(const std::filesystem::path& dir, const backtest::BacktestResult& result,
                  const ReportHeading& heading);

}  // namespace liveprob::report
