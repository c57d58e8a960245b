#include "liveprob/core/messages.hpp"
#include "liveprob/core/outputs.hpp"
#include "liveprob/core/overloaded.hpp"

#include <type_traits>

namespace liveprob::core {

const char* kind_name(const MessageBody& body) noexcept {
    return std::visit(overloaded{
                          [](const MatchSetup&) { return "setup"; },
                          [](const PeriodStart&) { return "period_start"; },
                          [](const PeriodEnd&) { return "period_end"; },
                          [](const Goal&) { return "goal"; },
                          [](const GoalCancelled&) { return "goal_cancelled"; },
                          [](const RedCard&) { return "red_card"; },
                          [](const CardRescinded&) { return "card_rescinded"; },
                          [](const StoppageAnnounced&) { return "stoppage"; },
                          [](const ScoreCorrection&) { return "score_correction"; },
                          [](const ShootoutKick&) { return "shootout_kick"; },
                          [](const ShotXg&) { return "shot_xg"; },
                          [](const MatchAbandoned&) { return "abandoned"; },
                          [](const FinalWhistle&) { return "final_whistle"; },
                          [](const ClockSync&) { return "clock"; },
                      },
                      body);
}

std::optional<EventBody> event_of(const MessageBody& body) {
    return std::visit(
        [](const auto& b) -> std::optional<EventBody> {
            if constexpr (std::is_same_v<std::decay_t<decltype(b)>, MatchSetup>) {
                return std::nullopt;
            } else {
                return EventBody{b};
            }
        },
        body);
}

MessageBody message_body_of(const EventBody& event) {
    return std::visit([](const auto& e) { return MessageBody{e}; }, event);
}

const char* period_name(Period p) noexcept {
    switch (p) {
        case Period::pre_match: return "pre_match";
        case Period::first_half: return "first_half";
        case Period::second_half: return "second_half";
        case Period::extra_first: return "extra_first";
        case Period::extra_second: return "extra_second";
        case Period::shootout: return "shootout";
        case Period::finished: return "finished";
    }
    return "unknown";
}

const char* status_name(MatchStatus status) noexcept {
    switch (status) {
        case MatchStatus::not_started: return "not_started";
        case MatchStatus::in_play: return "in_play";
        case MatchStatus::interval: return "interval";
        case MatchStatus::shootout: return "shootout";
        case MatchStatus::finished: return "finished";
        case MatchStatus::abandoned: return "abandoned";
    }
    return "unknown";
}

const char* side_name(Side s) noexcept { return s == Side::home ? "home" : "away"; }

}  // namespace liveprob::core
