/* The engine's C ABI: one match in process, for hosts written in other languages (graphics
 * systems, scripting runtimes). Plain structs and enums; no C++ type and no exception crosses
 * it. Every function returns a liveprob_status; outputs are written through pointers.
 *
 *   liveprob_setup setup; liveprob_setup_init(&setup);
 *   setup.match_id = 7; setup.home_goals = 1.5; setup.away_goals = 1.1;
 *   liveprob_match* match = NULL;
 *   if (liveprob_match_create(&setup, NULL, &match) != LIVEPROB_OK) ...;
 *   liveprob_event ev; liveprob_event_init(&ev);
 *   ev.kind = LIVEPROB_EVENT_PERIOD_START; ev.source_seq = 1; ev.period = LIVEPROB_FIRST_HALF;
 *   liveprob_apply_result result; liveprob_match_apply(match, &ev, &result);
 *   liveprob_clock now = {LIVEPROB_FIRST_HALF, 600000}; liveprob_match_advance(match, now, NULL);
 *   liveprob_outputs out; liveprob_match_outputs(match, &out);
 *   liveprob_match_destroy(match);
 *
 * The semantics (duplicates, late events, rejections, clock) are those of liveprob::core::Match in
 * match.hpp; engine/README.md ("Embedding") describes them. A handle is not thread-safe: use
 * one thread per handle at a time; distinct handles are independent. */
#ifndef LIVEPROB_ENGINE_LIVEPROB_C_H
#define LIVEPROB_ENGINE_LIVEPROB_C_H

#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#define LIVEPROB_C_ABI_VERSION 1
#define LIVEPROB_C_GRID 16        /* score-grid cells per side (goals still to come 0..15) */
#define LIVEPROB_C_TOTALS_LINES 6 /* totals lines 0.5 .. 5.5 */

typedef enum liveprob_status {
    LIVEPROB_OK = 0,
    LIVEPROB_ERR_NULL_ARGUMENT = 1, /* a required pointer was NULL */
    LIVEPROB_ERR_INVALID_SETUP = 2, /* the setup or parameters are unusable */
    LIVEPROB_ERR_INVALID_EVENT = 3, /* unknown event kind or field value outside its enum */
    LIVEPROB_ERR_OUT_OF_MEMORY = 4,
    LIVEPROB_ERR_INTERNAL = 5 /* an unexpected failure inside the engine */
    /* liveprob_last_error() says more in each case */
} liveprob_status;

typedef enum liveprob_period {
    LIVEPROB_PRE_MATCH = 0,
    LIVEPROB_FIRST_HALF = 1,
    LIVEPROB_SECOND_HALF = 2,
    LIVEPROB_EXTRA_FIRST = 3,
    LIVEPROB_EXTRA_SECOND = 4,
    LIVEPROB_SHOOTOUT = 5,
    LIVEPROB_FINISHED = 6
} liveprob_period;

typedef enum liveprob_side { LIVEPROB_HOME = 0, LIVEPROB_AWAY = 1 } liveprob_side;

typedef struct liveprob_clock {
    int32_t period;    /* a liveprob_period */
    uint32_t clock_ms; /* running match clock: the second half starts at 45:00 = 2700000 */
} liveprob_clock;

typedef struct liveprob_setup {
    uint64_t match_id;
    double home_goals; /* expected regulation goals (the prior), > 0 */
    double away_goals;
    uint16_t half_minutes;         /* 45 */
    uint16_t extra_half_minutes;   /* 15 */
    int32_t extra_time;            /* 0/1: extra time when level after regulation */
    int32_t shootout;              /* 0/1: penalty shoot-out when still level */
    int32_t has_first_leg;         /* 0/1: this is the second leg of a two-legged tie */
    uint16_t first_leg_home_goals; /* first-leg goals of THIS match's home side */
    uint16_t first_leg_away_goals;
} liveprob_setup;

/* Model parameters (see engine/include/liveprob/core/params.hpp for each one's meaning and
 * source). liveprob_params_init fills the built-in defaults. kappa may be INFINITY. */
typedef struct liveprob_params {
    double first_half_start, first_half_end, second_half_start, second_half_end;
    double stoppage_factor;
    double expected_stoppage_first, expected_stoppage_second;
    double extra_time_factor, expected_stoppage_extra;
    double score_leading, score_level, score_trailing;
    double red_own_per_card, red_opponent_per_card;
    int32_t red_max_cards;
    double shootout_conversion, shootout_first_kicker_edge;
    double kappa;
    double xg_weight;
    int32_t quadrature_nodes;
} liveprob_params;

typedef enum liveprob_event_kind {
    LIVEPROB_EVENT_PERIOD_START = 1,     /* period */
    LIVEPROB_EVENT_PERIOD_END = 2,       /* period */
    LIVEPROB_EVENT_GOAL = 3,             /* side, flag = penalty */
    LIVEPROB_EVENT_GOAL_CANCELLED = 4,   /* ref_seq = the goal's source_seq */
    LIVEPROB_EVENT_RED_CARD = 5,         /* side, flag = second yellow */
    LIVEPROB_EVENT_CARD_RESCINDED = 6,   /* ref_seq = the card's source_seq */
    LIVEPROB_EVENT_STOPPAGE = 7,         /* period, minutes */
    LIVEPROB_EVENT_SCORE_CORRECTION = 8, /* home_goals, away_goals (absolute) */
    LIVEPROB_EVENT_SHOOTOUT_KICK = 9,    /* side, flag = scored */
    LIVEPROB_EVENT_SHOT_XG = 10,         /* side, xg */
    LIVEPROB_EVENT_ABANDONED = 11,
    LIVEPROB_EVENT_FINAL_WHISTLE = 12,
    LIVEPROB_EVENT_CLOCK = 13 /* flag = clock running */
} liveprob_event_kind;

typedef struct liveprob_event {
    uint64_t source_seq;    /* per match, from the feed: the de-duplication key */
    int64_t source_time_us; /* feed wall time, microseconds since the Unix epoch */
    liveprob_clock clock;   /* match clock when the event was produced */
    int32_t kind;           /* a liveprob_event_kind */
    int32_t side;           /* a liveprob_side */
    int32_t period;         /* a liveprob_period */
    int32_t flag;
    uint64_t ref_seq;
    uint16_t home_goals, away_goals;
    uint16_t minutes;
    double xg;
} liveprob_event;

typedef enum liveprob_verdict {
    LIVEPROB_ACCEPTED = 0,
    LIVEPROB_LATE = 1,      /* older than the newest event: inserted, state re-folded */
    LIVEPROB_DUPLICATE = 2, /* source_seq already seen: nothing changed */
    LIVEPROB_REJECTED = 3   /* impossible; reason says why (liveprob_reject_reason_name) */
} liveprob_verdict;

typedef struct liveprob_apply_result {
    int32_t verdict; /* a liveprob_verdict */
    int32_t reason;  /* 0 unless rejected; stable codes, see liveprob_reject_reason_name */
} liveprob_apply_result;

typedef enum liveprob_match_status {
    LIVEPROB_NOT_STARTED = 0,
    LIVEPROB_IN_PLAY = 1,
    LIVEPROB_INTERVAL = 2,
    LIVEPROB_IN_SHOOTOUT = 3,
    LIVEPROB_ENDED = 4,
    LIVEPROB_ABANDONED = 5
} liveprob_match_status;

typedef struct liveprob_outputs {
    int32_t status; /* a liveprob_match_status */
    liveprob_clock clock;
    int32_t home_goals, away_goals, home_reds, away_reds;
    double p_home, p_draw, p_away; /* result at full time */
    int32_t has_advance;           /* 1 when the format needs a winner */
    double p_advance_home, p_advance_away;
    double expected_home_goals, expected_away_goals;
    double next_goal_home, next_goal_away, next_goal_none;
    double p_over[LIVEPROB_C_TOTALS_LINES]; /* P(total > 0.5 + i) */
    double p_both_score;
    double goals_added[LIVEPROB_C_GRID][LIVEPROB_C_GRID]; /* [home adds i][away adds j] */
    double tail_mass;
    uint64_t events_applied;
} liveprob_outputs;

typedef struct liveprob_match liveprob_match; /* opaque */

void liveprob_setup_init(liveprob_setup* setup);
void liveprob_params_init(liveprob_params* params);
void liveprob_event_init(liveprob_event* event);

/* params may be NULL (built-in defaults). On success *out owns a new match. */
liveprob_status liveprob_match_create(const liveprob_setup* setup, const liveprob_params* params,
                                      liveprob_match** out);
liveprob_status liveprob_match_apply(liveprob_match* match, const liveprob_event* event,
                                     liveprob_apply_result* result /* may be NULL */);
/* moved (may be NULL) is set to 1 when the clock moved, 0 when it could not (see match.hpp). */
liveprob_status liveprob_match_advance(liveprob_match* match, liveprob_clock now, int32_t* moved);
liveprob_status liveprob_match_outputs(const liveprob_match* match, liveprob_outputs* out);
void liveprob_match_destroy(liveprob_match* match); /* NULL is allowed */

/* The calling thread's last error as one line of text ("" after a call that succeeded);
 * valid until this thread's next call. */
const char* liveprob_last_error(void);
const char* liveprob_status_name(liveprob_status status);
const char* liveprob_reject_reason_name(int32_t reason);
int32_t liveprob_c_abi_version(void);

#ifdef __cplusplus
}
#endif

#endif /* LIVEPROB_ENGINE_LIVEPROB_C_H */
