// The model parameter file: exact round trip, partial files keep defaults, and every kind of
// bad input is an error that names the key and the reason.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <limits>

#include "liveprob/files/params_file.hpp"
#include "test_env.hpp"

using liveprob::core::ModelParams;
using liveprob::files::ParamsFileError;
using liveprob::files::parse_params_json;

namespace {
std::string error_of(const std::string& text) {
    try {
        parse_params_json(text, "test.json");
    } catch (const ParamsFileError& e) {
        return e.what();
    }
    return "";
}
}  // namespace

TEST_CASE("a parameter file round-trips every field exactly") {
    ModelParams p;
    p.timing.first_half_start = 0.8123456789012345;
    p.timing.second_half_end = 1.3 + 1e-15;
    p.timing.extra_time_factor = 0.7777;
    p.score_state.trailing = 1.1717;
    p.red_cards.max_cards = 3;
    p.shootout.conversion = 0.7431;
    p.shootout.first_kicker_edge = 0.021;
    p.kappa = 17.25;
    p.xg_weight = 0.4;
    p.quadrature_nodes = 9;
    liveprob::files::ParamsFileNotes notes;
    notes.sources["timing.first_half_start"] = "fitted on \"goal minutes\"";
    notes.standard_errors["kappa"] = 2.5;

    const auto dir = liveprob::test::scratch_dir("params_file_round_trip");
    const std::string path = (dir / "params.json").string();
    liveprob::files::save_params_file(p, path, notes);
    const ModelParams q = liveprob::files::load_params_file(path);
    CHECK(q.timing.first_half_start == p.timing.first_half_start);
    CHECK(q.timing.second_half_end == p.timing.second_half_end);
    CHECK(q.timing.extra_time_factor == p.timing.extra_time_factor);
    CHECK(q.timing.expected_stoppage_second == p.timing.expected_stoppage_second);
    CHECK(q.score_state.trailing == p.score_state.trailing);
    CHECK(q.red_cards.max_cards == 3);
    CHECK(q.shootout.conversion == p.shootout.conversion);
    CHECK(q.shootout.first_kicker_edge == p.shootout.first_kicker_edge);
    CHECK(q.kappa == 17.25);
    CHECK(q.xg_weight == 0.4);
    CHECK(q.quadrature_nodes == 9);
    CHECK_FALSE(std::filesystem::exists(path + ".partial"));
}

TEST_CASE("infinite kappa is written as \"infinity\" and read back") {
    const ModelParams plain = ModelParams::plain_poisson();
    const std::string text = liveprob::files::params_to_json(plain);
    CHECK(text.find("\"kappa\": \"infinity\"") != std::string::npos);
    CHECK(std::isinf(parse_params_json(text, "x").kappa));
}

TEST_CASE("a partial file keeps the defaults for missing keys") {
    const ModelParams q = parse_params_json(
        R"({"kind":"liveprob-model-params","version":1,"score_state":{"trailing":1.3}})", "x");
    const ModelParams d;
    CHECK(q.score_state.trailing == 1.3);
    CHECK(q.score_state.leading == d.score_state.leading);
    CHECK(q.timing.second_half_end == d.timing.second_half_end);
}

TEST_CASE("bad parameter files are errors naming the key and the reason") {
    const std::string head = R"({"kind":"liveprob-model-params","version":1,)";
    CHECK_THAT(error_of(head + R"("timing":{"second_half_ending":1.2}})"),
               Catch::Contains("timing.second_half_ending") && Catch::Contains("unknown key"));
    CHECK_THAT(error_of(head + R"("colour":"red"})"), Catch::Contains("'colour': unknown key"));
    CHECK_THAT(error_of(head + R"("col\nour":"red"})"),
               Catch::Contains(R"('col\nour': unknown key)"));
    CHECK_THAT(error_of(head + R"("shootout":{"conversion":1.5}})"),
               Catch::Contains("shootout.conversion") && Catch::Contains("must be in (0, 1)"));
    CHECK_THAT(error_of(head + R"("kappa":"lots"})"), Catch::Contains("'kappa'"));
    CHECK_THAT(error_of(head + R"("kappa":-1})"), Catch::Contains("'kappa'"));
    CHECK_THAT(error_of(head + R"("red_cards":{"max_cards":1.5}})"),
               Catch::Contains("red_cards.max_cards") && Catch::Contains("whole number"));
    CHECK_THAT(error_of(head + R"("timing":{"stoppage_factor":"high"}})"),
               Catch::Contains("timing.stoppage_factor") && Catch::Contains("expected a number"));
    CHECK_THAT(error_of(head + R"("timing":5})"), Catch::Contains("'timing': expected an object"));
    CHECK_THAT(error_of(R"({"version":1})"), Catch::Contains("'kind': missing"));
    CHECK_THAT(error_of(R"({"kind":"liveprob-model-params","version":2})"),
               Catch::Contains("'version'"));
    CHECK_THAT(error_of(head + R"("notes":{"kappa":3}})"), Catch::Contains("notes.kappa"));
    CHECK_THAT(error_of("{\"kind\": "), Catch::Contains("not valid JSON"));
    CHECK_THAT(error_of("[1,2]"), Catch::Contains("expected an object"));
}

TEST_CASE("a missing parameter file is a clear error") {
    const auto dir = liveprob::test::scratch_dir("params_file_missing");
    CHECK_THROWS_WITH(liveprob::files::load_params_file((dir / "none.json").string()),
                      Catch::Contains("cannot open"));
}
