// FeedMessage buffer -> InboundMessage. Structure is verified first (verified_root.hpp); here
// every raw enum is range-checked before it is cast, then the semantic checks run.
#include <fmt/format.h>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/message_checks.hpp"
#include "liveprob/wire/feed_generated.h"
#include "verified_root.hpp"

namespace liveprob::protocol {

namespace {

namespace w = liveprob::wire;
using Problem = std::optional<MessageProblem>;

constexpr detail::EnvelopeLimits kFeedLimits{kMaxFeedMessageBytes, "LPF1", 8, 64};

Problem unknown_enum(const char* field, const char* what, unsigned raw) {
    return MessageProblem{DecodeError::bad_value, field, fmt::format("{} is not a {}", raw, what)};
}

Problem read_side(w::Side raw, const char* field, core::Side& out) {
    const auto value = static_cast<std::uint8_t>(raw);
    if (!is_known_side(value)) return unknown_enum(field, "side", value);
    out = static_cast<core::Side>(value);
    return std::nullopt;
}

Problem read_period(w::Period raw, const char* field, core::Period& out) {
    const auto value = static_cast<std::uint8_t>(raw);
    if (!is_known_period(value)) return unknown_enum(field, "period", value);
    out = static_cast<core::Period>(value);
    return std::nullopt;
}

std::string str(const flatbuffers::String* s) { return s ? s->str() : std::string(); }

Problem read_setup(const w::Setup& in, core::MessageBody& body) {
    core::MatchSetup out;
    out.home_name = str(in.home_name());
    out.away_name = str(in.away_name());
    out.neutral_venue = in.neutral_venue();
    if (const auto* p = in.prior()) out.prior = core::PriorMeans{p->home_goals(), p->away_goals()};
    if (const auto* r = in.ratings())
        out.ratings = core::RatingReference{str(r->home_key()), str(r->away_key())};
    if (const auto* f = in.format()) {
        out.format.half_minutes = f->half_minutes();
        out.format.extra_time = f->extra_time();
        out.format.extra_half_minutes = f->extra_half_minutes();
        out.format.shootout = f->shootout();
        if (const auto* leg = f->first_leg()) {
            out.format.first_leg = core::FirstLegResult{leg->home_goals(), leg->away_goals()};
        }
    }
    out.scheduled_kickoff_us = in.scheduled_kickoff_us();
    out.competition = str(in.competition());
    body = std::move(out);
    return std::nullopt;
}

// Reads a body that is a period plus nothing else (start or end of a period).
template <class Plain, class Wire>
Problem read_period_body(const Wire& in, const char* field, core::MessageBody& body) {
    Plain out;
    if (auto p = read_period(in.period(), field, out.period)) return p;
    body = out;
    return std::nullopt;
}

template <class Plain, class Wire>
Problem read_side_body(const Wire& in, core::MessageBody& body, Plain out) {
    if (auto p = read_side(in.side(), "side", out.side)) return p;
    body = out;
    return std::nullopt;
}

// Runs `read` on the body table; a null table (kind and body disagree) is a missing body.
template <class Wire, class Read>
Problem read_as(const Wire* table, Read&& read) {
    if (!table) return MessageProblem{DecodeError::missing_field, "type", "the body is absent"};
    return read(*table);
}

template <class Plain>
auto assign(core::MessageBody& body) {
    return [&body](Plain value) -> Problem {
        body = std::move(value);
        return std::nullopt;
    };
}

Problem read_body(const w::FeedMessage& m, core::MessageBody& body) {
    switch (m.body_type()) {
        case w::Body::NONE:
            return MessageProblem{DecodeError::missing_field, "type", "the message has no body"};
        case w::Body::Setup:
            return read_as(m.body_as_Setup(),
                           [&](const w::Setup& s) { return read_setup(s, body); });
        case w::Body::PeriodStart:
            return read_as(m.body_as_PeriodStart(), [&](const w::PeriodStart& s) {
                return read_period_body<core::PeriodStart>(s, "starts", body);
            });
        case w::Body::PeriodEnd:
            return read_as(m.body_as_PeriodEnd(), [&](const w::PeriodEnd& s) {
                return read_period_body<core::PeriodEnd>(s, "ends", body);
            });
        case w::Body::Goal:
            return read_as(m.body_as_Goal(), [&](const w::Goal& g) {
                return read_side_body(g, body,
                                      core::Goal{core::Side::home, g.penalty(), g.own_goal()});
            });
        case w::Body::GoalCancelled:
            return read_as(m.body_as_GoalCancelled(), [&](const w::GoalCancelled& g) {
                return assign<core::GoalCancelled>(body)({g.goal_seq()});
            });
        case w::Body::RedCard:
            return read_as(m.body_as_RedCard(), [&](const w::RedCard& r) {
                return read_side_body(r, body, core::RedCard{core::Side::home, r.second_yellow()});
            });
        case w::Body::CardRescinded:
            return read_as(m.body_as_CardRescinded(), [&](const w::CardRescinded& c) {
                return assign<core::CardRescinded>(body)({c.card_seq()});
            });
        case w::Body::StoppageAnnounced:
            return read_as(m.body_as_StoppageAnnounced(), [&](const w::StoppageAnnounced& s) {
                core::StoppageAnnounced out{core::Period::first_half, s.minutes()};
                if (auto p = read_period(s.period(), "for_period", out.period)) return p;
                return assign<core::StoppageAnnounced>(body)(out);
            });
        case w::Body::ScoreCorrection:
            return read_as(m.body_as_ScoreCorrection(), [&](const w::ScoreCorrection& s) {
                return assign<core::ScoreCorrection>(body)({s.home_goals(), s.away_goals()});
            });
        case w::Body::ShootoutKick:
            return read_as(m.body_as_ShootoutKick(), [&](const w::ShootoutKick& k) {
                return read_side_body(k, body, core::ShootoutKick{core::Side::home, k.scored()});
            });
        case w::Body::ShotXg:
            return read_as(m.body_as_ShotXg(), [&](const w::ShotXg& x) {
                return read_side_body(x, body, core::ShotXg{core::Side::home, x.xg()});
            });
        case w::Body::Abandoned:
            return read_as(m.body_as_Abandoned(), [&](const w::Abandoned& a) {
                return assign<core::MatchAbandoned>(body)({str(a.reason())});
            });
        case w::Body::FinalWhistle:
            return read_as(m.body_as_FinalWhistle(), [&](const w::FinalWhistle&) {
                return assign<core::FinalWhistle>(body)({});
            });
        case w::Body::ClockSync:
            return read_as(m.body_as_ClockSync(), [&](const w::ClockSync& c) {
                return assign<core::ClockSync>(body)({c.running()});
            });
    }
    // A newer writer's kind: the verifier lets unknown union members through by design.
    return unknown_enum("type", "message kind this build knows",
                        static_cast<unsigned>(m.body_type()));
}

FeedDecodeResult reject(const MessageProblem& problem) {
    FeedDecodeResult out;
    out.error = problem.error;
    out.detail = detail::error_detail(problem.error, problem.describe());
    return out;
}

}  // namespace

FeedDecodeResult decode_feed_message(std::span<const std::uint8_t> bytes) {
    const auto verified = detail::verify_root<w::FeedMessage>(bytes, kFeedLimits);
    if (!verified.root) return FeedDecodeResult{std::nullopt, verified.error, verified.detail};
    const w::FeedMessage& m = *verified.root;
    const w::Header* h = m.header();  // `required`, so the verifier has seen it; checked anyway
    if (!h) return reject({DecodeError::missing_field, "match", "the message has no header"});
    const w::MatchClock* clock = h->clock();
    if (!clock)
        return reject({DecodeError::missing_field, "clock", "the header has no match clock"});

    core::InboundMessage message;
    message.header.match_id = h->match_id();
    message.header.source_seq = h->source_seq();
    message.header.source_time_us = h->source_time_us();
    message.header.clock.clock_ms = clock->clock_ms();
    if (auto p = read_period(clock->period(), "period", message.header.clock.period))
        return reject(*p);
    if (auto p = read_body(m, message.body)) return reject(*p);
    if (auto p = check_message(message)) return reject(*p);
    return FeedDecodeResult{std::move(message), DecodeError::none, {}};
}

}  // namespace liveprob::protocol
