#include "update_table.hpp"

#include <algorithm>
#include <cmath>
#include <cstring>

#include <fmt/format.h>

#include "liveprob/protocol/feed_codec.hpp"

namespace liveprob::protocol::detail {

namespace w = liveprob::wire;
using Problem = std::optional<MessageProblem>;

namespace {

// Probabilities are sums of many small terms, so allow rounding just outside [0, 1].
constexpr double kRoundingSlack = 1e-9;

Problem bad(const char* field, std::string reason) {
    return MessageProblem{DecodeError::bad_value, field, std::move(reason)};
}

Problem check_probability(const char* field, double p) {
    if (!std::isfinite(p) || p < -kRoundingSlack || p > 1.0 + kRoundingSlack) {
        return bad(field, fmt::format("must be a probability, got {}", p));
    }
    return std::nullopt;
}

Problem check_goals(const char* field, double goals) {
    if (!std::isfinite(goals) || goals < 0.0) {
        return bad(field, fmt::format("must be finite and not negative, got {}", goals));
    }
    return std::nullopt;
}

// Side length of the smallest square of the grid holding every non-zero cell.
std::size_t used_grid_size(const core::Outputs& o) {
    std::size_t n = 0;
    for (std::size_t i = 0; i < core::kGrid; ++i) {
        for (std::size_t j = 0; j < core::kGrid; ++j) {
            if (o.goals_added[i][j] != 0.0) n = std::max(n, std::max(i, j) + 1);
        }
    }
    return n;
}

Problem read_probabilities(const w::Update& in, core::Outputs& o) {
    const std::pair<const char*, double> probabilities[] = {{"p_home", in.p_home()},
                                                            {"p_draw", in.p_draw()},
                                                            {"p_away", in.p_away()},
                                                            {"p_advance_home", in.p_advance_home()},
                                                            {"p_advance_away", in.p_advance_away()},
                                                            {"next_goal_home", in.next_goal_home()},
                                                            {"next_goal_away", in.next_goal_away()},
                                                            {"next_goal_none", in.next_goal_none()},
                                                            {"p_both_score", in.p_both_score()},
                                                            {"tail_mass", in.tail_mass()}};
    for (const auto& [field, p] : probabilities) {
        if (auto problem = check_probability(field, p)) return problem;
    }
    if (auto p = check_goals("expected_home_goals", in.expected_home_goals())) return p;
    if (auto p = check_goals("expected_away_goals", in.expected_away_goals())) return p;
    o.p_home = in.p_home();
    o.p_draw = in.p_draw();
    o.p_away = in.p_away();
    o.has_advance = in.has_advance();
    o.p_advance_home = in.p_advance_home();
    o.p_advance_away = in.p_advance_away();
    o.expected_home_goals = in.expected_home_goals();
    o.expected_away_goals = in.expected_away_goals();
    o.next_goal_home = in.next_goal_home();
    o.next_goal_away = in.next_goal_away();
    o.next_goal_none = in.next_goal_none();
    o.p_both_score = in.p_both_score();
    o.tail_mass = in.tail_mass();
    return std::nullopt;
}

Problem read_vectors(const w::Update& in, core::Outputs& o) {
    const auto* over = in.p_over();
    if (!over) return MessageProblem{DecodeError::missing_field, "p_over", "absent"};
    if (over->size() != core::kTotalsLines) {
        return bad("p_over",
                   fmt::format("{} lines, expected {}", over->size(), core::kTotalsLines));
    }
    for (flatbuffers::uoffset_t i = 0; i < over->size(); ++i) {
        if (auto p = check_probability("p_over", over->Get(i))) return p;
        o.p_over[i] = over->Get(i);
    }
    const std::size_t n = in.grid_size();
    if (n > static_cast<std::size_t>(core::kGrid)) {
        return bad("grid_size", fmt::format("{} is larger than {}", n, core::kGrid));
    }
    const auto* grid = in.goals_added();
    const std::size_t cells = grid ? grid->size() : 0;
    if (cells != n * n) {
        return bad("goals_added", fmt::format("{} cells for a grid of {} x {}", cells, n, n));
    }
    for (std::size_t i = 0; i < n; ++i) {
        for (std::size_t j = 0; j < n; ++j) {
            const double cell = grid->Get(static_cast<flatbuffers::uoffset_t>(i * n + j));
            if (auto p = check_probability("goals_added", cell)) return p;
            o.goals_added[i][j] = cell;
        }
    }
    return std::nullopt;
}

// Both sources of details have the same member names.
template <class Source>
flatbuffers::Offset<w::MatchDetails> write_details_of(flatbuffers::FlatBufferBuilder& fbb,
                                                      const Source& s) {
    const auto home = fbb.CreateString(s.home_name);
    const auto away = fbb.CreateString(s.away_name);
    const auto competition = fbb.CreateString(s.competition);
    const core::CompetitionFormat& f = s.format;
    const core::FirstLegResult leg = f.first_leg.value_or(core::FirstLegResult{});
    return w::CreateMatchDetails(fbb, home, away, competition, s.scheduled_kickoff_us,
                                 s.neutral_venue, f.half_minutes, f.extra_time,
                                 f.extra_half_minutes, f.shootout, f.first_leg.has_value(),
                                 leg.home_goals, leg.away_goals);
}

std::uint16_t clamp16(int n) { return static_cast<std::uint16_t>(std::clamp(n, 0, 0xFFFF)); }

void read_details(const w::MatchDetails& in, MatchDetails& out) {
    const auto text = [](const flatbuffers::String* s) { return s ? s->str() : std::string(); };
    out.known = true;
    out.home_name = text(in.home_name());
    out.away_name = text(in.away_name());
    out.competition = text(in.competition());
    out.scheduled_kickoff_us = in.scheduled_kickoff_us();
    out.neutral_venue = in.neutral_venue();
    out.format.half_minutes = in.half_minutes();
    out.format.extra_time = in.extra_time();
    out.format.extra_half_minutes = in.extra_half_minutes();
    out.format.shootout = in.shootout();
    if (in.two_legs())
        out.format.first_leg =
            core::FirstLegResult{in.first_leg_home_goals(), in.first_leg_away_goals()};
}

Problem read_shootout(const w::ShootoutKicks& in, core::ShootoutTally& out) {
    const auto side = static_cast<std::uint8_t>(in.first());
    if (!is_known_side(side)) return bad("shootout", fmt::format("{} is not a side", side));
    if (in.home_scored() > in.home_taken() || in.away_scored() > in.away_taken())
        return bad("shootout", "more kicks scored than taken");
    out.first = static_cast<core::Side>(side);
    out.taken = {in.home_taken(), in.away_taken()};
    out.scored = {in.home_scored(), in.away_scored()};
    out.scored_bits = {in.home_scored_bits(), in.away_scored_bits()};
    return std::nullopt;
}

}  // namespace

flatbuffers::Offset<w::MatchDetails> write_details(flatbuffers::FlatBufferBuilder& fbb,
                                                   const core::MatchSetup& setup) {
    return write_details_of(fbb, setup);
}
flatbuffers::Offset<w::MatchDetails> write_details(flatbuffers::FlatBufferBuilder& fbb,
                                                   const MatchDetails& details) {
    return write_details_of(fbb, details);
}

flatbuffers::Offset<w::Update> write_update(flatbuffers::FlatBufferBuilder& fbb,
                                            const UpdateMeta& meta, const core::Outputs& o,
                                            flatbuffers::Offset<w::MatchDetails> details) {
    const auto p_over = fbb.CreateVector(o.p_over.data(), o.p_over.size());
    const std::size_t n = used_grid_size(o);
    double* cells = nullptr;
    const auto grid = fbb.CreateUninitializedVector(n * n, &cells);
    for (std::size_t i = 0; i < n; ++i)
        std::memcpy(cells + i * n, o.goals_added[i].data(), n * sizeof(double));

    const w::MatchClock clock(static_cast<w::Period>(o.clock.period), o.clock.clock_ms);
    const core::ShootoutTally& so = o.shootout;
    const w::ShootoutKicks shootout(static_cast<w::Side>(so.first), clamp16(so.taken[0]),
                                    clamp16(so.taken[1]), clamp16(so.scored[0]),
                                    clamp16(so.scored[1]), so.scored_bits[0], so.scored_bits[1]);
    w::UpdateBuilder b(fbb);
    b.add_schema_major(kSchemaMajor);
    b.add_schema_minor(kSchemaMinor);
    b.add_match_id(meta.match_id);
    b.add_output_seq(meta.output_seq);
    b.add_input_seq(meta.input_seq);
    b.add_receive_time_us(meta.receive_time_us);
    b.add_publish_time_us(meta.publish_time_us);
    b.add_compute_ns(meta.compute_ns);
    b.add_status(static_cast<w::Status>(o.status));
    b.add_clock(&clock);
    b.add_home_goals(o.home_goals);
    b.add_away_goals(o.away_goals);
    b.add_home_reds(o.home_reds);
    b.add_away_reds(o.away_reds);
    b.add_p_home(o.p_home);
    b.add_p_draw(o.p_draw);
    b.add_p_away(o.p_away);
    b.add_has_advance(o.has_advance);
    b.add_p_advance_home(o.p_advance_home);
    b.add_p_advance_away(o.p_advance_away);
    b.add_expected_home_goals(o.expected_home_goals);
    b.add_expected_away_goals(o.expected_away_goals);
    b.add_next_goal_home(o.next_goal_home);
    b.add_next_goal_away(o.next_goal_away);
    b.add_next_goal_none(o.next_goal_none);
    b.add_p_over(p_over);
    b.add_p_both_score(o.p_both_score);
    b.add_grid_size(static_cast<std::uint8_t>(n));
    b.add_goals_added(grid);
    b.add_tail_mass(o.tail_mass);
    b.add_events_applied(o.events_applied);
    b.add_feed_stale(meta.feed_stale);
    b.add_journal_failing(meta.journal_failing);
    if (!details.IsNull()) b.add_details(details);
    b.add_shootout(&shootout);
    return b.Finish();
}

std::optional<MessageProblem> read_update(const w::Update& in, DecodedUpdate& out) {
    if (in.schema_major() != kSchemaMajor) {
        return MessageProblem{
            DecodeError::wrong_schema_version, "schema_major",
            fmt::format("{}, this build reads {}", in.schema_major(), kSchemaMajor)};
    }
    const auto status = static_cast<std::uint8_t>(in.status());
    if (status > static_cast<std::uint8_t>(core::MatchStatus::abandoned)) {
        return bad("status", fmt::format("{} is not a match status", status));
    }
    const w::MatchClock* clock = in.clock();
    if (!clock) return MessageProblem{DecodeError::missing_field, "clock", "absent"};
    const auto period = static_cast<std::uint8_t>(clock->period());
    if (!is_known_period(period)) return bad("clock", fmt::format("{} is not a period", period));

    out = DecodedUpdate{};
    out.meta =
        UpdateMeta{in.match_id(),        in.output_seq(), in.input_seq(),  in.receive_time_us(),
                   in.publish_time_us(), in.compute_ns(), in.feed_stale(), in.journal_failing()};
    core::Outputs& o = out.outputs;
    o.status = static_cast<core::MatchStatus>(status);
    o.clock = core::MatchClock{static_cast<core::Period>(period), clock->clock_ms()};
    o.home_goals = in.home_goals();
    o.away_goals = in.away_goals();
    o.home_reds = in.home_reds();
    o.away_reds = in.away_reds();
    o.events_applied = in.events_applied();
    if (const auto* details = in.details()) read_details(*details, out.details);
    if (const auto* shootout = in.shootout()) {
        if (auto p = read_shootout(*shootout, o.shootout)) return p;
    }
    if (auto p = read_probabilities(in, o)) return p;
    return read_vectors(in, o);
}

}  // namespace liveprob::protocol::detail
