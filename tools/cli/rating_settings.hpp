// Rating-fit settings shared by the commands that fit ratings (fit, import, fit-inplay), so that
// `fit --as-of DAY` followed by `prior` gives exactly the prior `import` gives a match on DAY.
#pragma once

#include <CLI/CLI.hpp>

#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/fit/dixon_coles.hpp"

namespace liveprob::cli {

// Matches whose decay weight is below this are left out of a rating fit (at a half-life of 730
// days: matches more than 13 years old). The project's choice: they change no rating by a
// visible amount and slow every fit.
inline constexpr double kMinMatchWeight = 0.01;

// `--skip-bad-rows`: an unreadable results row is skipped and counted instead of stopping the
// command with an error naming the file and line.
inline void add_bad_rows_flag(CLI::App& app, datasets::BadRows& policy) {
    app.add_flag_callback(
        "--skip-bad-rows", [&policy] { policy = datasets::BadRows::skip; },
        "skip and count results rows that cannot be read (an unreadable date or score, a "
        "negative score, missing columns) instead of stopping with an error naming the file and "
        "line");
}

// The rating model's settings that every command fitting ratings takes with the same options and
// defaults (fit, import, fit-inplay), so that their fits agree. The defaults were chosen
// walk-forward (replay-demo/README.md, "Rating settings tried walk-forward").
struct RatingModelSettings {
    double level_precision = 30.0;
    double friendly_weight = 1.0;

    void apply_to(fit::RatingsFitOptions& options) const {
        options.level_precision = level_precision;
        options.friendly_weight = friendly_weight;
    }
};

inline void add_rating_model_options(CLI::App& app, RatingModelSettings& settings) {
    app.add_option("--level-precision", settings.level_precision,
                   "rating fit: prior precision on every team's goal level (attack - defence) "
                   "toward the average; its strength (attack + defence) is not shrunk (0: off)")
        ->capture_default_str()
        ->check(CLI::NonNegativeNumber);
    app.add_option("--friendly-weight", settings.friendly_weight,
                   "rating fit: a friendly's weight relative to a competitive match "
                   "(international results' tournament \"Friendly\")")
        ->capture_default_str()
        ->check(CLI::Range(0.0, 1.0));
}

}  // namespace liveprob::cli
