#include "liveprob/gateway/update_json.hpp"

#include <fmt/format.h>

#include <iterator>

namespace liveprob::gateway {

std::string render_update_json(const GatewayUpdate& update) {
    const core::Outputs& o = update.outputs;
    std::string out;
    out.reserve(700);
    auto it = std::back_inserter(out);
    // fmt's "{}" for double is the shortest round-trip form; JSON has no NaN, and the decoder
    // upstream rejects non-finite probabilities, so every number here is finite.
    fmt::format_to(it,
                   R"({{"kind":"update","match_id":{},"update_seq":{},"feed_seq":{},)"
                   R"("status":"{}","period":"{}","clock_ms":{},)"
                   R"("score":{{"home":{},"away":{}}},"red_cards":{{"home":{},"away":{}}},)"
                   R"("full_time":{{"home":{},"draw":{},"away":{}}},)",
                   update.match_id, update.output_seq, update.input_seq, status_name(o.status),
                   period_name(o.clock.period), o.clock.clock_ms, o.home_goals, o.away_goals,
                   static_cast<unsigned>(o.home_reds), static_cast<unsigned>(o.away_reds),
                   o.p_home, o.p_draw, o.p_away);
    if (o.has_advance) {
        fmt::format_to(it, R"("to_advance":{{"home":{},"away":{}}},)", o.p_advance_home,
                       o.p_advance_away);
    } else {
        fmt::format_to(it, R"("to_advance":null,)");
    }
    fmt::format_to(it,
                   R"("final_goals_expected":{{"home":{},"away":{}}},)"
                   R"("next_goal":{{"home":{},"away":{},"none":{}}},"both_teams_score":{},)"
                   R"("total_over":{{"lines":[0.5,1.5,2.5,3.5,4.5,5.5],"p":[)",
                   o.expected_home_goals, o.expected_away_goals, o.next_goal_home,
                   o.next_goal_away, o.next_goal_none, o.p_both_score);
    for (std::size_t i = 0; i < o.p_over.size(); ++i) {
        fmt::format_to(it, "{}{}", i == 0 ? "" : ",", o.p_over[i]);
    }
    fmt::format_to(it,
                   R"(]}},"times_us":{{"engine_receive":{},"engine_publish":{},"gateway_receive":{}}}}})",
                   update.engine_receive_us, update.engine_publish_us, update.gateway_receive_us);
    return out;
}

}  // namespace liveprob::gateway
