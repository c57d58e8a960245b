// One JSON line -> InboundMessage: header fields, the body fields of its "type", then the
// same semantic checks as the FlatBuffers decoder.
#include <type_traits>
#include <variant>

#include <fmt/format.h>

#include "json_fields.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/message_checks.hpp"

namespace liveprob::protocol {

namespace {

using detail::FieldError;
using detail::JsonFields;

// Period and side names as the JSON form spells them (the engine's own stable names).
const std::vector<std::string_view> kPeriods{"pre_match",   "first_half",   "second_half",
                                             "extra_first", "extra_second", "shootout",
                                             "finished"};
const std::vector<std::string_view> kSides{"home", "away"};
// In the order of MessageBody's alternatives, so a kind's index here is its alternative's index.
const std::vector<std::string_view> kKinds{"setup",          "period_start",   "period_end",
                                           "goal",           "goal_cancelled", "red_card",
                                           "card_rescinded", "stoppage",       "score_correction",
                                           "shootout_kick",  "shot_xg",        "abandoned",
                                           "final_whistle",  "clock"};

template <class T, class Variant>
struct alternative_index;
template <class T, class... Ts>
struct alternative_index<T, std::variant<Ts...>> {
    static constexpr std::size_t value = [] {
        constexpr bool matches[] = {std::is_same_v<T, Ts>...};
        for (std::size_t i = 0; i < sizeof...(Ts); ++i) {
            if (matches[i]) return i;
        }
        return sizeof...(Ts);
    }();
};
template <class T>
constexpr std::size_t kind_of = alternative_index<T, core::MessageBody>::value;

core::Side side(const JsonFields& f) { return static_cast<core::Side>(f.choice("side", kSides)); }

core::Period period(const JsonFields& f, std::string_view name) {
    return static_cast<core::Period>(f.choice(name, kPeriods));
}

core::Period period_or(const JsonFields& f, std::string_view name, core::Period fallback) {
    return f.has(name) ? period(f, name) : fallback;
}

// Fields every message has; each kind adds its own.
constexpr std::string_view kHeaderFields[] = {"match", "seq", "time_us", "period", "clock", "type"};

core::MatchSetup read_setup(const JsonFields& f) {
    f.only(kHeaderFields,
           {"home", "away", "neutral", "prior", "ratings", "kickoff_us", "half_minutes",
            "extra_time", "extra_half_minutes", "shootout", "first_leg", "competition"},
           "a 'setup' message");
    core::MatchSetup s;
    s.home_name = f.text("home");
    s.away_name = f.text("away");
    s.neutral_venue = f.boolean_or("neutral", false);
    if (f.has("prior")) {
        const JsonFields prior = f.object("prior");
        prior.only({}, {"home", "away"}, "'prior'");
        s.prior = core::PriorMeans{prior.number("home"), prior.number("away")};
    }
    if (f.has("ratings")) {
        const JsonFields ratings = f.object("ratings");
        ratings.only({}, {"home", "away"}, "'ratings'");
        s.ratings = core::RatingReference{ratings.text("home"), ratings.text("away")};
    }
    s.scheduled_kickoff_us = f.i64_or("kickoff_us", 0);
    if (f.has("competition")) s.competition = f.text("competition");
    s.format.half_minutes = f.u16_or("half_minutes", s.format.half_minutes);
    s.format.extra_time = f.boolean_or("extra_time", false);
    s.format.extra_half_minutes = f.u16_or("extra_half_minutes", s.format.extra_half_minutes);
    s.format.shootout = f.boolean_or("shootout", false);
    if (f.has("first_leg")) {
        const JsonFields leg = f.object("first_leg");
        leg.only({}, {"home", "away"}, "'first_leg'");
        s.format.first_leg = core::FirstLegResult{leg.u16("home"), leg.u16("away")};
    }
    return s;
}

core::MessageBody read_body(const JsonFields& f, std::size_t kind, core::Period clock_period) {
    const std::string context = fmt::format("a '{}' message", kKinds[kind]);
    switch (kind) {
        case kind_of<core::MatchSetup>: return read_setup(f);
        case kind_of<core::PeriodStart>:
            f.only(kHeaderFields, {"starts"}, context);
            return core::PeriodStart{period_or(f, "starts", clock_period)};
        case kind_of<core::PeriodEnd>:
            f.only(kHeaderFields, {"ends"}, context);
            return core::PeriodEnd{period_or(f, "ends", clock_period)};
        case kind_of<core::Goal>:
            f.only(kHeaderFields, {"side", "penalty", "own_goal"}, context);
            return core::Goal{side(f), f.boolean_or("penalty", false),
                              f.boolean_or("own_goal", false)};
        case kind_of<core::GoalCancelled>:
            f.only(kHeaderFields, {"goal_seq"}, context);
            return core::GoalCancelled{f.u64("goal_seq")};
        case kind_of<core::RedCard>:
            f.only(kHeaderFields, {"side", "second_yellow"}, context);
            return core::RedCard{side(f), f.boolean_or("second_yellow", false)};
        case kind_of<core::CardRescinded>:
            f.only(kHeaderFields, {"card_seq"}, context);
            return core::CardRescinded{f.u64("card_seq")};
        case kind_of<core::StoppageAnnounced>:
            f.only(kHeaderFields, {"minutes", "for_period"}, context);
            return core::StoppageAnnounced{period_or(f, "for_period", clock_period),
                                           f.u16("minutes")};
        case kind_of<core::ScoreCorrection>:
            f.only(kHeaderFields, {"home_goals", "away_goals"}, context);
            return core::ScoreCorrection{f.u16("home_goals"), f.u16("away_goals")};
        case kind_of<core::ShootoutKick>:
            f.only(kHeaderFields, {"side", "scored"}, context);
            return core::ShootoutKick{side(f), f.boolean("scored")};
        case kind_of<core::ShotXg>:
            f.only(kHeaderFields, {"side", "xg"}, context);
            return core::ShotXg{side(f), f.number("xg")};
        case kind_of<core::MatchAbandoned>:
            f.only(kHeaderFields, {"reason"}, context);
            return core::MatchAbandoned{f.text_or("reason", "")};
        case kind_of<core::FinalWhistle>:
            f.only(kHeaderFields, {}, context);
            return core::FinalWhistle{};
        default:  // kind_of<ClockSync>, the last
            f.only(kHeaderFields, {"running"}, context);
            return core::ClockSync{f.boolean_or("running", true)};
    }
}

core::InboundMessage read_message(const JsonFields& f, std::string& kind_hint) {
    const std::size_t kind = f.choice("type", kKinds);
    kind_hint = std::string(kKinds[kind]);
    core::InboundMessage m;
    m.header.match_id = f.u64("match");
    m.header.source_seq = f.u64("seq");
    m.header.source_time_us = f.i64("time_us");
    m.header.clock.period = period(f, "period");
    const std::string clock = f.text("clock");
    const auto clock_ms = parse_match_clock(clock);
    if (!clock_ms)
        f.fail("clock", fmt::format("expected minutes:seconds like \"67:12\", got \"{}\"", clock));
    m.header.clock.clock_ms = *clock_ms;
    m.body = read_body(f, kind, m.header.clock.period);
    return m;
}

bool is_blank_or_comment(std::string_view line) {
    const auto first = line.find_first_not_of(" \t");
    return first == std::string_view::npos || line[first] == '#';
}

}  // namespace

struct JsonFeedReader::Parser {
    simdjson::dom::parser dom;
};

JsonLineResult refused_line(std::size_t line_number, std::string field, std::string reason) {
    JsonLineResult result;
    result.kind = JsonLineKind::bad;
    result.field = std::move(field);
    result.reason = std::move(reason);
    result.error = result.field.empty() ? fmt::format("line {}: {}", line_number, result.reason)
                                        : fmt::format("line {}: field '{}': {}", line_number,
                                                      result.field, result.reason);
    return result;
}

JsonFeedReader::JsonFeedReader() : parser_(std::make_unique<Parser>()) {}
JsonFeedReader::~JsonFeedReader() = default;

JsonLineResult JsonFeedReader::read_line(std::string_view line, std::size_t line_number) {
    JsonLineResult result;
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    if (is_blank_or_comment(line)) return result;

    auto refuse = [&](std::string field, std::string reason) {
        JsonLineResult refused = refused_line(line_number, std::move(field), std::move(reason));
        refused.kind_hint = std::move(result.kind_hint);
        return refused;
    };

    simdjson::dom::element doc;
    if (const auto err = parser_->dom.parse(line.data(), line.size()).get(doc);
        err != simdjson::SUCCESS) {
        return refuse("", fmt::format("not valid JSON ({})", simdjson::error_message(err)));
    }
    simdjson::dom::object object;
    if (doc.get_object().get(object) != simdjson::SUCCESS) {
        return refuse("", fmt::format("expected one JSON object, got {}", detail::shown(doc)));
    }
    try {
        const JsonFields fields(object, "");
        core::InboundMessage message = read_message(fields, result.kind_hint);
        if (const auto problem = check_message(message))
            return refuse(problem->field, problem->reason);
        result.kind = JsonLineKind::message;
        result.message = std::move(message);
        return result;
    } catch (const FieldError& e) {
        return refuse(e.field, e.reason);
    }
}

}  // namespace liveprob::protocol
