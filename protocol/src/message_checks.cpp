#include "liveprob/protocol/message_checks.hpp"
#include "liveprob/core/overloaded.hpp"
#include "liveprob/core/validate.hpp"

#include <fmt/format.h>
#include <cmath>

namespace liveprob::protocol {

namespace {

using Problem = std::optional<MessageProblem>;

Problem bad(std::string field, std::string reason) {
    return MessageProblem{DecodeError::bad_value, std::move(field), std::move(reason)};
}

Problem missing(std::string field, std::string reason) {
    return MessageProblem{DecodeError::missing_field, std::move(field), std::move(reason)};
}

bool is_playing_period(core::Period p) noexcept {
    return p >= core::Period::first_half && p <= core::Period::extra_second;
}

// Periods that can start or end: the four of open play plus the shoot-out.
bool can_start_or_end(core::Period p) noexcept {
    return p >= core::Period::first_half && p <= core::Period::shootout;
}

Problem check_side(core::Side side) {
    if (!is_known_side(static_cast<std::uint8_t>(side))) {
        return bad("side", fmt::format("unknown side {}", static_cast<int>(side)));
    }
    return std::nullopt;
}

Problem check_name(const std::string& value, const std::string& field) {
    if (value.empty()) return bad(field, "must not be empty");
    if (value.size() > kMaxNameBytes) {
        return bad(field, fmt::format("longer than {} bytes", kMaxNameBytes));
    }
    return std::nullopt;
}

// The engine's own limits (core/validate.hpp), so a setup this accepts the engine accepts.
Problem engine_problem(const std::optional<core::InputProblem>& problem) {
    if (!problem) return std::nullopt;
    return bad(problem->field, problem->reason);
}

Problem check_setup(const core::MatchSetup& setup) {
    if (auto p = check_name(setup.home_name, "home")) return p;
    if (auto p = check_name(setup.away_name, "away")) return p;
    if (setup.competition.size() > kMaxNameBytes) {
        return bad("competition", fmt::format("longer than {} bytes", kMaxNameBytes));
    }
    if (!setup.prior && !setup.ratings) {
        return missing("prior", "a setup needs 'prior' or 'ratings'");
    }
    if (setup.prior && setup.ratings) {
        return bad("ratings", "give 'prior' or 'ratings', not both");
    }
    if (setup.ratings) {
        if (auto p = check_name(setup.ratings->home_key, "ratings.home")) return p;
        if (auto p = check_name(setup.ratings->away_key, "ratings.away")) return p;
    }
    return engine_problem(core::validate_setup(setup));
}

Problem check_body(const core::MessageBody& body) {
    return std::visit(
        core::overloaded{
            [](const core::MatchSetup& m) { return check_setup(m); },
            [](const core::PeriodStart& m) -> Problem {
                if (!can_start_or_end(m.period)) {
                    return bad("starts", fmt::format("'{}' is not a period that starts",
                                                     period_name(m.period)));
                }
                return std::nullopt;
            },
            [](const core::PeriodEnd& m) -> Problem {
                if (!can_start_or_end(m.period)) {
                    return bad("ends", fmt::format("'{}' is not a period that ends",
                                                   period_name(m.period)));
                }
                return std::nullopt;
            },
            [](const core::StoppageAnnounced& m) -> Problem {
                if (!is_playing_period(m.period)) {
                    return bad("for_period",
                               fmt::format("'{}' has no stoppage time", period_name(m.period)));
                }
                if (m.minutes > kMaxStoppageMinutes) {
                    return bad("minutes", fmt::format("must be 0..{}, got {}", kMaxStoppageMinutes,
                                                      m.minutes));
                }
                return std::nullopt;
            },
            [](const core::Goal& m) { return check_side(m.side); },
            [](const core::RedCard& m) { return check_side(m.side); },
            [](const core::ShootoutKick& m) { return check_side(m.side); },
            [](const core::ShotXg& m) -> Problem {
                if (auto p = check_side(m.side)) return p;
                if (!std::isfinite(m.xg) || m.xg < 0.0 || m.xg > 1.0) {
                    return bad("xg", fmt::format("must be in [0, 1], got {}", m.xg));
                }
                return std::nullopt;
            },
            [](const core::MatchAbandoned& m) -> Problem {
                if (m.reason.size() > kMaxReasonBytes) {
                    return bad("reason", fmt::format("longer than {} bytes", kMaxReasonBytes));
                }
                return std::nullopt;
            },
            // Sequence numbers, score corrections and flags take any value of their type.
            [](const auto&) -> Problem { return std::nullopt; },
        },
        body);
}

}  // namespace

std::string MessageProblem::describe() const {
    return fmt::format("field '{}': {}", field, reason);
}

bool is_known_period(std::uint8_t raw) noexcept {
    return raw <= static_cast<std::uint8_t>(core::Period::finished);
}

bool is_known_side(std::uint8_t raw) noexcept {
    return raw <= static_cast<std::uint8_t>(core::Side::away);
}

std::optional<MessageProblem> check_message(const core::InboundMessage& message) {
    const core::MessageHeader& h = message.header;
    if (h.match_id == 0) return bad("match", "must not be 0 (0 means 'every match' in requests)");
    if (!is_known_period(static_cast<std::uint8_t>(h.clock.period))) {
        return bad("period", fmt::format("unknown period {}", static_cast<int>(h.clock.period)));
    }
    if (h.clock.clock_ms > kMaxClockMs) {
        return bad("clock", fmt::format("{} ms is beyond {} minutes", h.clock.clock_ms,
                                        kMaxClockMs / 60000u));
    }
    return check_body(message.body);
}

}  // namespace liveprob::protocol
