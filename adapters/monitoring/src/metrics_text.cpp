#include "liveprob/monitoring/metrics_text.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <stdexcept>

namespace liveprob::monitoring {

namespace {

bool name_char(char c, bool first) {
    const bool letter = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_' || c == ':';
    return letter || (!first && c >= '0' && c <= '9');
}

void check_name(std::string_view name) {
    bool ok = !name.empty();
    for (std::size_t i = 0; ok && i < name.size(); ++i) ok = name_char(name[i], i == 0);
    if (!ok) throw std::logic_error(fmt::format("'{}' is not a metric name", name));
}

// HELP text escapes backslash and newline (the format's rule).
std::string escape_help(std::string_view help) {
    std::string out;
    for (const char c : help) {
        if (c == '\\') {
            out += "\\\\";
        } else if (c == '\n') {
            out += "\\n";
        } else {
            out += c;
        }
    }
    return out;
}

// Shortest text that reads back as the same double ("0.00025", "1e-05", "+Inf").
std::string number(double value) { return fmt::format("{}", value); }

}  // namespace

LatencyHistogram::LatencyHistogram(std::vector<double> upper_bounds_seconds)
    : bounds_(std::move(upper_bounds_seconds)), counts_(bounds_.size() + 1, 0) {
    if (!std::is_sorted(bounds_.begin(), bounds_.end()) ||
        std::adjacent_find(bounds_.begin(), bounds_.end()) != bounds_.end()) {
        throw std::logic_error("histogram bounds must rise");
    }
}

std::vector<double> LatencyHistogram::default_bounds() {
    return {0.00005, 0.0001, 0.00025, 0.0005, 0.001, 0.0025, 0.005, 0.01,
            0.025,   0.05,   0.1,     0.25,   0.5,   1.0,    2.5};
}

void LatencyHistogram::observe_us(std::int64_t microseconds) noexcept {
    // A negative delay is two hosts' clocks disagreeing; it counts as zero.
    const double seconds = static_cast<double>(std::max<std::int64_t>(microseconds, 0)) * 1e-6;
    const auto bucket = std::lower_bound(bounds_.begin(), bounds_.end(), seconds) - bounds_.begin();
    ++counts_[static_cast<std::size_t>(bucket)];
    ++count_;
    sum_seconds_ += seconds;
}

void MetricsText::header(std::string_view name, std::string_view help, const char* type) {
    check_name(name);
    text_ += fmt::format("# HELP {} {}\n# TYPE {} {}\n", name, escape_help(help), name, type);
}

MetricsText& MetricsText::counter(std::string_view name, std::string_view help,
                                  std::uint64_t value) {
    header(name, help, "counter");
    text_ += fmt::format("{} {}\n", name, value);
    return *this;
}

MetricsText& MetricsText::gauge(std::string_view name, std::string_view help, double value) {
    header(name, help, "gauge");
    text_ += fmt::format("{} {}\n", name, number(value));
    return *this;
}

MetricsText& MetricsText::histogram(std::string_view name, std::string_view help,
                                    const LatencyHistogram& h) {
    header(name, help, "histogram");
    std::uint64_t cumulative = 0;
    for (std::size_t i = 0; i < h.bounds().size(); ++i) {
        cumulative += h.bucket_counts()[i];
        text_ +=
            fmt::format("{}_bucket{{le=\"{}\"}} {}\n", name, number(h.bounds()[i]), cumulative);
    }
    cumulative += h.bucket_counts().back();
    text_ += fmt::format("{}_bucket{{le=\"+Inf\"}} {}\n", name, cumulative);
    text_ +=
        fmt::format("{}_sum {}\n{}_count {}\n", name, number(h.sum_seconds()), name, h.count());
    return *this;
}

std::string metric_name(std::string_view text) {
    std::string out(text);
    for (std::size_t i = 0; i < out.size(); ++i) {
        if (!name_char(out[i], i == 0)) out[i] = '_';
    }
    return out;
}

}  // namespace liveprob::monitoring
