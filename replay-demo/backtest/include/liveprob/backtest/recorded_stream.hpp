// Recorded streams on disk: size-prefixed frames, the JSON-lines form (told apart by content),
// or a journal (a folder of checksummed segments, or one segment file;
// protocol/journal_format.hpp). Reading never stops at a bad record: it is counted, described,
// skipped.
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"

namespace liveprob::backtest {

enum class StreamForm : std::uint8_t { frames, json_lines, journal };

struct StreamContents {
    std::vector<core::InboundMessage> messages;  // valid ones, in file order
    std::uint64_t bad_records = 0;               // frames or lines refused (and a damaged tail)
    std::string first_problem;                   // one line about the first bad record, if any
};

StreamContents read_stream(const std::filesystem::path& path);

// Writes atomically enough for the tools: the whole file in one go. `journal` writes a new
// folder (refused when `path` exists) holding one segment.
void write_stream(const std::filesystem::path& path,
                  const std::vector<core::InboundMessage>& messages, StreamForm form);

// "frames" (also "binary"), "json" (also "jsonl") or "journal"; throws std::invalid_argument
// otherwise.
StreamForm parse_stream_form(const std::string& text);

}  // namespace liveprob::backtest
