// InboundMessage -> one JSON line, and the match clock's text form.
#include <charconv>
#include "liveprob/core/overloaded.hpp"

#include <fmt/format.h>

#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::protocol {

namespace {

// Adds `, "name": value` members to a line's object under construction.
class LineWriter {
public:
    explicit LineWriter(JsonWriter& json) : json_(json) {}
    void text(std::string_view name, std::string_view value) { json_.member(name, value); }
    void flag(std::string_view name, bool value) { json_.member(name, value); }
    void flag_if(std::string_view name, bool value) {
        if (value) flag(name, true);
    }
    template <class N>
    void number(std::string_view name, N value) {
        json_.member(name, value);
    }
    template <class V>
    void pair(std::string_view name, const V& home, const V& away) {
        json_.key(name).begin_object().member("home", home).member("away", away).end_object();
    }

private:
    JsonWriter& json_;
};

void write_setup(LineWriter& w, const core::MatchSetup& s) {
    const core::CompetitionFormat defaults;
    w.text("home", s.home_name);
    w.text("away", s.away_name);
    w.flag_if("neutral", s.neutral_venue);
    if (s.prior) w.pair("prior", s.prior->home_goals, s.prior->away_goals);
    if (s.ratings) w.pair("ratings", s.ratings->home_key, s.ratings->away_key);
    if (s.scheduled_kickoff_us != 0) w.number("kickoff_us", s.scheduled_kickoff_us);
    if (!s.competition.empty()) w.text("competition", s.competition);
    if (s.format.half_minutes != defaults.half_minutes)
        w.number("half_minutes", s.format.half_minutes);
    w.flag_if("extra_time", s.format.extra_time);
    if (s.format.extra_half_minutes != defaults.extra_half_minutes) {
        w.number("extra_half_minutes", s.format.extra_half_minutes);
    }
    w.flag_if("shootout", s.format.shootout);
    if (s.format.first_leg) {
        w.pair("first_leg", s.format.first_leg->home_goals, s.format.first_leg->away_goals);
    }
}

// A period field that defaults to the clock's period is written only when it differs.
void period_unless(LineWriter& w, std::string_view name, core::Period value,
                   core::Period clock_period) {
    if (value != clock_period) w.text(name, period_name(value));
}

}  // namespace

std::string format_match_clock(std::uint32_t clock_ms) {
    const std::uint32_t minutes = clock_ms / 60000;
    const std::uint32_t seconds = clock_ms / 1000 % 60;
    const std::uint32_t millis = clock_ms % 1000;
    return millis == 0 ? fmt::format("{:02}:{:02}", minutes, seconds)
                       : fmt::format("{:02}:{:02}.{:03}", minutes, seconds, millis);
}

std::optional<std::uint32_t> parse_match_clock(std::string_view text) {
    const auto colon = text.find(':');
    if (colon == std::string_view::npos || colon == 0 || colon > 4) return std::nullopt;
    auto digits = [](std::string_view part, std::uint32_t& value) {
        if (part.empty()) return false;
        const auto [end, ec] = std::from_chars(part.data(), part.data() + part.size(), value);
        return ec == std::errc() && end == part.data() + part.size() && part.front() != '+';
    };
    std::uint32_t minutes = 0;
    std::uint32_t seconds = 0;
    std::uint32_t millis = 0;
    if (!digits(text.substr(0, colon), minutes)) return std::nullopt;
    std::string_view rest = text.substr(colon + 1);
    const auto dot = rest.find('.');
    const std::string_view sec_part = rest.substr(0, dot);
    if (sec_part.size() != 2 || !digits(sec_part, seconds) || seconds >= 60) return std::nullopt;
    if (dot != std::string_view::npos) {
        std::string_view frac = rest.substr(dot + 1);
        if (frac.empty() || frac.size() > 3 || !digits(frac, millis)) return std::nullopt;
        for (std::size_t i = frac.size(); i < 3; ++i) millis *= 10;  // ".5" is 500 ms
    }
    return (minutes * 60 + seconds) * 1000 + millis;
}

std::string to_json_line(const core::InboundMessage& message) {
    const core::MessageHeader& h = message.header;
    std::string out;
    JsonWriter json(out, JsonLayout::spaced);
    json.begin_object()
        .member("match", h.match_id)
        .member("seq", h.source_seq)
        .member("time_us", h.source_time_us)
        .member("period", period_name(h.clock.period))
        .member("clock", format_match_clock(h.clock.clock_ms))
        .member("type", kind_name(message.body));
    LineWriter w(json);
    const core::Period clock_period = h.clock.period;
    std::visit(
        core::overloaded{
            [&](const core::MatchSetup& m) { write_setup(w, m); },
            [&](const core::PeriodStart& m) { period_unless(w, "starts", m.period, clock_period); },
            [&](const core::PeriodEnd& m) { period_unless(w, "ends", m.period, clock_period); },
            [&](const core::Goal& m) {
                w.text("side", side_name(m.side));
                w.flag_if("penalty", m.penalty);
                w.flag_if("own_goal", m.own_goal);
            },
            [&](const core::GoalCancelled& m) { w.number("goal_seq", m.goal_seq); },
            [&](const core::RedCard& m) {
                w.text("side", side_name(m.side));
                w.flag_if("second_yellow", m.second_yellow);
            },
            [&](const core::CardRescinded& m) { w.number("card_seq", m.card_seq); },
            [&](const core::StoppageAnnounced& m) {
                w.number("minutes", m.minutes);
                period_unless(w, "for_period", m.period, clock_period);
            },
            [&](const core::ScoreCorrection& m) {
                w.number("home_goals", m.home_goals);
                w.number("away_goals", m.away_goals);
            },
            [&](const core::ShootoutKick& m) {
                w.text("side", side_name(m.side));
                w.flag("scored", m.scored);
            },
            [&](const core::ShotXg& m) {
                w.text("side", side_name(m.side));
                w.number("xg", m.xg);
            },
            [&](const core::MatchAbandoned& m) {
                if (!m.reason.empty()) w.text("reason", m.reason);
            },
            [](const core::FinalWhistle&) {},
            [&](const core::ClockSync& m) {
                if (!m.running) w.flag("running", false);
            },
        },
        message.body);
    json.end_object();
    return out;
}

}  // namespace liveprob::protocol
