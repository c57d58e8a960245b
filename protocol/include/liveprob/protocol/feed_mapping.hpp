// A declarative feed mapping: a rules file (JSON, format in protocol/README.md, "Feed
// mappings") that turns a data provider's own JSON messages, one per line, into liveprob's feed
// messages. Fields are chosen by JSON Pointer, event kinds and periods by value, the clock read
// in the provider's form ("67:12", "45+2", seconds) and team ids resolved to home and away from
// the match's setup. A new provider is a rules file, not code.
//
// Each provider line becomes one line of the JSON-lines feed, which then passes the very same
// strict reader (json_feed.hpp): whatever the mapping lets through meets every check a native
// line meets. A line the rules cannot map is refused with one line naming the line number and
// the provider's field (its JSON Pointer) and the native field it was meant for.
#pragma once

#include <cstddef>
#include <filesystem>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>

#include "liveprob/protocol/json_feed.hpp"

namespace liveprob::protocol {

// The rules are wrong: names the file and the rule ("kinds.GOAL.fields.side: ...").
struct FeedMappingError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

namespace detail {
struct MappingRules;
}

// Compiled rules, immutable, shared by any number of mappers.
class FeedMapping {
public:
    // `source` names the rules in errors (a file name).
    static FeedMapping from_text(std::string_view json, std::string_view source);
    static FeedMapping from_file(const std::filesystem::path& path);

    const std::string& name() const noexcept;  // the rules' "name"

    const detail::MappingRules& rules() const noexcept { return *rules_; }

private:
    std::shared_ptr<const detail::MappingRules> rules_;
};

// Maps one provider line after another; remembers each match's team ids from its setup so
// later events can name a team instead of a side.
class FeedMapper {
public:
    explicit FeedMapper(FeedMapping mapping);
    ~FeedMapper();
    FeedMapper(const FeedMapper&) = delete;
    FeedMapper& operator=(const FeedMapper&) = delete;

    // Like JsonFeedReader::read_line: a message, skipped (blank, '#', or a kind the rules skip)
    // or bad with a one-line error. `line_number` counts from 1 and labels errors.
    JsonLineResult map_line(std::string_view line, std::size_t line_number);

    // The native JSON line the last mapped line became (empty when it was refused before that).
    const std::string& last_native_line() const noexcept { return native_; }

private:
    struct State;
    FeedMapping mapping_;
    std::unique_ptr<State> state_;
    std::string native_;
};

// A provider's clock reading in one of the forms the rules name, in milliseconds of the
// running match clock; nothing when `text` is not in that form. Forms:
//   minutes_seconds  "67:12", "67:12.250", "45+1:30" (stoppage: 46:30)
//   minute_plus      "67", "45+2", "90+4'" (whole minutes; stoppage added)
// (The numeric forms, seconds and milliseconds, are read from JSON numbers by the mapper.)
std::optional<std::uint32_t> parse_provider_clock(std::string_view form, std::string_view text);

}  // namespace liveprob::protocol
