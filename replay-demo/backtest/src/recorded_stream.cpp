#include "liveprob/backtest/recorded_stream.hpp"

#include <fmt/format.h>

#include <stdexcept>
#include <string_view>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::backtest {

namespace {

void note_problem(StreamContents& out, const std::string& problem) {
    ++out.bad_records;
    if (out.first_problem.empty()) out.first_problem = problem;
}

void read_frames(std::span<const std::uint8_t> bytes, StreamContents& out) {
    protocol::FrameCursor cursor(bytes);
    std::size_t frame_number = 0;
    while (const auto frame = cursor.next()) {
        ++frame_number;
        auto decoded = protocol::decode_feed_message(frame->payload);
        if (decoded.message) {
            out.messages.push_back(std::move(*decoded.message));
        } else {
            note_problem(out,
                         fmt::format("frame {} at offset {}: {}: {}", frame_number, frame->offset,
                                     protocol::decode_error_name(decoded.error), decoded.detail));
        }
    }
    if (cursor.end() != protocol::StreamEnd::clean) note_problem(out, cursor.end_detail());
}

// One journal segment: damaged records are skipped (and counted) and reading goes on after them.
void read_journal_segment(std::span<const std::uint8_t> bytes, const std::string& name,
                          StreamContents& out) {
    protocol::JournalRecordReader reader(bytes);
    std::size_t record_number = 0;
    while (const auto record = reader.next()) {
        ++record_number;
        auto decoded = protocol::decode_feed_message(record->payload);
        if (decoded.message) {
            out.messages.push_back(std::move(*decoded.message));
        } else {
            note_problem(out,
                         fmt::format("{}: record {} at offset {}: {}: {}", name, record_number,
                                     record->offset, protocol::decode_error_name(decoded.error),
                                     decoded.detail));
        }
    }
    for (const auto& note : reader.damage_notes()) note_problem(out, name + ": " + note);
    if (reader.tail() == protocol::JournalTail::torn) {
        note_problem(out, fmt::format("{}: torn tail at offset {}", name, reader.tail_offset()));
    }
}

void read_json_lines(std::string_view text, StreamContents& out) {
    protocol::JsonFeedReader reader;
    std::size_t line_number = 0;
    while (!text.empty()) {
        const auto newline = text.find('\n');
        const auto line = text.substr(0, newline);
        text = newline == std::string_view::npos ? std::string_view{} : text.substr(newline + 1);
        auto result = reader.read_line(line, ++line_number);
        if (result.kind == protocol::JsonLineKind::message) {
            out.messages.push_back(std::move(*result.message));
        } else if (result.kind == protocol::JsonLineKind::bad) {
            note_problem(out, result.error);
        }
    }
}

}  // namespace

StreamContents read_stream(const std::filesystem::path& path) {
    StreamContents out;
    if (std::filesystem::is_directory(path)) {  // a journal folder: its segments in order
        for (const auto& segment : protocol::list_journal_segments(path)) {
            const auto bytes = protocol::read_whole_file_bytes(segment, "the journal segment");
            const auto kind = protocol::classify_journal_file(bytes);
            if (kind == protocol::JournalFileKind::segment) {
                read_journal_segment(bytes, segment.filename().string(), out);
            } else if (kind != protocol::JournalFileKind::empty) {
                note_problem(out, fmt::format("{}: {}", segment.filename().string(),
                                              protocol::describe_journal_file_kind(kind)));
            }
        }
        if (!out.first_problem.empty()) out.first_problem = path.string() + "/" + out.first_problem;
        return out;
    }
    const auto bytes = protocol::read_whole_file_bytes(path, "the recorded stream");
    if (protocol::classify_journal_file(bytes) == protocol::JournalFileKind::segment) {
        read_journal_segment(bytes, path.filename().string(), out);
    } else if (protocol::looks_like_frame_stream(bytes)) {
        read_frames(bytes, out);
    } else {
        read_json_lines(std::string_view(reinterpret_cast<const char*>(bytes.data()), bytes.size()),
                        out);
    }
    if (!out.first_problem.empty()) out.first_problem = path.string() + ": " + out.first_problem;
    return out;
}

void write_stream(const std::filesystem::path& path,
                  const std::vector<core::InboundMessage>& messages, StreamForm form) {
    std::vector<std::uint8_t> bytes;
    if (form == StreamForm::journal) {
        // A new journal folder of one segment, for `serve --journal`.
        if (std::filesystem::exists(path)) {
            throw std::runtime_error(path.string() +
                                     ": a journal is written into a new folder; this exists");
        }
        protocol::append_journal_header(bytes);
        for (const auto& m : messages)
            protocol::append_journal_record(bytes, protocol::encode_feed_message(m));
        std::filesystem::create_directories(path);
        protocol::write_file_atomically(path / protocol::journal_segment_name(1), bytes,
                                        "the journal segment");
        return;
    }
    if (form == StreamForm::frames) {
        for (const auto& m : messages)
            protocol::append_frame(bytes, protocol::encode_feed_message(m));
    } else {
        for (const auto& m : messages) {
            const auto line = protocol::to_json_line(m);
            bytes.insert(bytes.end(), line.begin(), line.end());
            bytes.push_back('\n');
        }
    }
    protocol::write_file_atomically(path, bytes, "the recorded stream");
}

StreamForm parse_stream_form(const std::string& text) {
    if (text == "frames" || text == "binary") return StreamForm::frames;
    if (text == "json" || text == "jsonl") return StreamForm::json_lines;
    if (text == "journal") return StreamForm::journal;
    throw std::invalid_argument("stream form must be 'frames', 'json' or 'journal', got '" + text +
                                "'");
}

}  // namespace liveprob::backtest
