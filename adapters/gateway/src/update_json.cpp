#include "liveprob/gateway/update_json.hpp"

#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::gateway {

std::string render_update_json(const GatewayUpdate& update) {
    const core::Outputs& o = update.outputs;
    std::string out;
    out.reserve(700);
    // Numbers in their shortest round-trip form; the decoder upstream rejects non-finite
    // probabilities, so every number here is finite.
    protocol::JsonWriter json(out);
    auto home_away = [&](std::string_view name, auto home, auto away) {
        json.key(name).begin_object().member("home", home).member("away", away).end_object();
    };
    json.begin_object()
        .member("kind", "update")
        .member("match_id", update.match_id)
        .member("update_seq", update.output_seq)
        .member("feed_seq", update.input_seq)
        .member("status", core::status_name(o.status))
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
    json.key("times_us")
        .begin_object()
        .member("engine_receive", update.engine_receive_us)
        .member("engine_publish", update.engine_publish_us)
        .member("gateway_receive", update.gateway_receive_us)
        .end_object();
    json.member("feed_stale", update.feed_stale).member("journal_failing", update.journal_failing);
    json.end_object();
    return out;
}

}  // namespace liveprob::gateway
