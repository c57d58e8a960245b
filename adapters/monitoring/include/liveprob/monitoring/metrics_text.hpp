// Metrics in the Prometheus text exposition format, version 0.0.4: for each metric a HELP and a
// TYPE line, then its samples. Counters end in `_total`; a histogram writes cumulative
// `_bucket{le="..."}` samples ending with le="+Inf", then `_sum` and `_count`. Names are the
// caller's and must match [a-zA-Z_:][a-zA-Z0-9_:]* (checked: a bad name is a programming error).
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::monitoring {

// The Content-Type a scraper expects for this format.
inline constexpr const char* kMetricsContentType = "text/plain; version=0.0.4; charset=utf-8";

// Delays counted into fixed buckets (seconds, the format's base unit). Observing is a few
// comparisons and two additions: cheap enough for every published update.
class LatencyHistogram {
public:
    // Upper bounds of the buckets in seconds, rising; +Inf is implied.
    explicit LatencyHistogram(std::vector<double> upper_bounds_seconds = default_bounds());

    // 50 us to 2.5 s: the range from an in-process publish to a stalled browser.
    static std::vector<double> default_bounds();

    void observe_us(std::int64_t microseconds) noexcept;

    const std::vector<double>& bounds() const noexcept { return bounds_; }
    // Observations per bucket (not cumulative); one more entry than bounds(): the +Inf bucket.
    const std::vector<std::uint64_t>& bucket_counts() const noexcept { return counts_; }
    std::uint64_t count() const noexcept { return count_; }
    double sum_seconds() const noexcept { return sum_seconds_; }

private:
    std::vector<double> bounds_;
    std::vector<std::uint64_t> counts_;
    std::uint64_t count_ = 0;
    double sum_seconds_ = 0.0;
};

class MetricsText {
public:
    MetricsText& counter(std::string_view name, std::string_view help, std::uint64_t value);
    MetricsText& gauge(std::string_view name, std::string_view help, double value);
    MetricsText& histogram(std::string_view name, std::string_view help,
                           const LatencyHistogram& histogram);

    const std::string& text() const noexcept { return text_; }

private:
    void header(std::string_view name, std::string_view help, const char* type);
    std::string text_;
};

// A name of the format's grammar made from any text: characters outside [a-zA-Z0-9_:] become
// '_' ("ingest.rejected.too_big" -> "ingest_rejected_too_big").
std::string metric_name(std::string_view text);

}  // namespace liveprob::monitoring
