#include "progress_bar.hpp"

#include <unistd.h>

#include <fmt/format.h>

#include <cstdio>

namespace liveprob::cli {

ProgressBar::ProgressBar(std::string label, std::string unit, bool quiet)
    : label_(std::move(label)), unit_(std::move(unit)),
      drawing_(!quiet && ::isatty(STDERR_FILENO) == 1), start_(std::chrono::steady_clock::now()) {}

ProgressBar::~ProgressBar() {
    if (open_line_) std::fputs("\n", stderr);
}

std::string ProgressBar::render(const std::string& label, const std::string& unit, std::size_t done,
                                std::size_t total, double seconds) {
    constexpr std::size_t width = 24;
    const std::size_t filled = total ? width * std::min(done, total) / total : width;
    const double rate = seconds > 0 ? static_cast<double>(done) / seconds : 0.0;
    std::string eta = "--:--";
    if (rate > 0 && done <= total) {
        const auto left = static_cast<long>(static_cast<double>(total - done) / rate + 0.5);
        eta = fmt::format("{}:{:02}", left / 60, left % 60);
    }
    return fmt::format("{} [{}{}] {}/{} {}  {:.1f} {}/s  ETA {}", label, std::string(filled, '#'),
                       std::string(width - filled, '.'), done, total, unit, rate, unit, eta);
}

void ProgressBar::update(std::size_t done, std::size_t total) {
    if (!drawing_ || finished_) return;
    const auto now = std::chrono::steady_clock::now();
    const bool end = done >= total;
    if (!end && open_line_ && now - last_draw_ < std::chrono::milliseconds(100)) return;
    last_draw_ = now;
    const double seconds = std::chrono::duration<double>(now - start_).count();
    // \r back to the line's start, \033[K clears what a longer earlier line left behind.
    std::fprintf(stderr, "\r%s\033[K", render(label_, unit_, done, total, seconds).c_str());
    open_line_ = !end;
    finished_ = end;
    if (end) std::fputs("\n", stderr);
    std::fflush(stderr);
}

}  // namespace liveprob::cli
