// A progress bar with rate and ETA, redrawn in place on standard error:
//   import  [##########..........]  1,204/4,152 fits  38.2 fits/s  ETA 1:17
// Drawn only when standard error is a terminal and --quiet was not given, so logs, pipes and CI
// see nothing of it.
#pragma once

#include <chrono>
#include <cstddef>
#include <string>

namespace liveprob::cli {

class ProgressBar {
public:
    // `label` names the job, `unit` what is counted ("matches"); `quiet` forces it off.
    ProgressBar(std::string label, std::string unit, bool quiet);
    ~ProgressBar();
    ProgressBar(const ProgressBar&) = delete;
    ProgressBar& operator=(const ProgressBar&) = delete;

    bool drawing() const noexcept { return drawing_; }
    // Redraws at most ten times a second, and always when done == total (then ends the line).
    void update(std::size_t done, std::size_t total);

    // The line as it is drawn (exposed for tests and for callers that log it).
    static std::string render(const std::string& label, const std::string& unit, std::size_t done,
                              std::size_t total, double seconds);

private:
    std::string label_, unit_;
    bool drawing_ = false;
    bool open_line_ = false;
    bool finished_ = false;
    std::chrono::steady_clock::time_point start_, last_draw_{};
};

}  // namespace liveprob::cli
