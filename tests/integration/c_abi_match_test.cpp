// A whole knock-out match driven through the C ABI (the shared library libliveprob), checked step
// by step against the C++ Match API fed the same messages; the ABI's error paths (no exception
// crosses it) and its growable structs (struct_size).
#include <catch2/catch.hpp>

#include <cmath>
#include <cstring>
#include <string>
#include <vector>

#include "feed_builder.hpp"
#include "liveprob/capi/liveprob_c.h"
#include "liveprob/core/match.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;

namespace {

constexpr std::uint64_t kMatch = 77;

struct Step {
    liveprob_event c;
    MessageBody body;
};

liveprob_event c_event(std::uint64_t seq, int32_t kind, Period period, double minute) {
    liveprob_event e;
    liveprob_event_init(&e, sizeof e);
    e.source_seq = seq;
    e.kind = kind;
    const MatchClock clock = at_minute(period, minute);
    e.clock = {static_cast<int32_t>(clock.period), clock.clock_ms};
    return e;
}

void check_same(const liveprob_outputs& c, const Outputs& o) {
    CHECK(c.status == static_cast<int32_t>(o.status));
    CHECK(c.clock.clock_ms == o.clock.clock_ms);
    CHECK(c.home_goals == o.home_goals);
    CHECK(c.away_goals == o.away_goals);
    CHECK(c.home_reds == o.home_reds);
    CHECK(c.p_home == o.p_home);
    CHECK(c.p_draw == o.p_draw);
    CHECK(c.p_away == o.p_away);
    CHECK(c.has_advance == (o.has_advance ? 1 : 0));
    CHECK(c.p_advance_home == o.p_advance_home);
    CHECK(c.expected_away_goals == o.expected_away_goals);
    CHECK(c.next_goal_none == o.next_goal_none);
    CHECK(c.p_over[2] == o.p_over[2]);
    CHECK(c.p_both_score == o.p_both_score);
    CHECK(std::memcmp(c.goals_added, o.goals_added.data(), sizeof(c.goals_added)) == 0);
    CHECK(c.tail_mass == o.tail_mass);
    CHECK(c.events_applied == o.events_applied);
}

}  // namespace

TEST_CASE("a knock-out match through the C ABI equals the C++ engine at every step", "[c_abi]") {
    liveprob_setup setup;
    liveprob_setup_init(&setup, sizeof setup);
    setup.match_id = kMatch;
    setup.home_goals = 1.3;
    setup.away_goals = 1.25;
    setup.extra_time = 1;
    setup.shootout = 1;
    liveprob_params params;
    liveprob_params_init(&params, sizeof params);
    params.kappa = 12.0;

    liveprob_match* handle = nullptr;
    REQUIRE(liveprob_match_create(&setup, &params, &handle) == LIVEPROB_STATUS_OK);
    REQUIRE(handle != nullptr);

    MatchSetup cpp_setup;
    cpp_setup.prior = PriorMeans{1.3, 1.25};
    cpp_setup.format.extra_time = true;
    cpp_setup.format.shootout = true;
    ModelParams cpp_params;
    cpp_params.kappa = 12.0;
    Match reference(kMatch, cpp_setup, cpp_params);

    std::vector<Step> steps;
    std::uint64_t seq = 0;
    auto add = [&](liveprob_event e, MessageBody body) { steps.push_back({e, std::move(body)}); };
    auto period_event = [&](int32_t kind, Period p, double minute) {
        liveprob_event e = c_event(++seq, kind, p, minute);
        if (kind == LIVEPROB_EVENT_KIND_PERIOD_START) {
            e.data.period_start.period = static_cast<int32_t>(p);
            add(e, PeriodStart{p});
        } else {
            e.data.period_end.period = static_cast<int32_t>(p);
            add(e, PeriodEnd{p});
        }
    };
    auto side_event = [&](int32_t kind, Side side, Period p, double minute, int32_t flag) {
        liveprob_event e = c_event(++seq, kind, p, minute);
        const auto s = static_cast<int32_t>(side);
        if (kind == LIVEPROB_EVENT_KIND_GOAL) {
            e.data.goal.side = s;
            e.data.goal.penalty = flag;
            add(e, Goal{side, flag != 0, false});
        } else if (kind == LIVEPROB_EVENT_KIND_RED_CARD) {
            e.data.red_card.side = s;
            e.data.red_card.second_yellow = flag;
            add(e, RedCard{side, flag != 0});
        } else {
            e.data.shootout_kick.side = s;
            e.data.shootout_kick.scored = flag;
            add(e, ShootoutKick{side, flag != 0});
        }
    };

    period_event(LIVEPROB_EVENT_KIND_PERIOD_START, Period::first_half, 0);
    side_event(LIVEPROB_EVENT_KIND_GOAL, Side::home, Period::first_half, 17, 0);
    const std::uint64_t first_goal = seq;
    {
        liveprob_event e = c_event(++seq, LIVEPROB_EVENT_KIND_SHOT_XG, Period::first_half, 20);
        e.data.shot_xg.side = LIVEPROB_SIDE_AWAY;
        e.data.shot_xg.xg = 0.35;
        add(e, ShotXg{Side::away, 0.35});
    }
    {
        liveprob_event e =
            c_event(++seq, LIVEPROB_EVENT_KIND_GOAL_CANCELLED, Period::first_half, 19);
        e.data.goal_cancelled.goal_seq = first_goal;
        add(e, GoalCancelled{first_goal});
    }
    {
        liveprob_event e = c_event(++seq, LIVEPROB_EVENT_KIND_STOPPAGE, Period::first_half, 45);
        e.data.stoppage.period = LIVEPROB_PERIOD_FIRST_HALF;
        e.data.stoppage.minutes = 2;
        add(e, StoppageAnnounced{Period::first_half, 2});
    }
    period_event(LIVEPROB_EVENT_KIND_PERIOD_END, Period::first_half, 47);
    period_event(LIVEPROB_EVENT_KIND_PERIOD_START, Period::second_half, 45);
    side_event(LIVEPROB_EVENT_KIND_RED_CARD, Side::away, Period::second_half, 55, 1);
    const std::uint64_t card = seq;
    side_event(LIVEPROB_EVENT_KIND_GOAL, Side::away, Period::second_half, 70, 0);
    side_event(LIVEPROB_EVENT_KIND_GOAL, Side::home, Period::second_half, 86, 1);
    {
        liveprob_event e =
            c_event(++seq, LIVEPROB_EVENT_KIND_CARD_RESCINDED, Period::second_half, 88);
        e.data.card_rescinded.card_seq = card;
        add(e, CardRescinded{card});
    }
    {
        liveprob_event e = c_event(++seq, LIVEPROB_EVENT_KIND_CLOCK, Period::second_half, 89);
        e.data.clock.running = 1;
        add(e, ClockSync{true});
    }
    period_event(LIVEPROB_EVENT_KIND_PERIOD_END, Period::second_half, 94);
    period_event(LIVEPROB_EVENT_KIND_PERIOD_START, Period::extra_first, 90);
    period_event(LIVEPROB_EVENT_KIND_PERIOD_END, Period::extra_first, 106);
    period_event(LIVEPROB_EVENT_KIND_PERIOD_START, Period::extra_second, 105);
    {
        liveprob_event e =
            c_event(++seq, LIVEPROB_EVENT_KIND_SCORE_CORRECTION, Period::extra_second, 110);
        e.data.score_correction.home_goals = 2;
        e.data.score_correction.away_goals = 2;
        add(e, ScoreCorrection{2, 2});
    }
    period_event(LIVEPROB_EVENT_KIND_PERIOD_END, Period::extra_second, 121);
    period_event(LIVEPROB_EVENT_KIND_PERIOD_START, Period::shootout, 120);
    const int kicks[][2] = {{1, 1}, {1, 0}, {0, 1}, {1, 1}, {1, 0}};  // away first: away, home
    for (const auto& pair : kicks) {
        side_event(LIVEPROB_EVENT_KIND_SHOOTOUT_KICK, Side::away, Period::shootout, 120, pair[0]);
        side_event(LIVEPROB_EVENT_KIND_SHOOTOUT_KICK, Side::home, Period::shootout, 120, pair[1]);
    }
    add(c_event(++seq, LIVEPROB_EVENT_KIND_FINAL_WHISTLE, Period::shootout, 120), FinalWhistle{});

    int shown = 0;
    for (const auto& step : steps) {
        INFO("step " << step.c.source_seq << " " << kind_name(step.body));
        liveprob_apply_result result{};
        REQUIRE(liveprob_match_apply(handle, &step.c, &result) == LIVEPROB_STATUS_OK);
        InboundMessage m;
        m.header.match_id = kMatch;
        m.header.source_seq = step.c.source_seq;
        m.header.clock =
            MatchClock{static_cast<Period>(step.c.clock.period), step.c.clock.clock_ms};
        m.body = step.body;
        const ApplyResult expected = reference.apply(m);
        CHECK(result.verdict == static_cast<int32_t>(expected.verdict));
        CHECK(result.reason == static_cast<int32_t>(expected.reason));
        CHECK(result.verdict == LIVEPROB_VERDICT_ACCEPTED);
        liveprob_outputs out;
        liveprob_outputs_init(&out, sizeof out);
        REQUIRE(liveprob_match_outputs(handle, &out) == LIVEPROB_STATUS_OK);
        check_same(out, reference.outputs());
        if (step.c.kind == LIVEPROB_EVENT_KIND_GOAL) {
            // The clock runs between events in both.
            int32_t moved = -1;
            const MatchClock later{static_cast<Period>(step.c.clock.period),
                                   step.c.clock.clock_ms + 60'000};
            REQUIRE(liveprob_match_advance(handle, {step.c.clock.period, later.clock_ms}, &moved) ==
                    LIVEPROB_STATUS_OK);
            CHECK(moved == (reference.advance_to(later) ? 1 : 0));
            CHECK(moved == 1);
            REQUIRE(liveprob_match_outputs(handle, &out) == LIVEPROB_STATUS_OK);
            check_same(out, reference.outputs());
        }
        ++shown;
    }
    CHECK(shown == static_cast<int>(steps.size()));

    liveprob_outputs final_out;
    liveprob_outputs_init(&final_out, sizeof final_out);
    REQUIRE(liveprob_match_outputs(handle, &final_out) == LIVEPROB_STATUS_OK);
    CHECK(final_out.status == LIVEPROB_MATCH_STATUS_ENDED);
    CHECK(final_out.home_goals == 2);
    CHECK(final_out.away_goals == 2);
    CHECK(final_out.home_reds == 0);
    // Shoot-out: away 4 of 5, home 3 of 5.
    CHECK(final_out.p_advance_away == 1.0);
    CHECK(final_out.p_advance_home == 0.0);

    // A duplicate and a kick after the end, through the ABI.
    liveprob_apply_result result{};
    REQUIRE(liveprob_match_apply(handle, &steps.front().c, &result) == LIVEPROB_STATUS_OK);
    CHECK(result.verdict == LIVEPROB_VERDICT_DUPLICATE);
    liveprob_event after = c_event(++seq, LIVEPROB_EVENT_KIND_SHOOTOUT_KICK, Period::shootout, 120);
    REQUIRE(liveprob_match_apply(handle, &after, &result) == LIVEPROB_STATUS_OK);
    CHECK(result.verdict == LIVEPROB_VERDICT_REJECTED);
    CHECK(std::string(liveprob_reject_reason_name(result.reason)) == "after_final_whistle");
    liveprob_match_destroy(handle);
}

TEST_CASE("the C ABI reports errors as codes with a message", "[c_abi]") {
    liveprob_setup setup;
    liveprob_setup_init(&setup, sizeof setup);
    CHECK(setup.half_minutes == 45);
    liveprob_match* handle = nullptr;
    CHECK(liveprob_match_create(nullptr, nullptr, &handle) == LIVEPROB_STATUS_NULL_ARGUMENT);
    CHECK(std::string(liveprob_last_error()).size() > 0);

    setup.home_goals = -1.0;  // no usable prior
    setup.away_goals = 1.0;
    CHECK(liveprob_match_create(&setup, nullptr, &handle) == LIVEPROB_STATUS_INVALID_SETUP);
    CHECK(handle == nullptr);
    CHECK(std::string(liveprob_last_error()).find("prior") != std::string::npos);

    liveprob_params params;
    liveprob_params_init(&params, sizeof params);
    params.quadrature_nodes = 0;
    setup.home_goals = 1.0;
    CHECK(liveprob_match_create(&setup, &params, &handle) != LIVEPROB_STATUS_OK);
    CHECK(handle == nullptr);

    REQUIRE(liveprob_match_create(&setup, nullptr, &handle) == LIVEPROB_STATUS_OK);
    CHECK(std::string(liveprob_last_error()).empty());
    liveprob_event e = c_event(1, 99, Period::first_half, 0);
    CHECK(liveprob_match_apply(handle, &e, nullptr) == LIVEPROB_STATUS_INVALID_EVENT);
    e = c_event(1, LIVEPROB_EVENT_KIND_GOAL, Period::first_half, 3);
    e.data.goal.side = 5;
    CHECK(liveprob_match_apply(handle, &e, nullptr) == LIVEPROB_STATUS_INVALID_EVENT);
    e = c_event(1, LIVEPROB_EVENT_KIND_PERIOD_START, Period::first_half, 0);
    e.clock.period = -3;
    CHECK(liveprob_match_apply(handle, &e, nullptr) == LIVEPROB_STATUS_INVALID_EVENT);
    CHECK(liveprob_match_apply(handle, nullptr, nullptr) == LIVEPROB_STATUS_NULL_ARGUMENT);
    CHECK(liveprob_match_advance(handle, {42, 0}, nullptr) == LIVEPROB_STATUS_INVALID_EVENT);
    CHECK(liveprob_match_outputs(handle, nullptr) == LIVEPROB_STATUS_NULL_ARGUMENT);
    liveprob_outputs out;
    liveprob_outputs_init(&out, sizeof out);
    REQUIRE(liveprob_match_outputs(handle, &out) == LIVEPROB_STATUS_OK);
    CHECK(out.events_applied == 0);  // nothing invalid was applied
    CHECK(out.p_home + out.p_draw + out.p_away == Approx(1.0).margin(1e-12));
    liveprob_match_destroy(handle);
    liveprob_match_destroy(nullptr);

    CHECK(std::string(liveprob_status_name(LIVEPROB_STATUS_INVALID_EVENT)) == "invalid_event");
    CHECK(std::string(liveprob_reject_reason_name(-1)) == "unknown");
    CHECK(liveprob_abi_version() == LIVEPROB_ABI_VERSION);
    CHECK(std::string(liveprob_library_version()).find('.') != std::string::npos);
}

TEST_CASE("the C ABI's structs carry their size: a short one is refused, a longer one accepted",
          "[c_abi]") {
    liveprob_setup setup;
    liveprob_setup_init(&setup, sizeof setup);
    CHECK(setup.struct_size == sizeof setup);
    setup.home_goals = 1.4;
    setup.away_goals = 1.1;
    liveprob_match* handle = nullptr;

    // A caller built against an older, shorter struct than this library's: refused by name.
    liveprob_setup short_setup = setup;
    short_setup.struct_size = sizeof setup - 8;
    CHECK(liveprob_match_create(&short_setup, nullptr, &handle) == LIVEPROB_STATUS_STRUCT_SIZE);
    CHECK(handle == nullptr);
    CHECK(std::string(liveprob_last_error()).find("setup") != std::string::npos);

    // A caller built against a newer header whose setup grew at its end: the library reads its
    // own fields and ignores the tail.
    struct GrownSetup {
        liveprob_setup known;
        double later_field;
    } grown{};
    liveprob_setup_init(&grown.known, sizeof grown);
    CHECK(grown.known.struct_size == sizeof grown);
    grown.known.home_goals = 1.4;
    grown.known.away_goals = 1.1;
    grown.later_field = 123.0;
    REQUIRE(liveprob_match_create(&grown.known, nullptr, &handle) == LIVEPROB_STATUS_OK);

    struct GrownOutputs {
        liveprob_outputs known;
        double later_field;
    } grown_out{};
    liveprob_outputs_init(&grown_out.known, sizeof grown_out);
    grown_out.later_field = -7.0;
    REQUIRE(liveprob_match_outputs(handle, &grown_out.known) == LIVEPROB_STATUS_OK);
    CHECK(grown_out.known.struct_size == sizeof grown_out);
    CHECK(grown_out.later_field == -7.0);  // the tail this library does not know is untouched
    CHECK(grown_out.known.p_home + grown_out.known.p_draw + grown_out.known.p_away ==
          Approx(1.0).margin(1e-12));

    liveprob_outputs short_out;
    liveprob_outputs_init(&short_out, sizeof short_out);
    short_out.struct_size = 16;
    CHECK(liveprob_match_outputs(handle, &short_out) == LIVEPROB_STATUS_STRUCT_SIZE);
    CHECK(std::string(liveprob_status_name(LIVEPROB_STATUS_STRUCT_SIZE)) == "struct_size");

    liveprob_event e = c_event(1, LIVEPROB_EVENT_KIND_PERIOD_START, Period::first_half, 0);
    e.data.period_start.period = LIVEPROB_PERIOD_FIRST_HALF;
    e.struct_size = 4;
    CHECK(liveprob_match_apply(handle, &e, nullptr) == LIVEPROB_STATUS_STRUCT_SIZE);
    e.struct_size = sizeof e;
    liveprob_apply_result result{};
    REQUIRE(liveprob_match_apply(handle, &e, &result) == LIVEPROB_STATUS_OK);
    CHECK(result.verdict == LIVEPROB_VERDICT_ACCEPTED);
    liveprob_match_destroy(handle);
}
