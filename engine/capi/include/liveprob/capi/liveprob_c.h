/* The engine's C ABI (shared library libliveprob, ABI version 2): one match in process, for hosts
 * written in other languages (graphics systems, scripting runtimes). Plain structs and enums; no
 * C++ type and no exception crosses it. Every call that can fail returns a liveprob_status;
 * outputs are written through pointers.
 *
 *   liveprob_setup setup; liveprob_setup_init(&setup, sizeof setup);
 *   setup.match_id = 7; setup.home_goals = 1.5; setup.away_goals = 1.1;
 *   liveprob_match* match = NULL;
 *   if (liveprob_match_create(&setup, NULL, &match) != LIVEPROB_STATUS_OK) ...;
 *   liveprob_event ev; liveprob_event_init(&ev, sizeof ev);
 *   ev.kind = LIVEPROB_EVENT_KIND_PERIOD_START; ev.source_seq = 1;
 *   ev.data.period_start.period = LIVEPROB_PERIOD_FIRST_HALF;
 *   liveprob_apply_result result; liveprob_match_apply(match, &ev, &result);
 *   liveprob_clock now = {LIVEPROB_PERIOD_FIRST_HALF, 600000};
 *   liveprob_match_advance(match, now, NULL);
 *   liveprob_outputs out; liveprob_outputs_init(&out, sizeof out);
 *   liveprob_match_outputs(match, &out);
 *   liveprob_match_destroy(match);
 *
 * Growing structs: setup, params, event and outputs start with `struct_size`, which the caller
 * sets (the *_init calls do) to the size of the struct as its header declares it. The library
 * reads and writes only that many bytes, so a program built against this header keeps working
 * with a later library whose structs have grown at their end; a size below this version's is
 * refused with LIVEPROB_STATUS_STRUCT_SIZE. Handles are opaque.
 *
 * Compatibility: the shared library's SONAME carries the ABI version (libliveprob.so.2);
 * liveprob_abi_version() returns it at run time, to compare with LIVEPROB_ABI_VERSION from the
 * header the caller was compiled against.
 *
 * The semantics (duplicates, late events, rejections, clock) are those of liveprob::core::Match
 * in match.hpp; engine/README.md ("Embedding") describes them. A handle is not thread-safe: use
 * one thread per handle at a time; distinct handles are independent. */
#ifndef LIVEPROB_ENGINE_LIVEPROB_C_H
#define LIVEPROB_ENGINE_LIVEPROB_C_H

#include <stdint.h>

/* Only what carries LIVEPROB_API is exported from the shared library (it is built with hidden
 * visibility and a linker version script that keeps liveprob_* alone). */
#if defined(_WIN32)
#if defined(LIVEPROB_C_BUILDING)
#define LIVEPROB_API __declspec(dllexport)
#else
#define LIVEPROB_API __declspec(dllimport)
#endif
#else
#define LIVEPROB_API __attribute__((visibility("default")))
#endif

#ifdef __cplusplus
extern "C" {
#endif

#define LIVEPROB_ABI_VERSION 2
#define LIVEPROB_GRID 16        /* score-grid cells per side (goals still to come 0..15) */
#define LIVEPROB_TOTALS_LINES 6 /* totals lines 0.5 .. 5.5 */

typedef enum liveprob_status {
    LIVEPROB_STATUS_OK = 0,
    LIVEPROB_STATUS_NULL_ARGUMENT = 1, /* a required pointer was NULL */
    LIVEPROB_STATUS_INVALID_SETUP = 2, /* the setup or parameters are unusable */
    LIVEPROB_STATUS_INVALID_EVENT = 3, /* unknown event kind or field value outside its enum */
    LIVEPROB_STATUS_OUT_OF_MEMORY = 4,
    LIVEPROB_STATUS_INTERNAL = 5,   /* an unexpected failure inside the engine */
    LIVEPROB_STATUS_STRUCT_SIZE = 6 /* struct_size smaller than this ABI version's struct */
    /* liveprob_last_error() says more in each case */
} liveprob_status;

typedef enum liveprob_period {
    LIVEPROB_PERIOD_PRE_MATCH = 0,
    LIVEPROB_PERIOD_FIRST_HALF = 1,
    LIVEPROB_PERIOD_SECOND_HALF = 2,
    LIVEPROB_PERIOD_EXTRA_FIRST = 3,
    LIVEPROB_PERIOD_EXTRA_SECOND = 4,
    LIVEPROB_PERIOD_SHOOTOUT = 5,
    LIVEPROB_PERIOD_FINISHED = 6
} liveprob_period;

typedef enum liveprob_side { LIVEPROB_SIDE_HOME = 0, LIVEPROB_SIDE_AWAY = 1 } liveprob_side;

typedef struct liveprob_clock {
    int32_t period;    /* a liveprob_period */
    uint32_t clock_ms; /* running match clock: the second half starts at 45:00 = 2700000 */
} liveprob_clock;

typedef struct liveprob_setup {
    uint32_t struct_size; /* sizeof(liveprob_setup) as the caller sees it */
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

/* Model parameters (see engine/core/include/liveprob/core/params.hpp for each one's meaning and
 * source). liveprob_params_init fills the built-in defaults. kappa may be INFINITY. */
typedef struct liveprob_params {
    uint32_t struct_size; /* sizeof(liveprob_params) as the caller sees it */
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
    LIVEPROB_EVENT_KIND_PERIOD_START = 1,     /* data.period_start */
    LIVEPROB_EVENT_KIND_PERIOD_END = 2,       /* data.period_end */
    LIVEPROB_EVENT_KIND_GOAL = 3,             /* data.goal */
    LIVEPROB_EVENT_KIND_GOAL_CANCELLED = 4,   /* data.goal_cancelled */
    LIVEPROB_EVENT_KIND_RED_CARD = 5,         /* data.red_card */
    LIVEPROB_EVENT_KIND_CARD_RESCINDED = 6,   /* data.card_rescinded */
    LIVEPROB_EVENT_KIND_STOPPAGE = 7,         /* data.stoppage */
    LIVEPROB_EVENT_KIND_SCORE_CORRECTION = 8, /* data.score_correction */
    LIVEPROB_EVENT_KIND_SHOOTOUT_KICK = 9,    /* data.shootout_kick */
    LIVEPROB_EVENT_KIND_SHOT_XG = 10,         /* data.shot_xg */
    LIVEPROB_EVENT_KIND_ABANDONED = 11,       /* no data */
    LIVEPROB_EVENT_KIND_FINAL_WHISTLE = 12,   /* no data */
    LIVEPROB_EVENT_KIND_CLOCK = 13            /* data.clock */
} liveprob_event_kind;

/* One in-play event: the header fields, then `kind` says which member of `data` holds its
 * fields (a tagged union; the other members are meaningless for that kind). */
typedef struct liveprob_event {
    uint32_t struct_size;   /* sizeof(liveprob_event) as the caller sees it */
    int32_t kind;           /* a liveprob_event_kind: the tag of `data` */
    uint64_t source_seq;    /* per match, from the feed: the de-duplication key */
    int64_t source_time_us; /* feed wall time, microseconds since the Unix epoch */
    liveprob_clock clock;   /* match clock when the event was produced */
    union {
        struct {
            int32_t period; /* a liveprob_period */
        } period_start, period_end;
        struct {
            int32_t side; /* a liveprob_side: the side credited with the goal */
            int32_t penalty;
            int32_t own_goal;
        } goal;
        struct {
            uint64_t goal_seq; /* the cancelled goal's source_seq */
        } goal_cancelled;
        struct {
            int32_t side;
            int32_t second_yellow;
        } red_card;
        struct {
            uint64_t card_seq; /* the rescinded card's source_seq */
        } card_rescinded;
        struct {
            int32_t period;
            uint16_t minutes; /* announced added minutes */
        } stoppage;
        struct {
            uint16_t home_goals, away_goals; /* the absolute score */
        } score_correction;
        struct {
            int32_t side;
            int32_t scored;
        } shootout_kick;
        struct {
            int32_t side;
            double xg;
        } shot_xg;
        struct {
            int32_t running; /* 0/1: the match clock is running */
        } clock;
        unsigned char reserved[64]; /* room for later kinds without changing the struct's size */
    } data;
} liveprob_event;

typedef enum liveprob_verdict {
    LIVEPROB_VERDICT_ACCEPTED = 0,
    LIVEPROB_VERDICT_LATE = 1,      /* older than the newest event: inserted, state re-folded */
    LIVEPROB_VERDICT_DUPLICATE = 2, /* source_seq already seen: nothing changed */
    LIVEPROB_VERDICT_REJECTED = 3   /* impossible; reason says why (liveprob_reject_reason_name) */
} liveprob_verdict;

typedef struct liveprob_apply_result {
    int32_t verdict; /* a liveprob_verdict */
    int32_t reason;  /* 0 unless rejected; stable codes, see liveprob_reject_reason_name */
} liveprob_apply_result;

typedef enum liveprob_match_status {
    LIVEPROB_MATCH_STATUS_NOT_STARTED = 0,
    LIVEPROB_MATCH_STATUS_IN_PLAY = 1,
    LIVEPROB_MATCH_STATUS_INTERVAL = 2,
    LIVEPROB_MATCH_STATUS_IN_SHOOTOUT = 3,
    LIVEPROB_MATCH_STATUS_ENDED = 4,
    LIVEPROB_MATCH_STATUS_ABANDONED = 5
} liveprob_match_status;

typedef struct liveprob_outputs {
    uint32_t struct_size; /* sizeof(liveprob_outputs) as the caller sees it */
    int32_t status;       /* a liveprob_match_status */
    liveprob_clock clock;
    int32_t home_goals, away_goals, home_reds, away_reds;
    double p_home, p_draw, p_away; /* result at full time */
    int32_t has_advance;           /* 1 when the format needs a winner */
    double p_advance_home, p_advance_away;
    double expected_home_goals, expected_away_goals;
    double next_goal_home, next_goal_away, next_goal_none;
    double p_over[LIVEPROB_TOTALS_LINES]; /* P(total > 0.5 + i) */
    double p_both_score;
    double goals_added[LIVEPROB_GRID][LIVEPROB_GRID]; /* [home adds i][away adds j] */
    double tail_mass;
    uint64_t events_applied;
} liveprob_outputs;

typedef struct liveprob_match liveprob_match; /* opaque */

/* Each fills the defaults and sets struct_size = size (pass sizeof of your variable). */
LIVEPROB_API void liveprob_setup_init(liveprob_setup* setup, uint32_t size);
LIVEPROB_API void liveprob_params_init(liveprob_params* params, uint32_t size);
LIVEPROB_API void liveprob_event_init(liveprob_event* event, uint32_t size);
LIVEPROB_API void liveprob_outputs_init(liveprob_outputs* outputs, uint32_t size);

/* params may be NULL (built-in defaults). On success *out owns a new match. */
LIVEPROB_API liveprob_status liveprob_match_create(const liveprob_setup* setup,
                                                   const liveprob_params* params,
                                                   liveprob_match** out);
LIVEPROB_API liveprob_status liveprob_match_apply(liveprob_match* match,
                                                  const liveprob_event* event,
                                                  liveprob_apply_result* result /* or NULL */);
/* moved (may be NULL) is set to 1 when the clock moved, 0 when it could not (see match.hpp). */
LIVEPROB_API liveprob_status liveprob_match_advance(liveprob_match* match, liveprob_clock now,
                                                    int32_t* moved);
/* out->struct_size must be set (liveprob_outputs_init). */
LIVEPROB_API liveprob_status liveprob_match_outputs(const liveprob_match* match,
                                                    liveprob_outputs* out);
LIVEPROB_API void liveprob_match_destroy(liveprob_match* match); /* NULL is allowed */

/* The calling thread's last error as one line of text ("" after a call that succeeded);
 * valid until this thread's next call. */
LIVEPROB_API const char* liveprob_last_error(void);
LIVEPROB_API const char* liveprob_status_name(liveprob_status status);
LIVEPROB_API const char* liveprob_reject_reason_name(int32_t reason);
/* The ABI version of the library loaded at run time (LIVEPROB_ABI_VERSION of its build). */
LIVEPROB_API int32_t liveprob_abi_version(void);
/* The project's version of the library loaded at run time, "major.minor.patch". */
LIVEPROB_API const char* liveprob_library_version(void);

#ifdef __cplusplus
}
#endif

#endif /* LIVEPROB_ENGINE_LIVEPROB_C_H */
