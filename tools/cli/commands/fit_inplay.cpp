// `liveprob fit-inplay`: in-play model parameters from the open goal-minute data, written as
// the model parameter file that calc, serve and replay read. Fitted: the goal-timing profile
// r(t), the score-state multipliers with the strength dispersion κ, the extra-time rate factor,
// and the shoot-out conversion and first-kicker edge. Every value in the file carries its source
// and standard error in the file's notes; red-card effects keep their built-in values ("from
// memory": the data carry no cards).
#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <iostream>
#include <limits>
#include <memory>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "command_registry.hpp"
#include "liveprob/backtest/walk_forward_priors.hpp"
#include "liveprob/datasets/inplay_records.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/extra_time_fit.hpp"
#include "liveprob/fit/goal_timing.hpp"
#include "liveprob/fit/score_state_fit.hpp"
#include "liveprob/fit/shootout_fit.hpp"
#include "rating_settings.hpp"

namespace {

namespace fs = std::filesystem;
namespace fit = liveprob::fit;
namespace datasets = liveprob::datasets;
using liveprob::cli::UsageError;

struct FitInplayOptions {
    std::string international_dir;
    std::vector<std::string> championships;
    std::string base_params;
    std::string out;
    double half_life_days = 730.0;
    // The defaults are the choices the walk-forward backtests made at three cuts
    // (replay-demo/README.md, "Choices made out of sample"): goal minutes weighted by a 4-year
    // half-life, and no strength dispersion.
    double timing_half_life_days = 1461.0;
    bool fit_dispersion = false;  // false: κ = ∞, the state multipliers fitted under plain Poisson
    // false: the score-state multipliers held at 1. Fitted under priors whose goal levels are
    // shrunk (the rating default), they made every held-out period worse (replay-demo/README.md).
    bool fit_score_states = false;
    double min_matches = 6.0;
    liveprob::cli::RatingModelSettings rating_model;
    int extra_time_from_year = 1970;
    datasets::BadRows bad_rows = datasets::BadRows::fail;
};

// Competitions whose knock-out matches play extra time before any shoot-out (from memory; the
// source does not say, and some other competitions went straight to penalties). Only their
// matches feed the extra-time fit from the international data.
const std::set<std::string> kExtraTimeCompetitions = {
    "FIFA World Cup", "UEFA Euro", "African Cup of Nations",
    "AFC Asian Cup",  "Gold Cup",  "Confederations Cup"};

// One match of the sources with what the fits need to know about it.
struct Candidate {
    const datasets::MatchTimeline* timeline = nullptr;
    bool championship = false;  // from a championship file: every match of it is listed
};

int regulation_goals(const datasets::MatchTimeline& t) {
    return t.regulation_goals[0] + t.regulation_goals[1];
}

struct Samples {
    std::vector<fit::RegulationRecord> regulation;
    std::vector<fit::ExtraTimeRecord> extra_time;
    int first_day = 0, last_day = 0;
    int left_out_unrated = 0;   // a side with too few earlier results for a prior of its own
    int left_out_goalless = 0;  // no regulation goal: cannot be told from unrecorded matches
};

std::string span_of_years(int first_day, int last_day) {
    return fit::iso_date(first_day).substr(0, 4) + "-" + fit::iso_date(last_day).substr(0, 4);
}

// The years a set of timelines spans ("1872-2009"), for the notes.
std::string years_of(const std::vector<datasets::MatchTimeline>& matches) {
    if (matches.empty()) return "no matches";
    const auto [first, last] = std::minmax_element(
        matches.begin(), matches.end(), [](const auto& a, const auto& b) { return a.day < b.day; });
    return span_of_years(first->day, last->day);
}

int run_fit_inplay(const FitInplayOptions& o) {
    if (o.half_life_days < 0.0) throw UsageError("--half-life must be 0 (no decay) or positive");
    if (o.timing_half_life_days < 0.0)
        throw UsageError("--timing-half-life must be 0 (no decay) or positive");
    if (o.fit_dispersion && !o.fit_score_states)
        throw UsageError(
            "--dispersion fit is fitted jointly with the score states: give "
            "--score-states fit too");
    const fs::path dir(o.international_dir);
    // Every international match with complete goal records (no coverage filter: a goalless
    // match is left out below, and those with goals are conditioned on having one).
    const auto international =
        datasets::read_international_timelines(dir.string(), {0.0, o.bad_rows});
    std::vector<datasets::TimelinesRead> championships;
    for (const auto& path : o.championships)
        championships.push_back(datasets::read_championship_timelines(path));
    auto history =
        datasets::read_international_results((dir / "results.csv").string(), o.bad_rows).matches;
    // Each championship result joins the history once (not again when the international
    // results hold it).
    for (const auto& path : o.championships)
        datasets::append_new_results(history, datasets::read_championship_results(path).matches);

    std::vector<Candidate> candidates;
    for (const auto& t : international.matches) candidates.push_back({&t, false});
    for (const auto& read : championships)
        for (const auto& t : read.matches) candidates.push_back({&t, true});

    liveprob::core::ModelParams params = o.base_params.empty()
                                             ? liveprob::core::ModelParams{}
                                             : liveprob::files::load_params_file(o.base_params);
    liveprob::files::ParamsFileNotes notes;

    // 1. The goal-timing profile, from every regulation goal minute.
    fit::MinuteCounts counts =
        datasets::regulation_minute_counts(international.matches, o.timing_half_life_days);
    for (const auto& read : championships) {
        const auto more = datasets::regulation_minute_counts(read.matches, o.timing_half_life_days);
        for (std::size_t i = 0; i < counts.size(); ++i) counts[i] += more[i];
    }
    const auto timing = fit::fit_goal_timing(counts, params.timing);
    if (!timing.converged) throw std::runtime_error("the timing-profile fit did not converge");
    // The international source folds stoppage into minutes 45 and 90 and spans a century of
    // shorter stoppage: its stoppage factor only serves the shape fit and the state exposures
    // of its own matches. The championship files tell stoppage goals apart and are recent:
    // the engine's stoppage factor comes from them when given.
    const liveprob::core::TimingProfile source_timing = timing.profile;
    params.timing = timing.profile;
    std::optional<fit::StoppageFit> stoppage;
    if (!championships.empty()) {
        datasets::StoppageCounts sc;
        for (const auto& read : championships) {
            const auto more = datasets::stoppage_counts(read.matches);
            sc.regulation_goals += more.regulation_goals;
            sc.stoppage_goals += more.stoppage_goals;
        }
        stoppage = fit::fit_stoppage_factor(sc.regulation_goals, sc.stoppage_goals, timing.profile);
        params.timing.stoppage_factor = stoppage->factor;
    }

    // 2. Pre-match priors, walk-forward: ratings refitted monthly on the results before the month.
    std::vector<liveprob::backtest::FixtureToPrice> fixtures;
    for (const auto& c : candidates)
        fixtures.push_back(
            {c.timeline->day, c.timeline->home, c.timeline->away, c.timeline->neutral, {}, {}});
    liveprob::backtest::WalkForwardOptions wf;
    wf.fit.xi = o.half_life_days > 0.0 ? std::log(2.0) / o.half_life_days : 0.0;
    wf.fit.min_matches = o.min_matches;
    o.rating_model.apply_to(wf.fit);
    wf.fit.min_weight = liveprob::cli::kMinMatchWeight;
    wf.fit.standard_errors = false;
    wf.schedule = liveprob::backtest::RefitSchedule::month;
    const auto priors = liveprob::backtest::walk_forward_priors(history, fixtures, wf);

    // 3. The samples.
    Samples samples;
    samples.first_day = std::numeric_limits<int>::max();
    samples.last_day = std::numeric_limits<int>::min();
    int extra_time_international = 0, extra_time_championship = 0;
    for (std::size_t i = 0; i < candidates.size(); ++i) {
        const auto& t = *candidates[i].timeline;
        const bool championship = candidates[i].championship;
        if (!priors.both_sides_rated[i]) {
            ++samples.left_out_unrated;
            continue;
        }
        const bool has_goal = regulation_goals(t) > 0;
        // Regulation: the international matches with a goal, conditioned on having one. (The
        // championship files' priors come from results that end in 2015, years before them.)
        if (!championship) {
            if (has_goal) {
                samples.regulation.push_back(fit::regulation_record(
                    datasets::inplay_match(t, priors.priors[i], true), source_timing));
                samples.first_day = std::min(samples.first_day, t.day);
                samples.last_day = std::max(samples.last_day, t.day);
            } else {
                ++samples.left_out_goalless;
            }
        }
        // Extra time: level after regulation in a competition known to play it, the regulation
        // goals (not the extra time) deciding whether the match is listed.
        if (!t.extra_time) continue;
        const bool international_ok = !championship && has_goal &&
                                      kExtraTimeCompetitions.contains(t.competition) &&
                                      t.day >= fit::day_number(o.extra_time_from_year, 1, 1);
        if (!championship && !international_ok) continue;
        samples.extra_time.push_back(fit::extra_time_record(
            datasets::inplay_match(t, priors.priors[i], false), params.timing));
        ++(championship ? extra_time_championship : extra_time_international);
    }

    // 4. Score-state multipliers and κ, jointly (or both held: multipliers 1, κ = ∞).
    fit::ScoreStateFit states;
    if (o.fit_score_states) {
        fit::ScoreStateFitOptions state_options;
        state_options.fit_dispersion = o.fit_dispersion;
        states = fit::fit_score_state(samples.regulation, state_options);
        if (!states.converged) throw std::runtime_error("the score-state fit did not converge");
    } else {
        states.effects = {1.0, 1.0, 1.0};
        states.kappa = std::numeric_limits<double>::infinity();
    }
    params.score_state = states.effects;
    params.kappa = states.kappa;

    // 5. The extra-time factor, with those effects and κ.
    const auto extra = fit::fit_extra_time_factor(samples.extra_time, states.effects, states.kappa);
    if (!extra.converged) throw std::runtime_error("the extra-time fit did not converge");
    params.timing.extra_time_factor = extra.factor;

    // 6. The shoot-out: winners and first kickers (international), tallies (championships).
    auto shootouts =
        datasets::shootout_records(datasets::read_shootout_rows((dir / "shootouts.csv").string()));
    for (const auto& read : championships) {
        const auto more = datasets::shootout_records(read.matches);
        shootouts.records.insert(shootouts.records.end(), more.records.begin(), more.records.end());
    }
    const auto kicks = fit::fit_shootout(shootouts.records, params.shootout);
    if (!kicks.converged) throw std::runtime_error("the shoot-out fit did not converge");
    params.shootout = kicks.params;

    // Sources and standard errors, beside the values.
    const std::string priors_text = fmt::format(
        "priors from ratings refitted monthly on the results before each "
        "month (half-life {} days, goal-level precision {}, friendly weight {})",
        o.half_life_days, o.rating_model.level_precision, o.rating_model.friendly_weight);
    const std::string timing_text = fmt::format(
        "fitted by fit-inplay: multinomial likelihood of {} regulation goal "
        "minutes (international{}, {}){}",
        timing.goals, championships.empty() ? "" : " and championship files",
        years_of(international.matches),
        o.timing_half_life_days > 0.0
            ? fmt::format(", each weighted 2^(-age/{} days) from the latest match, counted as "
                          "the effective number of goals",
                          o.timing_half_life_days)
            : ", every goal weighted alike");
    for (const char* key :
         {"timing.first_half_start", "timing.second_half_start", "timing.second_half_end"})
        notes.sources[key] = timing_text;
    notes.standard_errors["timing.first_half_start"] = timing.first_half_start_se;
    notes.standard_errors["timing.second_half_start"] = timing.second_half_start_se;
    notes.standard_errors["timing.second_half_end"] = timing.second_half_end_se;
    if (stoppage) {
        notes.sources["timing.stoppage_factor"] = fmt::format(
            "fitted by fit-inplay: {} of {} regulation goals of the championship files in stoppage "
            "time (they give "
            "its minutes), shape and expected stoppage held; the international goal minutes, which "
            "fold stoppage "
            "into minutes 45 and 90 and reach back a century, give {:.3f} (se {:.3f})",
            stoppage->stoppage_goals, stoppage->regulation_goals, source_timing.stoppage_factor,
            timing.stoppage_factor_se);
        notes.standard_errors["timing.stoppage_factor"] = stoppage->factor_se;
    } else {
        notes.sources["timing.stoppage_factor"] =
            timing_text +
            " (the international source folds stoppage into minutes 45 and 90 and reaches back a "
            "century of shorter stoppage: add --championship files for a recent estimate)";
        notes.standard_errors["timing.stoppage_factor"] = timing.stoppage_factor_se;
    }
    notes.sources["timing.first_half_end"] =
        "fixed at 1 (the profile's scale is set by the engine)";
    notes.sources["timing.expected_stoppage_first"] =
        "held, from memory (only factor x duration is identified)";
    notes.sources["timing.expected_stoppage_second"] =
        notes.sources["timing.expected_stoppage_first"];
    notes.sources["timing.expected_stoppage_extra"] =
        notes.sources["timing.expected_stoppage_first"];
    const std::string states_text = fmt::format(
        "fitted by fit-inplay: {} (matches conditioned on "
        "a regulation goal) on {} international matches {} with complete goal minutes, {}",
        o.fit_dispersion ? "joint likelihood with the strength dispersion (Gamma mixing)"
                         : "plain Poisson likelihood (kappa held at infinity)",
        samples.regulation.size(), span_of_years(samples.first_day, samples.last_day), priors_text);
    for (const char* key : {"score_state.leading", "score_state.level", "score_state.trailing"})
        notes.sources[key] = o.fit_score_states
                                 ? states_text
                                 : std::string(
                                       "held at 1 (fit-inplay --score-states none): chosen "
                                       "by walk-forward backtests (replay-demo/README.md)");
    notes.sources["kappa"] = o.fit_dispersion
                                 ? states_text
                                 : std::string(
                                       "held at infinity (fit-inplay --dispersion none): chosen "
                                       "by walk-forward backtests (replay-demo/README.md)");
    if (o.fit_score_states) {
        notes.standard_errors["score_state.leading"] = states.leading_se;
        notes.standard_errors["score_state.level"] = states.level_se;
        notes.standard_errors["score_state.trailing"] = states.trailing_se;
    }
    if (std::isfinite(states.kappa)) notes.standard_errors["kappa"] = states.kappa_se;
    notes.sources["timing.extra_time_factor"] = fmt::format(
        "fitted by fit-inplay: time to the first extra-time goal in {} matches level after "
        "regulation ({} of "
        "international final tournaments since {} with a regulation goal, {} of championship "
        "files), strength "
        "posteriors from regulation; {}",
        extra.matches, extra_time_international, o.extra_time_from_year, extra_time_championship,
        priors_text);
    notes.standard_errors["timing.extra_time_factor"] = extra.factor_se;
    notes.sources["shootout.conversion"] =
        kicks.conversion_fitted
            ? fmt::format(
                  "fitted by fit-inplay: kicks scored in {} shoot-outs with a tally (championship "
                  "files) "
                  "under the engine's shoot-out rules",
                  kicks.with_tally)
            : "not fitted (no shoot-out tally in the data given: add --championship files); kept";
    if (kicks.conversion_fitted) notes.standard_errors["shootout.conversion"] = kicks.conversion_se;
    notes.sources["shootout.first_kicker_edge"] =
        kicks.edge_fitted
            ? fmt::format(
                  "fitted by fit-inplay: the first kicker won {} of {} shoot-outs naming it "
                  "(international shoot-outs file); model P(first kicker wins) {:.4f} (se {:.4f})",
                  kicks.first_kicker_wins, kicks.with_first_kicker,
                  kicks.first_kicker_win_probability, kicks.first_kicker_win_probability_se)
            : "not fitted (no shoot-out names its first kicker); kept";
    if (kicks.edge_fitted) notes.standard_errors["shootout.first_kicker_edge"] = kicks.edge_se;
    notes.sources["red_cards"] =
        "from memory (published red-card studies): the open data carry no cards";
    notes.sources["xg_weight"] = "the project's choice (no data here carries xG)";
    liveprob::files::save_params_file(params, o.out, notes);

    std::cout << fmt::format(
        "data: {} international matches with complete goal records, {} championship matches; {} "
        "left out "
        "(a side without {} weighted earlier matches), {} goalless international matches left out\n"
        "priors: {} monthly rating fits ({} not converged)\n",
        international.matches.size(), candidates.size() - international.matches.size(),
        samples.left_out_unrated, o.min_matches, samples.left_out_goalless, priors.refits,
        priors.not_converged);
    // A value not fitted here has no standard error: its row says "kept" (the base value) or
    // "held" instead, as the file's notes do.
    std::cout << fmt::format("{:<28} {:>9} {:>9}\n", "parameter", "value", "se");
    auto row = [](const char* name, double value, std::optional<double> se,
                  const char* otherwise = "kept") {
        std::cout << fmt::format("{:<28} {:>9.4f} {:>9}\n", name, value,
                                 se ? fmt::format("{:.4f}", *se) : otherwise);
    };
    row("timing.first_half_start", params.timing.first_half_start, timing.first_half_start_se);
    row("timing.second_half_start", params.timing.second_half_start, timing.second_half_start_se);
    row("timing.second_half_end", params.timing.second_half_end, timing.second_half_end_se);
    row("timing.stoppage_factor", params.timing.stoppage_factor,
        stoppage ? stoppage->factor_se : timing.stoppage_factor_se);
    auto state_se = [&](double se) {
        return o.fit_score_states ? std::optional<double>(se) : std::nullopt;
    };
    row("score_state.leading", states.effects.leading, state_se(states.leading_se), "held");
    row("score_state.level", states.effects.level, state_se(states.level_se), "held");
    row("score_state.trailing", states.effects.trailing, state_se(states.trailing_se), "held");
    if (std::isfinite(states.kappa)) row("kappa", states.kappa, states.kappa_se);
    else
        std::cout << fmt::format("{:<28} {:>9} {:>9}\n", "kappa", "infinity",
                                 o.fit_dispersion ? "at bound" : "held");
    row("timing.extra_time_factor", extra.factor, extra.factor_se);
    row("shootout.conversion", kicks.params.conversion,
        kicks.conversion_fitted ? std::optional<double>(kicks.conversion_se) : std::nullopt);
    row("shootout.first_kicker_edge", kicks.params.first_kicker_edge,
        kicks.edge_fitted ? std::optional<double>(kicks.edge_se) : std::nullopt);
    std::cout << fmt::format(
        "second-half share: data {:.4f}, fitted {:.4f} (se {:.4f})\n"
        "score states: {}\n"
        "extra time: {} matches, first goal in {} (model expects {:.1f})\n"
        "shoot-outs: first kicker won {} of {} (model {:.4f}); {} tallies with {} kicks scored; {} "
        "name only the "
        "winner (no information)\nwrote {}\n",
        timing.data_second_half_share, timing.second_half_share, timing.second_half_share_se,
        o.fit_score_states
            ? fmt::format(
                  "{} matches, {} goals{}", states.sides / 2, states.goals,
                  states.dispersion_at_bound ? " (no dispersion found: kappa = infinity)" : "")
            : std::string("held at 1 (--score-states none)"),
        extra.matches, extra.first_goals, extra.expected_first_goals, kicks.first_kicker_wins,
        kicks.with_first_kicker, kicks.first_kicker_win_probability, kicks.with_tally,
        kicks.tally_kicks_scored, kicks.uninformative, o.out);
    return liveprob::cli::kExitOk;
}

const liveprob::cli::Registration registration{
    {"fit-inplay",
     "fit in-play parameters (timing, score states, dispersion, extra time, shoot-outs) from goal "
     "minutes",
     [](CLI::App& app) {
         auto o = std::make_shared<FitInplayOptions>();
         app.add_option(
                "--international", o->international_dir,
                "folder with the international results.csv, goalscorers.csv and shootouts.csv")
             ->required();
         app.add_option("--championship", o->championships,
                        "championship file(s) (euro.json format): goal minutes, extra time and "
                        "shoot-out tallies");
         app.add_option("--params", o->base_params,
                        "parameter file to start from (defaults built in)");
         app.add_option("--out", o->out, "parameter file to write")->required();
         app.add_option("--half-life", o->half_life_days,
                        "time-decay half-life in days of the prior ratings");
         app.add_option_function<std::string>(
                "--dispersion", [o](const std::string& v) { o->fit_dispersion = v == "fit"; },
                "fit: the strength dispersion kappa fitted jointly with the state multipliers; "
                "none (the default, chosen out of sample): kappa = infinity, the multipliers "
                "fitted under plain Poisson")
             ->check(CLI::IsMember({"fit", "none"}));
         app.add_option_function<std::string>(
                "--score-states", [o](const std::string& v) { o->fit_score_states = v == "fit"; },
                "fit: the score-state multipliers (leading, level, trailing) fitted; none (the "
                "default, chosen out of sample): held at 1 (needs --dispersion none)")
             ->check(CLI::IsMember({"fit", "none"}));
         app.add_option("--timing-half-life", o->timing_half_life_days,
                        "time-decay half-life in days of the goal-minute weights of the timing "
                        "profile (0: every goal alike)")
             ->capture_default_str();
         liveprob::cli::add_bad_rows_flag(app, o->bad_rows);
         liveprob::cli::add_rating_model_options(app, o->rating_model);
         app.add_option(
             "--min-matches", o->min_matches,
             "a match is used only when both sides have this many weighted earlier matches");
         return [o] { return run_fit_inplay(*o); };
     }}};

}  // namespace
