/* Embedding the engine from C: one invented match driven through the C ABI (libliveprob),
 * printing the home/draw/away bar after each event and as the clock runs. Build: part of the
 * CMake build (target liveprob_embed_c); tests/packaging builds the same file against an
 * installed prefix (find_package and pkg-config) and compares its output with this build's.
 * Run: ./liveprob_embed_c */
#include <stdio.h>
#include <stdlib.h>

#include "liveprob/capi/liveprob_c.h"

static uint64_t next_seq = 1;

static void print_bar(const liveprob_match* match, const char* what) {
    liveprob_outputs out;
    liveprob_outputs_init(&out, sizeof out);
    if (liveprob_match_outputs(match, &out) != LIVEPROB_STATUS_OK) {
        fprintf(stderr, "embed_c: cannot read outputs: %s\n", liveprob_last_error());
        exit(1);
    }
    printf("%-28s %3u' %d-%d  home %.12f  draw %.12f  away %.12f  next-goal-none %.12f\n", what,
           (unsigned)(out.clock.clock_ms / 60000u), out.home_goals, out.away_goals, out.p_home,
           out.p_draw, out.p_away, out.next_goal_none);
}

static void apply(liveprob_match* match, liveprob_event ev, const char* what) {
    liveprob_apply_result result;
    ev.source_seq = next_seq++;
    if (liveprob_match_apply(match, &ev, &result) != LIVEPROB_STATUS_OK) {
        fprintf(stderr, "embed_c: %s: %s\n", what, liveprob_last_error());
        exit(1);
    }
    if (result.verdict == LIVEPROB_VERDICT_REJECTED) {
        printf("%-28s rejected: %s\n", what, liveprob_reject_reason_name(result.reason));
        return;
    }
    print_bar(match, what);
}

static liveprob_event event_at(liveprob_event_kind kind, liveprob_period period, double minute) {
    liveprob_event ev;
    liveprob_event_init(&ev, sizeof ev);
    ev.kind = kind;
    ev.clock.period = period;
    ev.clock.clock_ms = (uint32_t)(minute * 60000.0);
    return ev;
}

static liveprob_event period_event(liveprob_event_kind kind, liveprob_period period,
                                   double minute) {
    liveprob_event ev = event_at(kind, period, minute);
    if (kind == LIVEPROB_EVENT_KIND_PERIOD_START) ev.data.period_start.period = period;
    else ev.data.period_end.period = period;
    return ev;
}

int main(void) {
    if (liveprob_abi_version() != LIVEPROB_ABI_VERSION) {
        fprintf(stderr, "embed_c: built for C ABI %d, the library has %d\n", LIVEPROB_ABI_VERSION,
                (int)liveprob_abi_version());
        return 1;
    }
    liveprob_setup setup;
    liveprob_setup_init(&setup, sizeof setup);
    setup.match_id = 2024;
    setup.home_goals = 1.55; /* expected regulation goals: invented demo values */
    setup.away_goals = 1.05;

    liveprob_match* match = NULL;
    if (liveprob_match_create(&setup, NULL, &match) != LIVEPROB_STATUS_OK) {
        fprintf(stderr, "embed_c: cannot create the match: %s\n", liveprob_last_error());
        return 1;
    }
    print_bar(match, "before kick-off");
    apply(match, period_event(LIVEPROB_EVENT_KIND_PERIOD_START, LIVEPROB_PERIOD_FIRST_HALF, 0),
          "kick-off");

    liveprob_event goal = event_at(LIVEPROB_EVENT_KIND_GOAL, LIVEPROB_PERIOD_FIRST_HALF, 23);
    goal.data.goal.side = LIVEPROB_SIDE_AWAY;
    apply(match, goal, "away goal");

    for (double minute = 30; minute <= 45; minute += 5) {
        liveprob_clock now = {LIVEPROB_PERIOD_FIRST_HALF, (uint32_t)(minute * 60000.0)};
        int32_t moved = 0;
        liveprob_match_advance(match, now, &moved);
        if (moved) print_bar(match, "clock runs");
    }
    apply(match, period_event(LIVEPROB_EVENT_KIND_PERIOD_END, LIVEPROB_PERIOD_FIRST_HALF, 47),
          "half-time");
    apply(match, period_event(LIVEPROB_EVENT_KIND_PERIOD_START, LIVEPROB_PERIOD_SECOND_HALF, 45),
          "second half");

    liveprob_event red = event_at(LIVEPROB_EVENT_KIND_RED_CARD, LIVEPROB_PERIOD_SECOND_HALF, 60);
    red.data.red_card.side = LIVEPROB_SIDE_AWAY;
    apply(match, red, "away red card");

    goal = event_at(LIVEPROB_EVENT_KIND_GOAL, LIVEPROB_PERIOD_SECOND_HALF, 78);
    goal.data.goal.side = LIVEPROB_SIDE_HOME;
    goal.data.goal.penalty = 1;
    apply(match, goal, "home penalty goal");

    for (double minute = 80; minute <= 90; minute += 5) {
        liveprob_clock now = {LIVEPROB_PERIOD_SECOND_HALF, (uint32_t)(minute * 60000.0)};
        liveprob_match_advance(match, now, NULL);
        print_bar(match, "clock runs");
    }
    liveprob_event wrong =
        event_at(LIVEPROB_EVENT_KIND_SHOOTOUT_KICK, LIVEPROB_PERIOD_SECOND_HALF, 91);
    apply(match, wrong, "a kick outside a shoot-out");

    apply(match, event_at(LIVEPROB_EVENT_KIND_FINAL_WHISTLE, LIVEPROB_PERIOD_SECOND_HALF, 95),
          "final whistle");
    liveprob_match_destroy(match);
    return 0;
}
