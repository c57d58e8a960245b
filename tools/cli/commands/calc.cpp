// `liveprob calc`: the outputs for one match position given on the command line, for analysts
// and for checking. The position is reached through the same Match API the service uses
// (liveprob/core/position.hpp), so calc and the live engine agree exactly.
#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "command_registry.hpp"
#include "liveprob/core/position.hpp"
#include "liveprob/core/validate.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace {

using liveprob::cli::UsageError;
namespace lp = liveprob;

struct CalcOptions {
    std::string prior;
    std::string minute = "0";
    std::string score = "0-0";
    std::string reds = "0-0";
    std::optional<int> stoppage;
    std::string format = "league";
    std::string params_path;
    bool json = false;
};

double parse_number(const std::string& text, const std::string& option) {
    double value = 0.0;
    const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (ec != std::errc() || end != text.data() + text.size() || !std::isfinite(value)) {
        throw UsageError(option + ": '" + text + "' is not a number");
    }
    return value;
}

int parse_count(const std::string& text, const std::string& option) {
    int value = 0;
    const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (ec != std::errc() || end != text.data() + text.size() || value < 0) {
        throw UsageError(option + ": '" + text + "' is not a whole number >= 0");
    }
    return value;
}

// "A<sep>B" into its two halves.
std::pair<std::string, std::string> split_pair(const std::string& text, char sep,
                                               const std::string& option, const char* shape) {
    const auto at = text.find(sep);
    if (at == std::string::npos || text.find(sep, at + 1) != std::string::npos) {
        throw UsageError(option + ": expected " + shape + ", got '" + text + "'");
    }
    return {text.substr(0, at), text.substr(at + 1)};
}

lp::core::PriorMeans parse_prior(const std::string& text) {
    if (text.empty()) throw UsageError("--prior is required (expected regulation goals H,A)");
    const auto [h, a] = split_pair(text, ',', "--prior", "H,A (expected regulation goals)");
    const lp::core::PriorMeans prior{parse_number(h, "--prior"), parse_number(a, "--prior")};
    // The engine's own limits, so anything accepted here prices.
    if (const auto problem = lp::core::validate_prior(prior))
        throw UsageError("--prior: " + problem->describe());
    return prior;
}

std::array<int, 2> parse_tally(const std::string& text, const std::string& option, int most) {
    const auto [h, a] = split_pair(text, '-', option, "H-A");
    const std::array<int, 2> tally{parse_count(h, option), parse_count(a, option)};
    if (tally[0] > most || tally[1] > most) {
        throw UsageError(option + ": at most " + std::to_string(most) + " per side");
    }
    return tally;
}

lp::core::CompetitionFormat parse_format(const std::string& text) {
    lp::core::CompetitionFormat format;
    if (text == "knockout") {
        format.extra_time = true;
        format.shootout = true;
    } else if (text != "league") {
        throw UsageError("--format: expected league or knockout, got '" + text + "'");
    }
    return format;
}

// "67", "67.5" or "45+2" (minute 2 of the stoppage after the 45th) into a clock reading.
lp::core::MatchClock parse_minute(const std::string& text,
                                  const lp::core::CompetitionFormat& format) {
    using lp::core::Period;
    const bool knockout = format.extra_time;
    const double half = format.half_minutes;
    const double extra = format.extra_half_minutes;
    const std::vector<std::pair<double, Period>> ends = {
        {half, Period::first_half},
        {2 * half, Period::second_half},
        {2 * half + extra, Period::extra_first},
        {2 * half + 2 * extra, Period::extra_second}};
    auto clock_at = [](Period p, double minute) {
        return lp::core::MatchClock{p, static_cast<std::uint32_t>(std::llround(minute * 60'000.0))};
    };
    if (const auto plus = text.find('+'); plus != std::string::npos) {
        const auto [base_text, added_text] =
            split_pair(text, '+', "--minute", "M or END+S (e.g. 45+2)");
        const double base = parse_number(base_text, "--minute");
        const double added = parse_number(added_text, "--minute");
        if (added < 0.0 || added > 30.0)
            throw UsageError("--minute: stoppage minutes must be 0..30");
        for (const auto& [end, period] : ends) {
            if (base == end && (knockout || period <= Period::second_half))
                return clock_at(period, base + added);
        }
        throw UsageError("--minute: '" + base_text + "+' names no end of a half in this format");
    }
    const double minute = parse_number(text, "--minute");
    if (minute < 0.0) throw UsageError("--minute: must be >= 0");
    if (minute < half) return clock_at(Period::first_half, minute);
    if (minute <= 2 * half || !knockout) {
        if (minute > 2 * half + 30.0) throw UsageError("--minute: beyond the end of the match");
        return clock_at(Period::second_half, minute);
    }
    if (minute < 2 * half + extra) return clock_at(Period::extra_first, minute);
    if (minute <= 2 * half + 2 * extra) return clock_at(Period::extra_second, minute);
    throw UsageError("--minute: beyond the end of extra time (use 120+S for its stoppage)");
}

std::string pct(double v) { return fmt::format("{:5.1f}%", 100.0 * v); }

void print_json(const lp::core::Outputs& o, const lp::core::MatchPosition& position,
                const std::string& format_name) {
    std::string s;
    lp::protocol::JsonWriter json(s);
    auto home_away = [&](std::string_view name, double home, double away) {
        json.key(name).begin_object().member("home", home).member("away", away).end_object();
    };
    json.begin_object().member("home", o.p_home).member("draw", o.p_draw).member("away", o.p_away);
    if (o.has_advance) {
        home_away("advance", o.p_advance_home, o.p_advance_away);
    } else {
        json.key("advance").null();
    }
    home_away("expected_goals", o.expected_home_goals, o.expected_away_goals);
    json.key("next_goal")
        .begin_object()
        .member("home", o.next_goal_home)
        .member("away", o.next_goal_away)
        .member("none", o.next_goal_none)
        .end_object();
    json.key("over").begin_object();
    for (int i = 0; i < lp::core::kTotalsLines; ++i) {
        json.member(fmt::format("{:.1f}", lp::core::totals_line(i)),
                    o.p_over[static_cast<std::size_t>(i)]);
    }
    json.end_object().member("both_score", o.p_both_score).member("tail_mass", o.tail_mass);
    json.key("goals_added").begin_array();
    for (const auto& row : o.goals_added) {
        json.begin_array();
        for (const double p : row) json.value(p);
        json.end_array();
    }
    json.end_array();
    json.key("position")
        .begin_object()
        .member("period", lp::core::period_name(position.clock.period))
        .member("clock_ms", position.clock.clock_ms);
    json.key("score").begin_array().value(position.score[0]).value(position.score[1]).end_array();
    json.key("reds").begin_array().value(position.reds[0]).value(position.reds[1]).end_array();
    json.member("format", format_name).end_object().end_object();
    fmt::print("{}\n", s);
}

void print_table(const lp::core::Outputs& o, const lp::core::MatchPosition& position,
                 const std::string& format_name) {
    const auto& c = position.clock;
    fmt::print("position      {}' ({}), score {}-{}, red cards {}-{}, {}\n",
               fmt::format("{:.1f}", c.clock_ms / 60'000.0), lp::core::period_name(c.period),
               position.score[0], position.score[1], position.reds[0], position.reds[1],
               format_name);
    fmt::print("full time     home {}  draw {}  away {}\n", pct(o.p_home), pct(o.p_draw),
               pct(o.p_away));
    if (o.has_advance)
        fmt::print("to advance    home {}  away {}\n", pct(o.p_advance_home),
                   pct(o.p_advance_away));
    fmt::print("final goals   home {:.2f}  away {:.2f} (expected)\n", o.expected_home_goals,
               o.expected_away_goals);
    fmt::print("next goal     home {}  away {}  none {}\n", pct(o.next_goal_home),
               pct(o.next_goal_away), pct(o.next_goal_none));
    fmt::print("total over   ");
    for (int i = 0; i < lp::core::kTotalsLines; ++i) {
        fmt::print(" {:.1f} {}", lp::core::totals_line(i),
                   pct(o.p_over[static_cast<std::size_t>(i)]));
    }
    fmt::print("\nboth score    {}\n", pct(o.p_both_score));
    // The five likeliest final scores.
    struct Cell {
        int home;
        int away;
        double p;
    };
    std::vector<Cell> cells;
    for (int i = 0; i < lp::core::kGrid; ++i) {
        for (int j = 0; j < lp::core::kGrid; ++j) {
            cells.push_back(
                {position.score[0] + i, position.score[1] + j,
                 o.goals_added[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)]});
        }
    }
    std::partial_sort(cells.begin(), cells.begin() + 5, cells.end(),
                      [](const Cell& a, const Cell& b) { return a.p > b.p; });
    fmt::print("likeliest     ");
    for (int k = 0; k < 5; ++k) {
        const Cell& cell = cells[static_cast<std::size_t>(k)];
        fmt::print("{}-{} {}{}", cell.home, cell.away, pct(cell.p), k < 4 ? "   " : "\n");
    }
    fmt::print("grid tail     {:.3g} (probability beyond {} more goals for a side)\n", o.tail_mass,
               lp::core::kMaxGoalsAdded);
}

int run_calc(const CalcOptions& options) {
    lp::core::MatchPosition position;
    position.prior = parse_prior(options.prior);
    position.format = parse_format(options.format);
    position.clock = parse_minute(options.minute, position.format);
    position.score = parse_tally(options.score, "--score", 99);
    position.reds = parse_tally(options.reds, "--reds", 5);
    if (options.stoppage) {
        if (*options.stoppage < 0 || *options.stoppage > 30)
            throw UsageError("--stoppage: must be 0..30 minutes");
        position.stoppage_minutes = options.stoppage;
    }
    lp::core::ModelParams params;
    if (!options.params_path.empty()) params = lp::files::load_params_file(options.params_path);

    std::optional<lp::core::Match> match;
    try {
        match.emplace(lp::core::match_at(position, params));
    } catch (const std::invalid_argument& e) {
        throw UsageError(std::string("the position cannot be priced: ") + e.what());
    }
    if (options.json) {
        print_json(match->outputs(), position, options.format);
    } else {
        print_table(match->outputs(), position, options.format);
    }
    return liveprob::cli::kExitOk;
}

const liveprob::cli::Registration registration{
    {"calc", "print the live outputs for one match position (minute, score, red cards)",
     [](CLI::App& app) {
         auto o = std::make_shared<CalcOptions>();
         app.add_option("--prior", o->prior, "expected regulation goals H,A (e.g. 1.6,1.1)")
             ->required();
         app.add_option("--minute", o->minute,
                        "match minute: 67, 67.5, or END+S in stoppage (45+2, 90+4)");
         app.add_option("--score", o->score,
                        "current score H-A (in extra time: the regulation score)");
         app.add_option("--reds", o->reds, "red cards so far H-A");
         app.add_option("--stoppage", o->stoppage,
                        "stoppage minutes announced for the current half");
         app.add_option("--format", o->format,
                        "league (default) or knockout (extra time, then a shoot-out)");
         app.add_option("--params", o->params_path, "model parameter file (defaults built in)");
         app.add_flag("--json", o->json, "print one JSON object (home, draw, away, ...)");
         return [o] { return run_calc(*o); };
     }}};

}  // namespace
