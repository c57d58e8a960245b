// Rating-fit settings shared by the commands that fit ratings (fit, import, fit-inplay), so that
// `fit --as-of DAY` followed by `prior` gives exactly the prior `import` gives a match on DAY.
#pragma once

#include <CLI/CLI.hpp>

#include "liveprob/datasets/results_readers.hpp"

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

}  // namespace liveprob::cli
