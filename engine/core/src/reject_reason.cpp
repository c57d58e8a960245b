#include "liveprob/core/reject_reason.hpp"

namespace liveprob::core {

const char* reject_reason_name(RejectReason reason) noexcept {
    switch (reason) {
        case RejectReason::none: return "none";
        case RejectReason::other_match: return "other_match";
        case RejectReason::unknown_side: return "unknown_side";
        case RejectReason::unknown_period: return "unknown_period";
        case RejectReason::bad_xg: return "bad_xg";
        case RejectReason::implausible_stoppage: return "implausible_stoppage";
        case RejectReason::implausible_score: return "implausible_score";
        case RejectReason::setup_in_stream: return "setup_in_stream";
        case RejectReason::before_kickoff: return "before_kickoff";
        case RejectReason::after_final_whistle: return "after_final_whistle";
        case RejectReason::after_abandonment: return "after_abandonment";
        case RejectReason::period_not_started: return "period_not_started";
        case RejectReason::period_already_over: return "period_already_over";
        case RejectReason::period_not_running: return "period_not_running";
        case RejectReason::period_out_of_order: return "period_out_of_order";
        case RejectReason::clock_outside_period: return "clock_outside_period";
        case RejectReason::unknown_goal: return "unknown_goal";
        case RejectReason::goal_already_cancelled: return "goal_already_cancelled";
        case RejectReason::unknown_card: return "unknown_card";
        case RejectReason::card_already_rescinded: return "card_already_rescinded";
        case RejectReason::score_below_zero: return "score_below_zero";
        case RejectReason::kick_outside_shootout: return "kick_outside_shootout";
        case RejectReason::kick_out_of_turn: return "kick_out_of_turn";
        case RejectReason::shootout_already_decided: return "shootout_already_decided";
        case RejectReason::goal_in_shootout: return "goal_in_shootout";
        case RejectReason::final_whistle_too_early: return "final_whistle_too_early";
    }
    return "unknown";
}

}  // namespace liveprob::core
