// `liveprob calc` as a user runs it: the built program's JSON against the in-process engine
// at the same position (the numbers are printed with 17 significant digits, so they must be
// equal exactly), the table, a parameter file, and the usage errors.
#include <catch2/catch.hpp>

#include <cstdlib>
#include <regex>
#include <string>

#include "liveprob/core/position.hpp"
#include "liveprob/files/params_file.hpp"
#include "test_env.hpp"

using namespace liveprob;
using namespace liveprob::files;

using namespace liveprob::core;

namespace {

test::CommandResult calc(const std::string& args) {
    return test::run_command(test::liveprob_binary().string() + " calc " + args);
}

// The number after "key": in a flat part of the JSON text (the first occurrence after `from`).
double json_number(const std::string& json, const std::string& key, std::size_t from = 0) {
    const auto at = json.find("\"" + key + "\":", from);
    REQUIRE(at != std::string::npos);
    return std::strtod(json.c_str() + at + key.size() + 3, nullptr);
}

MatchPosition position(double h, double a, Period p, double minute, std::array<int, 2> score,
                       std::array<int, 2> reds) {
    MatchPosition pos;
    pos.prior = PriorMeans{h, a};
    pos.clock = MatchClock{p, static_cast<std::uint32_t>(minute * 60'000.0)};
    pos.score = score;
    pos.reds = reds;
    return pos;
}

}  // namespace

TEST_CASE("calc --json equals the in-process engine at the same position", "[calc]") {
    const auto r = calc("--prior 1.6,1.1 --minute 67 --score 1-0 --reds 0-1 --json");
    REQUIRE(r.exit_code == 0);
    const Match m =
        match_at(position(1.6, 1.1, Period::second_half, 67, {1, 0}, {0, 1}), ModelParams{});
    const Outputs& o = m.outputs();
    CHECK(json_number(r.out, "home") == o.p_home);
    CHECK(json_number(r.out, "draw") == o.p_draw);
    CHECK(json_number(r.out, "away") == o.p_away);
    CHECK(r.out.find("\"advance\":null") != std::string::npos);
    CHECK(json_number(r.out, "home", r.out.find("\"expected_goals\"")) == o.expected_home_goals);
    CHECK(json_number(r.out, "none", r.out.find("\"next_goal\"")) == o.next_goal_none);
    CHECK(json_number(r.out, "2.5") == o.p_over[2]);
    CHECK(json_number(r.out, "both_score") == o.p_both_score);
    CHECK(json_number(r.out, "tail_mass") == o.tail_mass);
    CHECK(o.p_home > o.p_away);  // a goal up against ten men
}

TEST_CASE("calc in a knock-out's extra time and in stoppage", "[calc]") {
    const auto r = calc("--prior 1.2,1.3 --minute 100 --score 1-1 --format knockout --json");
    REQUIRE(r.exit_code == 0);
    MatchPosition pos = position(1.2, 1.3, Period::extra_first, 100, {1, 1}, {0, 0});
    pos.format.extra_time = pos.format.shootout = true;
    const Match m = match_at(pos, ModelParams{});
    CHECK(json_number(r.out, "home", r.out.find("\"advance\"")) == m.outputs().p_advance_home);
    CHECK(json_number(r.out, "away", r.out.find("\"advance\"")) == m.outputs().p_advance_away);
    CHECK(json_number(r.out, "draw") == m.outputs().p_draw);

    const auto s = calc("--prior 1.5,1.0 --minute 90+3 --stoppage 5 --score 0-0 --json");
    REQUIRE(s.exit_code == 0);
    MatchPosition late = position(1.5, 1.0, Period::second_half, 93, {0, 0}, {0, 0});
    late.stoppage_minutes = 5;
    CHECK(json_number(s.out, "draw") == match_at(late, ModelParams{}).outputs().p_draw);
    CHECK(json_number(s.out, "draw") > 0.8);
}

TEST_CASE("calc reads a parameter file", "[calc]") {
    const auto dir = test::scratch_dir("calc-params");
    ModelParams plain = ModelParams::plain_poisson();
    save_params_file(plain, (dir / "plain.json").string());
    const auto r =
        calc("--prior 1.4,1.2 --minute 30 --params " + (dir / "plain.json").string() + " --json");
    REQUIRE(r.exit_code == 0);
    const Match m = match_at(position(1.4, 1.2, Period::first_half, 30, {0, 0}, {0, 0}), plain);
    CHECK(json_number(r.out, "home") == m.outputs().p_home);
    const Match full =
        match_at(position(1.4, 1.2, Period::first_half, 30, {0, 0}, {0, 0}), ModelParams{});
    CHECK(json_number(r.out, "home") != full.outputs().p_home);  // the file made a difference
}

TEST_CASE("calc prints a table by default", "[calc]") {
    const auto r = calc("--prior 1.6,1.1 --minute 45+1 --score 0-1");
    REQUIRE(r.exit_code == 0);
    CHECK(r.out.find("full time") != std::string::npos);
    CHECK(r.out.find("next goal") != std::string::npos);
    CHECK(r.out.find("first_half") != std::string::npos);
}

TEST_CASE("calc refuses bad values with exit 2 and names the option", "[calc]") {
    const std::pair<const char*, const char*> cases[] = {
        {"--prior 1.6 --minute 10", "--prior"},
        {"--prior 1.6,x --minute 10", "--prior"},
        {"--prior 1.6,1.1 --minute abc", "--minute"},
        {"--prior 1.6,1.1 --minute 60+2", "--minute"},
        {"--prior 1.6,1.1 --minute 200", "--minute"},
        {"--prior 1.6,1.1 --score 1:0", "--score"},
        {"--prior 1.6,1.1 --reds 0-9", "--reds"},
        {"--prior 1.6,1.1 --format cup", "--format"},
        {"--prior 1.6,1.1 --stoppage 45", "--stoppage"},
        {"--prior 1.2,1.2 --format knockout --minute 100 --score 1-0", "extra time"},
    };
    for (const auto& [args, named] : cases) {
        INFO(args);
        const auto r = calc(std::string(args) + " 2>&1");
        CHECK(r.exit_code == 2);
        CHECK(r.out.find(named) != std::string::npos);
    }
    const auto missing = calc("--prior 1.6,1.1 --params /nonexistent/liveprob-params.json 2>&1");
    CHECK(missing.exit_code == 1);
}
