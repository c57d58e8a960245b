// InboundMessage -> FeedMessage buffer, written as it is: checks belong to the reader.
#include "liveprob/core/overloaded.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/wire/feed_generated.h"

namespace liveprob::protocol {

namespace {

namespace w = liveprob::wire;
using BodyRef = std::pair<w::Body, flatbuffers::Offset<void>>;

w::Side wire_side(core::Side s) { return static_cast<w::Side>(static_cast<std::uint8_t>(s)); }
w::Period wire_period(core::Period p) {
    return static_cast<w::Period>(static_cast<std::uint8_t>(p));
}

template <class T>
BodyRef ref(w::Body type, flatbuffers::Offset<T> offset) {
    return {type, offset.Union()};
}

BodyRef write_setup(flatbuffers::FlatBufferBuilder& fbb, const core::MatchSetup& s) {
    const auto home = fbb.CreateString(s.home_name);
    const auto away = fbb.CreateString(s.away_name);
    flatbuffers::Offset<w::PriorMeans> prior;
    if (s.prior) prior = w::CreatePriorMeans(fbb, s.prior->home_goals, s.prior->away_goals);
    flatbuffers::Offset<w::RatingReference> ratings;
    if (s.ratings) {
        const auto home_key = fbb.CreateString(s.ratings->home_key);
        const auto away_key = fbb.CreateString(s.ratings->away_key);
        ratings = w::CreateRatingReference(fbb, home_key, away_key);
    }
    const core::CompetitionFormat& f = s.format;
    flatbuffers::Offset<w::FirstLeg> first_leg;
    if (f.first_leg)
        first_leg = w::CreateFirstLeg(fbb, f.first_leg->home_goals, f.first_leg->away_goals);
    const auto format = w::CreateFormat(fbb, f.half_minutes, f.extra_time, f.extra_half_minutes,
                                        f.shootout, first_leg);
    flatbuffers::Offset<flatbuffers::String> competition;
    if (!s.competition.empty()) competition = fbb.CreateString(s.competition);
    return ref(w::Body::Setup, w::CreateSetup(fbb, home, away, s.neutral_venue, prior, ratings,
                                              format, s.scheduled_kickoff_us, competition));
}

BodyRef write_body(flatbuffers::FlatBufferBuilder& fbb, const core::MessageBody& body) {
    return std::visit(
        core::overloaded{
            [&](const core::MatchSetup& m) { return write_setup(fbb, m); },
            [&](const core::PeriodStart& m) {
                return ref(w::Body::PeriodStart, w::CreatePeriodStart(fbb, wire_period(m.period)));
            },
            [&](const core::PeriodEnd& m) {
                return ref(w::Body::PeriodEnd, w::CreatePeriodEnd(fbb, wire_period(m.period)));
            },
            [&](const core::Goal& m) {
                return ref(w::Body::Goal,
                           w::CreateGoal(fbb, wire_side(m.side), m.penalty, m.own_goal));
            },
            [&](const core::GoalCancelled& m) {
                return ref(w::Body::GoalCancelled, w::CreateGoalCancelled(fbb, m.goal_seq));
            },
            [&](const core::RedCard& m) {
                return ref(w::Body::RedCard,
                           w::CreateRedCard(fbb, wire_side(m.side), m.second_yellow));
            },
            [&](const core::CardRescinded& m) {
                return ref(w::Body::CardRescinded, w::CreateCardRescinded(fbb, m.card_seq));
            },
            [&](const core::StoppageAnnounced& m) {
                return ref(w::Body::StoppageAnnounced,
                           w::CreateStoppageAnnounced(fbb, wire_period(m.period), m.minutes));
            },
            [&](const core::ScoreCorrection& m) {
                return ref(w::Body::ScoreCorrection,
                           w::CreateScoreCorrection(fbb, m.home_goals, m.away_goals));
            },
            [&](const core::ShootoutKick& m) {
                return ref(w::Body::ShootoutKick,
                           w::CreateShootoutKick(fbb, wire_side(m.side), m.scored));
            },
            [&](const core::ShotXg& m) {
                return ref(w::Body::ShotXg, w::CreateShotXg(fbb, wire_side(m.side), m.xg));
            },
            [&](const core::MatchAbandoned& m) {
                const auto reason = fbb.CreateString(m.reason);
                return ref(w::Body::Abandoned, w::CreateAbandoned(fbb, reason));
            },
            [&](const core::FinalWhistle&) {
                return ref(w::Body::FinalWhistle, w::CreateFinalWhistle(fbb));
            },
            [&](const core::ClockSync& m) {
                return ref(w::Body::ClockSync, w::CreateClockSync(fbb, m.running));
            },
        },
        body);
}

}  // namespace

std::vector<std::uint8_t> encode_feed_message(const core::InboundMessage& message) {
    flatbuffers::FlatBufferBuilder fbb(256);
    const auto [body_type, body] = write_body(fbb, message.body);
    const core::MessageHeader& h = message.header;
    const w::MatchClock clock(wire_period(h.clock.period), h.clock.clock_ms);
    const auto header = w::CreateHeader(fbb, h.match_id, h.source_seq, h.source_time_us, &clock);
    fbb.Finish(w::CreateFeedMessage(fbb, kSchemaMajor, kSchemaMinor, header, body_type, body),
               w::FeedMessageIdentifier());
    return {fbb.GetBufferPointer(), fbb.GetBufferPointer() + fbb.GetSize()};
}

}  // namespace liveprob::protocol
