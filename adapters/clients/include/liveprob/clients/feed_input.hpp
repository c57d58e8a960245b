// A feed read as it arrives: standard input, a pipe, a FIFO or a file, one JSON line or one
// size-prefixed frame at a time. Only what the next unit needs is read (a fixed 64 KiB buffer),
// so a sender that cannot keep up stops reading and a writer into a pipe is held back
// (back-pressure); nothing is read twice. In follow mode the end of a regular file is not the
// end of the feed: the input waits for the file to grow, like `tail -f`, until asked to stop.
#pragma once

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::clients {

enum class FeedInputForm : std::uint8_t { json_lines, frames };

struct FeedInputOptions {
    bool follow = false;  // wait for a regular file to grow at its end
    int follow_poll_ms = 50;
    // When set, follow mode and blocking reads end once it turns true (a signal handler sets it).
    const std::atomic<bool>* stop = nullptr;
};

// One unit of input: a line (without its newline and any trailing '\r') or a frame's payload.
struct FeedUnit {
    std::size_t number = 0;    // line number, or frame number, from 1
    std::uint64_t offset = 0;  // byte offset of its start
    std::string_view bytes;    // valid until the next call of next()
    bool too_long = false;     // a line over kMaxLineBytes: skipped to its end, `bytes` empty
};

class FeedInput {
public:
    // `path` "-" is standard input. Throws std::runtime_error naming the path when it cannot be
    // opened. The form is told from the first bytes when `form` is not given.
    FeedInput(const std::string& path, std::optional<FeedInputForm> form,
              FeedInputOptions options = {});
    ~FeedInput();
    FeedInput(const FeedInput&) = delete;
    FeedInput& operator=(const FeedInput&) = delete;

    FeedInputForm form() const noexcept { return form_; }

    // The next unit; nothing at the end of the input (or when stopped). Throws
    // std::runtime_error for a damaged frame stream (the rest cannot be framed) or a read error.
    std::optional<FeedUnit> next();

    // Why the input ended: "" for a clean end, otherwise what was cut short (a line without
    // its newline is still a line; a frame cut short is reported here).
    const std::string& end_detail() const noexcept { return end_detail_; }

    static constexpr std::size_t kBufferBytes = 64 * 1024;
    static constexpr std::size_t kMaxLineBytes = 1024 * 1024;

private:
    bool fill();  // appends up to kBufferBytes more; false at the end (or when stopped)
    bool stopped() const noexcept;
    std::size_t unread() const noexcept { return pending_.size() - begin_; }
    void compact();
    std::optional<FeedUnit> next_line();
    std::optional<FeedUnit> next_frame();

    std::string path_;
    int fd_ = -1;
    bool owns_fd_ = false;
    bool regular_ = false;
    FeedInputForm form_ = FeedInputForm::json_lines;
    FeedInputOptions options_;
    std::string pending_;         // bytes read, not yet handed out from begin_ on
    std::size_t begin_ = 0;       // first unread byte in pending_
    std::size_t scanned_ = 0;     // bytes after begin_ already searched for a newline
    std::uint64_t consumed_ = 0;  // stream offset of pending_[begin_]
    std::uint64_t read_total_ = 0;
    std::size_t units_ = 0;
    bool at_end_ = false;
    std::string end_detail_;
};

}  // namespace liveprob::clients
