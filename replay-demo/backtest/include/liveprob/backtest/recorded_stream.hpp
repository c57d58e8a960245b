// Recorded streams on disk: the journal's size-prefixed frames, or the JSON-lines form (told
// apart by content). Reading never stops at a bad record: it is counted, described, skipped.
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"

namespace liveprob::backtest {

enum class StreamForm : std::uint8_t { frames, json_lines };

struct StreamContents {
    std::vector<core::InboundMessage> messages;  // valid ones, in file order
    std::uint64_t bad_records = 0;               // frames or lines refused (and a damaged tail)
    std::string first_problem;                   // one line about the first bad record, if any
};

StreamContents read_stream(const std::filesystem::path& path);

// Writes atomically enough for the tools: the whole file in one go.
void write_stream(const std::filesystem::path& path,
                  const std::vector<core::InboundMessage>& messages, StreamForm form);

// "frames" (also "binary") or "json" (also "jsonl"); throws std::invalid_argument otherwise.
StreamForm parse_stream_form(const std::string& text);

}  // namespace liveprob::backtest
