// The model parameter file: JSON that `calc`, `serve` and `replay` read and `fit-inplay`
// writes. Layout (every key optional; a missing key keeps the built-in default of ModelParams):
//
//   { "kind": "liveprob-model-params", "version": 1,
//     "timing":      { "first_half_start", "first_half_end", "second_half_start",
//                      "second_half_end", "stoppage_factor", "expected_stoppage_first",
//                      "expected_stoppage_second", "extra_time_factor",
//                      "expected_stoppage_extra" },
//     "score_state": { "leading", "level", "trailing" },
//     "red_cards":   { "own_per_card", "opponent_per_card", "max_cards" },
//     "shootout":    { "conversion", "first_kicker_edge" },
//     "kappa": number or "infinity", "xg_weight", "quadrature_nodes",
//     "notes":           { "<key>": "where the value comes from", ... },
//     "standard_errors": { "<key>": number, ... } }
//
// "notes" and "standard_errors" are documentation for people; the loader checks their types
// and otherwise ignores them. Any other key is an error, as is a value of the wrong type or
// outside the engine's limits (core::validate_params, checked once the file is read, so what
// this accepts the engine accepts): the message names the key ("timing.second_half_end") and
// the reason.
#pragma once

#include <map>
#include <stdexcept>
#include <string>

#include "liveprob/core/params.hpp"
#include "liveprob/files/one_line.hpp"

namespace liveprob::files {

// Names the file, the key and the reason, on one line (control bytes quoted from the file are
// shown escaped).
struct ParamsFileError : std::runtime_error {
    explicit ParamsFileError(const std::string& what) : std::runtime_error(one_line(what)) {}
};

// Provenance written beside the values: keys are the dotted parameter names.
struct ParamsFileNotes {
    std::map<std::string, std::string> sources;
    std::map<std::string, double> standard_errors;
};

core::ModelParams load_params_file(const std::string& path);
// Parses the file's text (what load_params_file does after reading); `origin` names the
// source in error messages.
core::ModelParams parse_params_json(const std::string& text, const std::string& origin);

// Writes atomically (a temporary file beside `path`, then a rename), so a failed write never
// leaves a half file behind. Doubles are written with 17 significant digits: a round trip
// through the file is exact.
void save_params_file(const core::ModelParams& params, const std::string& path,
                      const ParamsFileNotes& notes = {});
std::string params_to_json(const core::ModelParams& params, const ParamsFileNotes& notes = {});

}  // namespace liveprob::files
