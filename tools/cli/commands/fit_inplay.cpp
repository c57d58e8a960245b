// `liveprob fit-inplay`: in-play model parameters from goal-minute data, written as the model
// parameter file that calc, serve and replay read. Fitted now: the goal-timing profile r(t)
// (with stoppage exposure). Everything else keeps its built-in value and is marked so in the
// file's notes.
#include <fmt/format.h>

#include <filesystem>
#include <iostream>
#include <memory>
#include <string>

#include "command_registry.hpp"
#include "liveprob/adapters/goal_minutes_reader.hpp"
#include "liveprob/adapters/params_file.hpp"
#include "liveprob/engine/fit/goal_timing.hpp"

namespace {

struct FitInplayOptions {
    std::string international_dir;
    std::string base_params;
    std::string out;
};

int run_fit_inplay(const FitInplayOptions& o) {
    const std::filesystem::path dir(o.international_dir);
    const auto read = liveprob::read_regulation_goal_minutes((dir / "results.csv").string(),
                                                             (dir / "goalscorers.csv").string());
    liveprob::ModelParams params = o.base_params.empty() ? liveprob::ModelParams{}
                                                         : liveprob::load_params_file(o.base_params);
    const auto timing = liveprob::fit::fit_goal_timing(read.counts, params.timing);
    if (!timing.converged) throw std::runtime_error("the timing-profile fit did not converge");
    params.timing = timing.profile;

    liveprob::ParamsFileNotes notes;
    const std::string fitted = fmt::format("fitted by fit-inplay on {} matches ({} goals) of the international goal minutes",
                                           read.matches_used, timing.goals);
    for (const char* key : {"timing.first_half_start", "timing.second_half_start", "timing.second_half_end",
                            "timing.stoppage_factor"})
        notes.sources[key] = fitted;
    notes.sources["timing.first_half_end"] = "fixed at 1 (the profile's scale is set by the engine)";
    notes.sources["timing.expected_stoppage_first"] = "held, from memory (only factor x duration is identified)";
    notes.sources["timing.expected_stoppage_second"] = notes.sources["timing.expected_stoppage_first"];
    for (const char* key : {"timing.extra_time_factor", "score_state", "red_cards", "shootout", "kappa"})
        notes.sources[key] = "not fitted here: built-in value (from memory)";
    notes.standard_errors["timing.first_half_start"] = timing.first_half_start_se;
    notes.standard_errors["timing.second_half_start"] = timing.second_half_start_se;
    notes.standard_errors["timing.second_half_end"] = timing.second_half_end_se;
    notes.standard_errors["timing.stoppage_factor"] = timing.stoppage_factor_se;
    liveprob::save_params_file(params, o.out, notes);
    std::cout << fmt::format(
        "{} matches used, {} skipped (incomplete goal records or a goal outside minutes 1-90)\n"
        "second-half share: data {:.4f}, fitted {:.4f} (se {:.4f})\nwrote {}\n",
        read.matches_used, read.matches_skipped, timing.data_second_half_share, timing.second_half_share,
        timing.second_half_share_se, o.out);
    return liveprob::cli::kExitOk;
}

const liveprob::cli::Registration registration{{
    "fit-inplay", "fit in-play parameters (goal-timing profile) from goal-minute data",
    [](CLI::App& app) {
        auto o = std::make_shared<FitInplayOptions>();
        app.add_option("--international", o->international_dir,
                       "folder with the international results.csv and goalscorers.csv")
            ->required();
        app.add_option("--params", o->base_params, "parameter file to start from (defaults built in)");
        app.add_option("--out", o->out, "parameter file to write")->required();
        return [o] { return run_fit_inplay(*o); };
    }}};

}  // namespace
