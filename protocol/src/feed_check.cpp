#include "liveprob/protocol/feed_check.hpp"

#include <set>
#include <string_view>

#include <fmt/format.h>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/feed_mapping.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::protocol {

namespace {

// Counts repeated and backwards sequence numbers per match.
class SequenceWatch {
public:
    void see(const core::MessageHeader& h, FeedCheckSummary& summary) {
        if (!seen_.insert({h.match_id, h.source_seq}).second) {
            ++summary.repeated_seq;
            return;
        }
        auto [it, first] = highest_.try_emplace(h.match_id, h.source_seq);
        if (first) return;
        if (h.source_seq < it->second) {
            ++summary.out_of_order_seq;
        } else {
            it->second = h.source_seq;
        }
    }

private:
    std::set<std::pair<std::uint64_t, std::uint64_t>> seen_;
    std::map<std::uint64_t, std::uint64_t> highest_;
};

void count_message(const core::InboundMessage& m, FeedCheckSummary& summary, SequenceWatch& watch) {
    ++summary.ok;
    ++summary.kinds[kind_name(m.body)];
    watch.see(m.header, summary);
}

template <class LineReader>
void check_lines(std::string_view text, FeedCheckSummary& summary,
                 const std::function<void(const std::string&)>& report, LineReader&& read_line) {
    SequenceWatch watch;
    std::size_t start = 0;
    while (start < text.size()) {
        auto end = text.find('\n', start);
        if (end == std::string_view::npos) end = text.size();
        ++summary.units;
        const auto result = read_line(text.substr(start, end - start), summary.units);
        switch (result.kind) {
            case JsonLineKind::message: count_message(*result.message, summary, watch); break;
            case JsonLineKind::skipped: ++summary.skipped; break;
            case JsonLineKind::bad:
                ++summary.bad;
                report(result.error);
                break;
        }
        start = end + 1;
    }
}

void check_frames(std::span<const std::uint8_t> bytes, FeedCheckSummary& summary,
                  const std::function<void(const std::string&)>& report) {
    FrameCursor cursor(bytes);
    SequenceWatch watch;
    while (auto frame = cursor.next()) {
        ++summary.units;
        const auto decoded = decode_feed_message(frame->payload);
        if (decoded.message) {
            count_message(*decoded.message, summary, watch);
        } else {
            ++summary.bad;
            report(fmt::format("frame {} at offset {}: {}", summary.units, frame->offset,
                               decoded.detail));
        }
    }
    if (cursor.end() != StreamEnd::clean) {
        ++summary.units;
        ++summary.bad;
        report(fmt::format("after frame {}: {}", summary.units - 1, cursor.end_detail()));
    }
}

void check_journal_records(std::span<const std::uint8_t> bytes, FeedCheckSummary& summary,
                           const std::function<void(const std::string&)>& report) {
    JournalRecordReader reader(bytes);
    SequenceWatch watch;
    while (auto record = reader.next()) {
        ++summary.units;
        const auto decoded = decode_feed_message(record->payload);
        if (decoded.message) {
            count_message(*decoded.message, summary, watch);
        } else {
            ++summary.bad;
            report(fmt::format("record {} at offset {}: {}", summary.units, record->offset,
                               decoded.detail));
        }
    }
    for (const auto& note : reader.damage_notes()) {
        ++summary.units;
        ++summary.bad;
        report(note);
    }
    if (reader.tail() == JournalTail::torn) {
        ++summary.units;
        ++summary.bad;
        report(fmt::format("torn tail at offset {} (a record cut short)", reader.tail_offset()));
    }
}

}  // namespace

const char* feed_form_name(FeedForm form) noexcept {
    switch (form) {
        case FeedForm::json_lines: return "json_lines";
        case FeedForm::frame_stream: return "frame_stream";
        case FeedForm::journal: return "journal";
    }
    return "unknown";
}

FeedCheckSummary check_feed(std::span<const std::uint8_t> bytes,
                            const std::function<void(const std::string&)>& report,
                            const FeedMapping* mapping) {
    FeedCheckSummary summary;
    const std::string_view text(reinterpret_cast<const char*>(bytes.data()), bytes.size());
    if (mapping) {
        FeedMapper mapper(*mapping);
        check_lines(text, summary, report, [&](std::string_view line, std::size_t number) {
            return mapper.map_line(line, number);
        });
    } else if (classify_journal_file(bytes) == JournalFileKind::segment) {
        summary.form = FeedForm::journal;
        check_journal_records(bytes, summary, report);
    } else if (looks_like_frame_stream(bytes)) {
        summary.form = FeedForm::frame_stream;
        check_frames(bytes, summary, report);
    } else {
        JsonFeedReader reader;
        check_lines(text, summary, report, [&](std::string_view line, std::size_t number) {
            return reader.read_line(line, number);
        });
    }
    return summary;
}

std::string summary_json(const FeedCheckSummary& s) {
    std::string out;
    JsonWriter json(out, JsonLayout::spaced);
    json.begin_object()
        .member("form", feed_form_name(s.form))
        .member("units", s.units)
        .member("ok", s.ok)
        .member("skipped", s.skipped)
        .member("bad", s.bad);
    json.key("kinds").begin_object();
    for (const auto& [kind, count] : s.kinds) json.member(kind, count);
    json.end_object();
    json.member("repeated_seq", s.repeated_seq)
        .member("out_of_order_seq", s.out_of_order_seq)
        .end_object();
    return out;
}

}  // namespace liveprob::protocol
