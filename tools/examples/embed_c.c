/* Embedding the engine from C: one invented match driven through the C ABI, printing the
 * home/draw/away bar after each event and as the clock runs. Build: part of the CMake build
 * (target liveprob_embed_c); run: ./liveprob_embed_c */
#include <stdio.h>
#include <stdlib.h>

#include "liveprob/capi/liveprob_c.h"

static uint64_t next_seq = 1;

static void print_bar(const liveprob_match* match, const char* what) {
    liveprob_outputs out;
    if (liveprob_match_outputs(match, &out) != LIVEPROB_OK) {
        fprintf(stderr, "embed_c: cannot read outputs: %s\n", liveprob_last_error());
        exit(1);
    }
    printf("%-28s %3u' %d-%d  home %5.1f%%  draw %5.1f%%  away %5.1f%%\n", what,
           (unsigned)(out.clock.clock_ms / 60000u), out.home_goals, out.away_goals,
           100.0 * out.p_home, 100.0 * out.p_draw, 100.0 * out.p_away);
}

static void apply(liveprob_match* match, liveprob_event ev, const char* what) {
    liveprob_apply_result result;
    ev.source_seq = next_seq++;
    if (liveprob_match_apply(match, &ev, &result) != LIVEPROB_OK) {
        fprintf(stderr, "embed_c: %s: %s\n", what, liveprob_last_error());
        exit(1);
    }
    if (result.verdict == LIVEPROB_REJECTED) {
        printf("%-28s rejected: %s\n", what, liveprob_reject_reason_name(result.reason));
        return;
    }
    print_bar(match, what);
}

static liveprob_event event_at(int32_t kind, int32_t period, double minute) {
    liveprob_event ev;
    liveprob_event_init(&ev);
    ev.kind = kind;
    ev.period = period;
    ev.clock.period = period;
    ev.clock.clock_ms = (uint32_t)(minute * 60000.0);
    return ev;
}

int main(void) {
    liveprob_setup setup;
    liveprob_setup_init(&setup);
    setup.match_id = 2024;
    setup.home_goals = 1.55; /* expected regulation goals: invented demo values */
    setup.away_goals = 1.05;

    liveprob_match* match = NULL;
    if (liveprob_match_create(&setup, NULL, &match) != LIVEPROB_OK) {
        fprintf(stderr, "embed_c: cannot create the match: %s\n", liveprob_last_error());
        return 1;
    }
    print_bar(match, "before kick-off");
    apply(match, event_at(LIVEPROB_EVENT_PERIOD_START, LIVEPROB_FIRST_HALF, 0), "kick-off");

    liveprob_event goal = event_at(LIVEPROB_EVENT_GOAL, LIVEPROB_FIRST_HALF, 23);
    goal.side = LIVEPROB_AWAY;
    apply(match, goal, "away goal");

    for (double minute = 30; minute <= 45; minute += 5) {
        liveprob_clock now = {LIVEPROB_FIRST_HALF, (uint32_t)(minute * 60000.0)};
        int32_t moved = 0;
        liveprob_match_advance(match, now, &moved);
        if (moved) print_bar(match, "clock runs");
    }
    apply(match, event_at(LIVEPROB_EVENT_PERIOD_END, LIVEPROB_FIRST_HALF, 47), "half-time");
    apply(match, event_at(LIVEPROB_EVENT_PERIOD_START, LIVEPROB_SECOND_HALF, 45), "second half");

    liveprob_event red = event_at(LIVEPROB_EVENT_RED_CARD, LIVEPROB_SECOND_HALF, 60);
    red.side = LIVEPROB_AWAY;
    apply(match, red, "away red card");

    goal = event_at(LIVEPROB_EVENT_GOAL, LIVEPROB_SECOND_HALF, 78);
    goal.side = LIVEPROB_HOME;
    apply(match, goal, "home goal");

    liveprob_event wrong = event_at(LIVEPROB_EVENT_SHOOTOUT_KICK, LIVEPROB_SECOND_HALF, 80);
    apply(match, wrong, "a kick outside a shoot-out");

    apply(match, event_at(LIVEPROB_EVENT_FINAL_WHISTLE, LIVEPROB_SECOND_HALF, 95), "final whistle");
    liveprob_match_destroy(match);
    return 0;
}
