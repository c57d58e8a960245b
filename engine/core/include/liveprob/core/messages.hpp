// Plain inbound messages: what the engine folds. The protocol layer decodes wire buffers
// (FlatBuffers or JSON lines) into these structs; the engine never sees a wire type.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <variant>

namespace liveprob::core {

enum class Side : std::uint8_t { home = 0, away = 1 };

constexpr Side other(Side s) noexcept { return s == Side::home ? Side::away : Side::home; }
constexpr int index(Side s) noexcept { return static_cast<int>(s); }

// Periods of play in the order they happen. `pre_match` and `finished` bracket them.
enum class Period : std::uint8_t {
    pre_match = 0,
    first_half = 1,
    second_half = 2,
    extra_first = 3,
    extra_second = 4,
    shootout = 5,
    finished = 6,
};

// The match clock as a feed shows it: the period plus the conventional running clock in
// milliseconds (the second half starts at 45:00, so 45:00 + 2:13 of first-half stoppage is
// {first_half, 2'833'000}). Stoppage is therefore "clock beyond the period's nominal end".
struct MatchClock {
    Period period = Period::pre_match;
    std::uint32_t clock_ms = 0;

    friend bool operator==(const MatchClock&, const MatchClock&) = default;
};

// Every inbound message carries this header.
struct MessageHeader {
    std::uint64_t match_id = 0;
    std::uint64_t source_seq = 0;     // per match, from the feed; the de-duplication key
    std::int64_t source_time_us = 0;  // feed's wall time, microseconds since the Unix epoch
    MatchClock clock;                 // match clock when the message was produced

    friend bool operator==(const MessageHeader&, const MessageHeader&) = default;
};

// ---- match setup -------------------------------------------------------------------------

// Pre-match prior: either expected regulation goals given directly, or references to teams in
// a ratings file that the service resolves (see `liveprob prior`).
struct PriorMeans {
    double home_goals = 0.0;  // expected regulation goals, home side
    double away_goals = 0.0;
    friend bool operator==(const PriorMeans&, const PriorMeans&) = default;
};

struct RatingReference {
    std::string home_key;
    std::string away_key;
    friend bool operator==(const RatingReference&, const RatingReference&) = default;
};

struct FirstLegResult {
    std::uint16_t home_goals = 0;  // goals scored in the first leg by THIS match's home side
    std::uint16_t away_goals = 0;  // ... and by this match's away side
    friend bool operator==(const FirstLegResult&, const FirstLegResult&) = default;
};

struct CompetitionFormat {
    std::uint16_t half_minutes = 45;          // regulation is two halves of this length
    bool extra_time = false;                  // played when the tie is level after regulation
    std::uint16_t extra_half_minutes = 15;    // each extra-time half
    bool shootout = false;                    // penalty shoot-out when still level
    std::optional<FirstLegResult> first_leg;  // second leg of a two-legged tie
    friend bool operator==(const CompetitionFormat&, const CompetitionFormat&) = default;

    bool needs_winner() const noexcept { return extra_time || shootout || first_leg.has_value(); }
};

struct MatchSetup {
    std::string home_name;
    std::string away_name;
    bool neutral_venue = false;
    std::optional<PriorMeans> prior;  // one of prior / ratings must be present
    std::optional<RatingReference> ratings;
    CompetitionFormat format;
    std::int64_t scheduled_kickoff_us = 0;
    std::string competition;  // optional: the competition's name as a screen shows it
    friend bool operator==(const MatchSetup&, const MatchSetup&) = default;
};

// ---- in-play events ----------------------------------------------------------------------

struct PeriodStart {
    Period period = Period::first_half;
    friend bool operator==(const PeriodStart&, const PeriodStart&) = default;
};
struct PeriodEnd {
    Period period = Period::first_half;
    friend bool operator==(const PeriodEnd&, const PeriodEnd&) = default;
};

// `side` is the side credited with the goal (for an own goal: the side that benefits).
struct Goal {
    Side side = Side::home;
    bool penalty = false;
    bool own_goal = false;
    friend bool operator==(const Goal&, const Goal&) = default;
};

// A goal disallowed after review; names the goal by its source sequence number.
struct GoalCancelled {
    std::uint64_t goal_seq = 0;
    friend bool operator==(const GoalCancelled&, const GoalCancelled&) = default;
};

struct RedCard {
    Side side = Side::home;
    bool second_yellow = false;
    friend bool operator==(const RedCard&, const RedCard&) = default;
};

struct CardRescinded {
    std::uint64_t card_seq = 0;
    friend bool operator==(const CardRescinded&, const CardRescinded&) = default;
};

// Stoppage time announced for `period` (the board at the end of a half), in whole minutes.
struct StoppageAnnounced {
    Period period = Period::first_half;
    std::uint16_t minutes = 0;
    friend bool operator==(const StoppageAnnounced&, const StoppageAnnounced&) = default;
};

// Absolute correction of the score (the feed's truth overrides the goals counted so far).
struct ScoreCorrection {
    std::uint16_t home_goals = 0;
    std::uint16_t away_goals = 0;
    friend bool operator==(const ScoreCorrection&, const ScoreCorrection&) = default;
};

struct ShootoutKick {
    Side side = Side::home;
    bool scored = false;
    friend bool operator==(const ShootoutKick&, const ShootoutKick&) = default;
};

// Expected-goals value of one shot: evidence about the shooting side's strength.
struct ShotXg {
    Side side = Side::home;
    double xg = 0.0;
    friend bool operator==(const ShotXg&, const ShotXg&) = default;
};

struct MatchAbandoned {
    std::string reason;
    friend bool operator==(const MatchAbandoned&, const MatchAbandoned&) = default;
};
struct FinalWhistle {
    friend bool operator==(const FinalWhistle&, const FinalWhistle&) = default;
};

// Clock sync: the feed's clock reading (in the header) and whether the clock is running.
struct ClockSync {
    bool running = true;
    friend bool operator==(const ClockSync&, const ClockSync&) = default;
};

using MessageBody = std::variant<MatchSetup, PeriodStart, PeriodEnd, Goal, GoalCancelled, RedCard,
                                 CardRescinded, StoppageAnnounced, ScoreCorrection, ShootoutKick,
                                 ShotXg, MatchAbandoned, FinalWhistle, ClockSync>;

struct InboundMessage {
    MessageHeader header;
    MessageBody body;
    friend bool operator==(const InboundMessage&, const InboundMessage&) = default;
};

// Every message body but the setup: what a match's event log holds (a setup never enters it).
// A fifth of a MessageBody's size, which is most of a live match's memory.
using EventBody = std::variant<PeriodStart, PeriodEnd, Goal, GoalCancelled, RedCard, CardRescinded,
                               StoppageAnnounced, ScoreCorrection, ShootoutKick, ShotXg,
                               MatchAbandoned, FinalWhistle, ClockSync>;

// The event a body carries; nullopt for a setup.
[[nodiscard]] std::optional<EventBody> event_of(const MessageBody& body);
[[nodiscard]] MessageBody message_body_of(const EventBody& event);

// Stable short names of message kinds (used by logs, counters and the JSON form).
[[nodiscard]] const char* kind_name(const MessageBody& body) noexcept;
[[nodiscard]] const char* period_name(Period p) noexcept;
[[nodiscard]] const char* side_name(Side s) noexcept;

}  // namespace liveprob::core
