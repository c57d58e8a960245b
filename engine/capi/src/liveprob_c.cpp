// The C ABI over liveprob::core::Match: converts plain C structs to the engine's types and back,
// and turns every exception into a status code (none may cross into a C caller). Only the
// functions declared LIVEPROB_API in the header leave the shared library (CMakeLists.txt).
#include "liveprob/capi/liveprob_c.h"

#include <algorithm>
#include <cstddef>
#include <cstring>
#include <exception>
#include <new>
#include <stdexcept>
#include <string>

#include "liveprob/core/match.hpp"

struct liveprob_match {
    liveprob::core::Match engine;
};

namespace {

using namespace liveprob;

using namespace liveprob::core;

thread_local std::string last_error;

liveprob_status fail(liveprob_status status, const char* message) {
    last_error = message;
    return status;
}

struct InvalidEvent : std::runtime_error {
    using std::runtime_error::runtime_error;
};

struct StructTooSmall : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// A caller's growable struct as this library knows it: its defaults, then the caller's first
// struct_size bytes over them (a newer caller's longer struct: the tail this library does not
// know is ignored). Refuses a struct_size below this ABI version's size.
template <class CStruct, class Init>
CStruct read_grown(const CStruct& from, Init init, const char* what) {
    if (from.struct_size < sizeof(CStruct))
        throw StructTooSmall(std::string(what) + ": struct_size is smaller than this ABI's " +
                             std::to_string(sizeof(CStruct)) + " bytes");
    CStruct own;
    init(&own, static_cast<std::uint32_t>(sizeof(CStruct)));
    std::memcpy(&own, &from, sizeof(CStruct));
    own.struct_size = static_cast<std::uint32_t>(sizeof(CStruct));
    return own;
}

// Runs `body`, mapping exceptions to status codes.
template <class Body>
liveprob_status guarded(Body&& body) noexcept {
    try {
        last_error.clear();
        return body();
    } catch (const StructTooSmall& e) {
        return fail(LIVEPROB_STATUS_STRUCT_SIZE, e.what());
    } catch (const std::bad_alloc&) {
        return fail(LIVEPROB_STATUS_OUT_OF_MEMORY, "out of memory");
    } catch (const std::invalid_argument& e) {
        return fail(LIVEPROB_STATUS_INVALID_SETUP, e.what());
    } catch (const std::exception& e) {
        return fail(LIVEPROB_STATUS_INTERNAL, e.what());
    } catch (...) {
        return fail(LIVEPROB_STATUS_INTERNAL, "unknown failure");
    }
}

Period to_period(std::int32_t p) {
    if (p < 0 || p > static_cast<std::int32_t>(Period::finished))
        throw InvalidEvent("period outside liveprob_period");
    return static_cast<Period>(p);
}
Side to_side(std::int32_t s) {
    if (s != LIVEPROB_SIDE_HOME && s != LIVEPROB_SIDE_AWAY)
        throw InvalidEvent("side outside liveprob_side");
    return static_cast<Side>(s);
}
MatchClock to_clock(const liveprob_clock& c) { return MatchClock{to_period(c.period), c.clock_ms}; }

ModelParams to_params(const liveprob_params& c) {
    ModelParams p;
    p.timing.first_half_start = c.first_half_start;
    p.timing.first_half_end = c.first_half_end;
    p.timing.second_half_start = c.second_half_start;
    p.timing.second_half_end = c.second_half_end;
    p.timing.stoppage_factor = c.stoppage_factor;
    p.timing.expected_stoppage_first = c.expected_stoppage_first;
    p.timing.expected_stoppage_second = c.expected_stoppage_second;
    p.timing.extra_time_factor = c.extra_time_factor;
    p.timing.expected_stoppage_extra = c.expected_stoppage_extra;
    p.score_state = {c.score_leading, c.score_level, c.score_trailing};
    p.red_cards = {c.red_own_per_card, c.red_opponent_per_card, c.red_max_cards};
    p.shootout = {c.shootout_conversion, c.shootout_first_kicker_edge};
    p.kappa = c.kappa;
    p.xg_weight = c.xg_weight;
    p.quadrature_nodes = c.quadrature_nodes;
    return p;
}

MessageBody to_body(const liveprob_event& e) {
    const auto& d = e.data;
    switch (e.kind) {
        case LIVEPROB_EVENT_KIND_PERIOD_START: return PeriodStart{to_period(d.period_start.period)};
        case LIVEPROB_EVENT_KIND_PERIOD_END: return PeriodEnd{to_period(d.period_end.period)};
        case LIVEPROB_EVENT_KIND_GOAL:
            return Goal{to_side(d.goal.side), d.goal.penalty != 0, d.goal.own_goal != 0};
        case LIVEPROB_EVENT_KIND_GOAL_CANCELLED: return GoalCancelled{d.goal_cancelled.goal_seq};
        case LIVEPROB_EVENT_KIND_RED_CARD:
            return RedCard{to_side(d.red_card.side), d.red_card.second_yellow != 0};
        case LIVEPROB_EVENT_KIND_CARD_RESCINDED: return CardRescinded{d.card_rescinded.card_seq};
        case LIVEPROB_EVENT_KIND_STOPPAGE:
            return StoppageAnnounced{to_period(d.stoppage.period), d.stoppage.minutes};
        case LIVEPROB_EVENT_KIND_SCORE_CORRECTION:
            return ScoreCorrection{d.score_correction.home_goals, d.score_correction.away_goals};
        case LIVEPROB_EVENT_KIND_SHOOTOUT_KICK:
            return ShootoutKick{to_side(d.shootout_kick.side), d.shootout_kick.scored != 0};
        case LIVEPROB_EVENT_KIND_SHOT_XG: return ShotXg{to_side(d.shot_xg.side), d.shot_xg.xg};
        case LIVEPROB_EVENT_KIND_ABANDONED: return MatchAbandoned{};
        case LIVEPROB_EVENT_KIND_FINAL_WHISTLE: return FinalWhistle{};
        case LIVEPROB_EVENT_KIND_CLOCK: return ClockSync{d.clock.running != 0};
        default: throw InvalidEvent("event kind outside liveprob_event_kind");
    }
}

void copy_outputs(const Outputs& o, liveprob_outputs& c) {
    c.struct_size = static_cast<std::uint32_t>(sizeof(liveprob_outputs));
    c.status = static_cast<std::int32_t>(o.status);
    c.clock = {static_cast<std::int32_t>(o.clock.period), o.clock.clock_ms};
    c.home_goals = o.home_goals;
    c.away_goals = o.away_goals;
    c.home_reds = o.home_reds;
    c.away_reds = o.away_reds;
    c.p_home = o.p_home;
    c.p_draw = o.p_draw;
    c.p_away = o.p_away;
    c.has_advance = o.has_advance ? 1 : 0;
    c.p_advance_home = o.p_advance_home;
    c.p_advance_away = o.p_advance_away;
    c.expected_home_goals = o.expected_home_goals;
    c.expected_away_goals = o.expected_away_goals;
    c.next_goal_home = o.next_goal_home;
    c.next_goal_away = o.next_goal_away;
    c.next_goal_none = o.next_goal_none;
    for (int i = 0; i < kTotalsLines; ++i) c.p_over[i] = o.p_over[static_cast<std::size_t>(i)];
    c.p_both_score = o.p_both_score;
    static_assert(LIVEPROB_GRID == kGrid && LIVEPROB_TOTALS_LINES == kTotalsLines);
    std::memcpy(c.goals_added, o.goals_added.data(), sizeof(c.goals_added));
    c.tail_mass = o.tail_mass;
    c.events_applied = o.events_applied;
}

}  // namespace

extern "C" {

void liveprob_setup_init(liveprob_setup* setup, std::uint32_t size) {
    if (!setup) return;
    liveprob_setup own{};
    own.struct_size = size;
    const CompetitionFormat format;
    own.half_minutes = format.half_minutes;
    own.extra_half_minutes = format.extra_half_minutes;
    std::memcpy(setup, &own, std::min<std::size_t>(size, sizeof own));
}

void liveprob_params_init(liveprob_params* c, std::uint32_t size) {
    if (!c) return;
    const ModelParams p;
    const liveprob_params own{size,
                              p.timing.first_half_start,
                              p.timing.first_half_end,
                              p.timing.second_half_start,
                              p.timing.second_half_end,
                              p.timing.stoppage_factor,
                              p.timing.expected_stoppage_first,
                              p.timing.expected_stoppage_second,
                              p.timing.extra_time_factor,
                              p.timing.expected_stoppage_extra,
                              p.score_state.leading,
                              p.score_state.level,
                              p.score_state.trailing,
                              p.red_cards.own_per_card,
                              p.red_cards.opponent_per_card,
                              p.red_cards.max_cards,
                              p.shootout.conversion,
                              p.shootout.first_kicker_edge,
                              p.kappa,
                              p.xg_weight,
                              p.quadrature_nodes};
    std::memcpy(c, &own, std::min<std::size_t>(size, sizeof own));
}

void liveprob_event_init(liveprob_event* event, std::uint32_t size) {
    if (!event) return;
    liveprob_event own{};
    own.struct_size = size;
    std::memcpy(event, &own, std::min<std::size_t>(size, sizeof own));
}

void liveprob_outputs_init(liveprob_outputs* outputs, std::uint32_t size) {
    if (!outputs) return;
    liveprob_outputs own{};
    own.struct_size = size;
    std::memcpy(outputs, &own, std::min<std::size_t>(size, sizeof own));
}

liveprob_status liveprob_match_create(const liveprob_setup* setup_in, const liveprob_params* params,
                                      liveprob_match** out) {
    return guarded([&] {
        if (!setup_in || !out)
            return fail(LIVEPROB_STATUS_NULL_ARGUMENT, "setup and out are required");
        *out = nullptr;
        const liveprob_setup setup_own = read_grown(*setup_in, liveprob_setup_init, "setup");
        const liveprob_setup* setup = &setup_own;
        MatchSetup s;
        s.prior = PriorMeans{setup->home_goals, setup->away_goals};
        s.format.half_minutes = setup->half_minutes;
        s.format.extra_half_minutes = setup->extra_half_minutes;
        s.format.extra_time = setup->extra_time != 0;
        s.format.shootout = setup->shootout != 0;
        if (setup->has_first_leg) {
            s.format.first_leg =
                FirstLegResult{setup->first_leg_home_goals, setup->first_leg_away_goals};
        }
        const ModelParams p =
            params ? to_params(read_grown(*params, liveprob_params_init, "params")) : ModelParams{};
        *out = new liveprob_match{Match(setup->match_id, s, p)};
        return LIVEPROB_STATUS_OK;
    });
}

liveprob_status liveprob_match_apply(liveprob_match* match, const liveprob_event* event,
                                     liveprob_apply_result* result) {
    return guarded([&] {
        if (!match || !event)
            return fail(LIVEPROB_STATUS_NULL_ARGUMENT, "match and event are required");
        const liveprob_event own = read_grown(*event, liveprob_event_init, "event");
        InboundMessage m;
        try {
            m.header.match_id = match->engine.match_id();
            m.header.source_seq = own.source_seq;
            m.header.source_time_us = own.source_time_us;
            m.header.clock = to_clock(own.clock);
            m.body = to_body(own);
        } catch (const InvalidEvent& e) {
            return fail(LIVEPROB_STATUS_INVALID_EVENT, e.what());
        }
        const ApplyResult r = match->engine.apply(m);
        if (result)
            *result = {static_cast<std::int32_t>(r.verdict), static_cast<std::int32_t>(r.reason)};
        return LIVEPROB_STATUS_OK;
    });
}

liveprob_status liveprob_match_advance(liveprob_match* match, liveprob_clock now,
                                       std::int32_t* moved) {
    return guarded([&] {
        if (!match) return fail(LIVEPROB_STATUS_NULL_ARGUMENT, "match is required");
        MatchClock clock;
        try {
            clock = to_clock(now);
        } catch (const InvalidEvent& e) {
            return fail(LIVEPROB_STATUS_INVALID_EVENT, e.what());
        }
        const bool did = match->engine.advance_to(clock);
        if (moved) *moved = did ? 1 : 0;
        return LIVEPROB_STATUS_OK;
    });
}

liveprob_status liveprob_match_outputs(const liveprob_match* match, liveprob_outputs* out) {
    return guarded([&] {
        if (!match || !out)
            return fail(LIVEPROB_STATUS_NULL_ARGUMENT, "match and out are required");
        if (out->struct_size < sizeof(liveprob_outputs))
            throw StructTooSmall("outputs: struct_size is smaller than this ABI's " +
                                 std::to_string(sizeof(liveprob_outputs)) + " bytes");
        liveprob_outputs own{};
        copy_outputs(match->engine.outputs(), own);
        const std::uint32_t caller_size = out->struct_size;
        std::memcpy(out, &own, sizeof own);  // a newer caller's longer tail is left as it was
        out->struct_size = caller_size;
        return LIVEPROB_STATUS_OK;
    });
}

void liveprob_match_destroy(liveprob_match* match) { delete match; }

const char* liveprob_last_error(void) { return last_error.c_str(); }

const char* liveprob_status_name(liveprob_status status) {
    switch (status) {
        case LIVEPROB_STATUS_OK: return "ok";
        case LIVEPROB_STATUS_NULL_ARGUMENT: return "null_argument";
        case LIVEPROB_STATUS_INVALID_SETUP: return "invalid_setup";
        case LIVEPROB_STATUS_INVALID_EVENT: return "invalid_event";
        case LIVEPROB_STATUS_OUT_OF_MEMORY: return "out_of_memory";
        case LIVEPROB_STATUS_INTERNAL: return "internal";
        case LIVEPROB_STATUS_STRUCT_SIZE: return "struct_size";
    }
    return "unknown";
}

const char* liveprob_reject_reason_name(std::int32_t reason) {
    if (reason < 0 || reason >= kRejectReasonCount) return "unknown";
    return reject_reason_name(static_cast<RejectReason>(reason));
}

std::int32_t liveprob_abi_version(void) { return LIVEPROB_ABI_VERSION; }

const char* liveprob_library_version(void) { return LIVEPROB_LIBRARY_VERSION; }

}  // extern "C"
