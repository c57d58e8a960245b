#include "liveprob/protocol/update_json.hpp"

#include <algorithm>

namespace liveprob::protocol {

namespace {

void write_details(JsonWriter& json, const MatchDetails& d) {
    if (!d.known) {  // a writer before schema 1.2: nothing to name the match by
        json.key("match").null();
        return;
    }
    const core::CompetitionFormat& f = d.format;
    json.key("match")
        .begin_object()
        .member("home", d.home_name)
        .member("away", d.away_name)
        .member("competition", d.competition)
        .member("kickoff_us", d.scheduled_kickoff_us)
        .member("neutral_venue", d.neutral_venue)
        .key("format")
        .begin_object()
        .member("half_minutes", f.half_minutes)
        .member("extra_time", f.extra_time)
        .member("extra_half_minutes", f.extra_half_minutes)
        .member("shootout", f.shootout)
        .key("first_leg");
    if (f.first_leg) {
        json.begin_object()
            .member("home", f.first_leg->home_goals)
            .member("away", f.first_leg->away_goals)
            .end_object();
    } else {
        json.null();
    }
    json.end_object().end_object();
}

// null until a kick is taken; then each side's kicks in order (true: scored).
void write_shootout(JsonWriter& json, const core::ShootoutTally& t) {
    if (t.taken[0] + t.taken[1] == 0) {
        json.key("shootout").null();
        return;
    }
    json.key("shootout").begin_object().member("first", core::side_name(t.first));
    for (const core::Side side : {core::Side::home, core::Side::away}) {
        const auto i = static_cast<std::size_t>(core::index(side));
        json.key(core::side_name(side))
            .begin_object()
            .member("taken", t.taken[i])
            .member("scored", t.scored[i])
            .key("kicks")
            .begin_array();
        const int recorded = std::min(t.taken[i], core::kShootoutKicksRecorded);
        for (int k = 0; k < recorded; ++k) json.value(((t.scored_bits[i] >> k) & 1U) != 0);
        json.end_array().end_object();
    }
    json.end_object();
}

}  // namespace

void write_update_json(JsonWriter& json, const UpdateMeta& meta, const core::Outputs& o,
                       const MatchDetails& details, const UpdateJsonExtras& extras) {
    auto home_away = [&](std::string_view name, auto home, auto away) {
        json.key(name).begin_object().member("home", home).member("away", away).end_object();
    };
    json.begin_object().member("kind", "update");
    if (!extras.source.empty()) json.member("source", extras.source);
    json.member("match_id", meta.match_id)
        .member("update_seq", meta.output_seq)
        .member("feed_seq", meta.input_seq)
        .member("tick", meta.receive_time_us == 0);
    write_details(json, details);
    json.member("status", core::status_name(o.status))
        .member("period", core::period_name(o.clock.period))
        .member("clock_ms", o.clock.clock_ms);
    home_away("score", o.home_goals, o.away_goals);
    home_away("red_cards", static_cast<unsigned>(o.home_reds), static_cast<unsigned>(o.away_reds));
    json.key("full_time")
        .begin_object()
        .member("home", o.p_home)
        .member("draw", o.p_draw)
        .member("away", o.p_away)
        .end_object();
    if (o.has_advance) {
        home_away("to_advance", o.p_advance_home, o.p_advance_away);
    } else {
        json.key("to_advance").null();
    }
    write_shootout(json, o.shootout);
    home_away("final_goals_expected", o.expected_home_goals, o.expected_away_goals);
    json.key("next_goal")
        .begin_object()
        .member("home", o.next_goal_home)
        .member("away", o.next_goal_away)
        .member("none", o.next_goal_none)
        .end_object();
    json.member("both_teams_score", o.p_both_score);
    json.key("total_over").begin_object().key("lines").begin_array();
    for (int i = 0; i < core::kTotalsLines; ++i) json.value(core::totals_line(i));
    json.end_array().key("p").begin_array();
    for (const double p : o.p_over) json.value(p);
    json.end_array().end_object();
    json.member("events_applied", o.events_applied).member("compute_ns", meta.compute_ns);
    json.key("times_us")
        .begin_object()
        .member("engine_receive", meta.receive_time_us)
        .member("engine_publish", meta.publish_time_us);
    if (extras.gateway_receive_us != 0) json.member("gateway_receive", extras.gateway_receive_us);
    json.end_object()
        .member("feed_stale", meta.feed_stale)
        .member("journal_failing", meta.journal_failing)
        .end_object();
}

std::string update_json(const DecodedUpdate& update, const UpdateJsonExtras& extras) {
    std::string out;
    out.reserve(900);
    JsonWriter json(out);
    write_update_json(json, update.meta, update.outputs, update.details, extras);
    return out;
}

}  // namespace liveprob::protocol
