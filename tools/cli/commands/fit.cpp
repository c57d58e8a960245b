// `liveprob fit`: team ratings (Dixon–Coles) from past results, written to a ratings file.
#include <fmt/format.h>

#include <cmath>
#include <iostream>
#include <memory>
#include <string>
#include <vector>

#include "command_registry.hpp"
#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/files/ratings_file.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "rating_settings.hpp"

namespace {

using liveprob::cli::UsageError;
namespace fit = liveprob::fit;

struct FitOptions {
    std::vector<std::string> results;
    std::string out;
    std::string as_of;
    std::string aliases;
    double half_life_days = 0.0;
    bool low_score_correction = false;
    double min_matches = 6.0;
    double shrink_precision = 2.0;
    liveprob::cli::RatingModelSettings rating_model;
    liveprob::datasets::BadRows bad_rows = liveprob::datasets::BadRows::fail;
};

int run_fit(const FitOptions& o) {
    fit::RatingsFitOptions options;
    if (!o.as_of.empty()) {
        const auto day = fit::parse_iso_date(o.as_of);
        if (!day) throw UsageError(fmt::format("--as-of: '{}' is not a date YYYY-MM-DD", o.as_of));
        options.as_of_day = day;
    }
    if (o.half_life_days < 0.0) throw UsageError("--half-life must be 0 (no decay) or positive");
    options.xi = o.half_life_days > 0.0 ? std::log(2.0) / o.half_life_days : 0.0;
    options.fit_rho = o.low_score_correction;
    options.min_matches = o.min_matches;
    options.shrink_precision = o.shrink_precision;
    o.rating_model.apply_to(options);
    options.min_weight = liveprob::cli::kMinMatchWeight;

    const auto aliases = o.aliases.empty() ? std::map<std::string, std::string>{}
                                           : liveprob::files::load_alias_file(o.aliases);
    auto rename = [&](std::string& name) {
        if (const auto it = aliases.find(name); it != aliases.end()) name = it->second;
    };
    std::vector<fit::MatchResult> matches;
    for (const auto& path : o.results) {
        auto read = liveprob::datasets::read_results_any(path, o.bad_rows);
        for (auto& m : read.matches) {
            rename(m.home);
            rename(m.away);
        }
        // A result another file already gave (the same day and sides) counts once.
        const int repeated = liveprob::datasets::append_new_results(matches, read.matches);
        std::cerr << fmt::format(
            "{}: {} matches, {} not played skipped, {} unreadable rows skipped, {} duplicates "
            "dropped, {} already in an earlier file\n",
            path, read.matches.size(), read.skipped, read.bad_skipped, read.duplicates, repeated);
    }
    const fit::Ratings ratings = fit::fit_ratings(matches, options);
    for (const auto& w : ratings.diagnostics.warnings) std::cerr << "warning: " << w << "\n";
    liveprob::files::save_ratings_file(ratings, o.out);
    const auto& d = ratings.diagnostics;
    std::cout << fmt::format(
        "fitted {} teams on {} matches{}: home advantage {:.4f} (se {:.4f}), rho {:.4f} (se "
        "{:.4f}), "
        "log-likelihood {:.3f}, {} iterations{}\nwrote {}\n",
        ratings.teams.size(), d.matches,
        ratings.as_of_day ? " before " + fit::iso_date(*ratings.as_of_day) : "",
        ratings.home_advantage, ratings.home_advantage_se, ratings.rho, ratings.rho_se,
        d.log_likelihood, d.iterations, d.converged ? "" : " (NOT converged)", o.out);
    return d.converged ? liveprob::cli::kExitOk : liveprob::cli::kExitFailure;
}

const liveprob::cli::Registration registration{
    {"fit", "fit team ratings (attack, defence, home advantage) from past results",
     [](CLI::App& app) {
         auto o = std::make_shared<FitOptions>();
         app.add_option("--results", o->results,
                        "results file(s): the project's CSV, the international results CSV or a "
                        "league JSON")
             ->required();
         app.add_option("--out", o->out, "ratings file to write (JSON)")->required();
         app.add_option("--as-of", o->as_of,
                        "use only matches strictly before this date (YYYY-MM-DD)");
         app.add_option("--half-life", o->half_life_days,
                        "time-decay half-life in days (0 = no decay)");
         app.add_flag("--low-score-correction", o->low_score_correction, "fit the Dixon-Coles rho");
         app.add_option("--min-matches", o->min_matches,
                        "teams with fewer weighted matches are shrunk");
         app.add_option("--shrink-precision", o->shrink_precision,
                        "prior precision for shrunk teams");
         liveprob::cli::add_rating_model_options(app, o->rating_model);
         app.add_option("--aliases", o->aliases,
                        "CSV feed_name,rating_name applied to the results' names");
         liveprob::cli::add_bad_rows_flag(app, o->bad_rows);
         return [o] { return run_fit(*o); };
     }}};

}  // namespace
