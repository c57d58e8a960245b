#include "liveprob/files/ratings_file.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "liveprob/files/csv_line.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/protocol/json_writer.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::files {
namespace {

constexpr std::string_view kKind = "liveprob-team-ratings";

// Standard errors that could not be estimated are NaN in memory and null in the file.
void number_or_null(protocol::JsonWriter& json, std::string_view key, double x) {
    json.key(key);
    if (std::isfinite(x)) json.value(x);
    else json.null();
}

class Fields {
public:
    Fields(simdjson::dom::object o, std::string where, std::string path)
        : o_(o), where_(std::move(where)), path_(std::move(path)) {}

    [[noreturn]] void fail(std::string_view key, std::string_view why) const {
        throw std::runtime_error(fmt::format("{}: key '{}{}': {}", path_, where_, key, why));
    }
    double number(std::string_view key) const {
        double x = 0.0;
        if (o_[key].get_double().get(x) != simdjson::SUCCESS) fail(key, "missing or not a number");
        return x;
    }
    std::string text(std::string_view key) const {
        std::string_view s;
        if (o_[key].get_string().get(s) != simdjson::SUCCESS) fail(key, "missing or not a string");
        return std::string(s);
    }
    bool flag(std::string_view key) const {
        bool b = false;
        if (o_[key].get_bool().get(b) != simdjson::SUCCESS) fail(key, "missing or not true/false");
        return b;
    }
    simdjson::dom::element raw(std::string_view key) const {
        simdjson::dom::element e;
        if (o_[key].get(e) != simdjson::SUCCESS) fail(key, "missing");
        return e;
    }

private:
    simdjson::dom::object o_;
    std::string where_, path_;
};

}  // namespace

std::string ratings_to_json(const fit::Ratings& r) {
    std::string out;
    protocol::JsonWriter json(out, protocol::JsonLayout::indented);
    json.begin_object().member("kind", kKind).member("version", 1).member("model", "dixon-coles");
    json.key("as_of");
    if (r.as_of_day) json.value(fit::iso_date(*r.as_of_day));
    else json.null();
    number_or_null(json, "decay_per_day", r.xi);
    number_or_null(json, "low_score_rho", r.rho);
    number_or_null(json, "low_score_rho_se", r.rho_se);
    number_or_null(json, "intercept", r.intercept);
    number_or_null(json, "intercept_se", r.intercept_se);
    number_or_null(json, "home_advantage", r.home_advantage);
    number_or_null(json, "home_advantage_se", r.home_advantage_se);
    const auto& d = r.diagnostics;
    json.key("fit").begin_object_on_one_line();
    number_or_null(json, "log_likelihood", d.log_likelihood);
    json.member("matches", d.matches)
        .member("iterations", d.iterations)
        .member("converged", d.converged);
    json.key("warnings").begin_array();
    for (const auto& warning : d.warnings) json.value(warning);
    json.end_array().end_object();
    json.key("teams").begin_array();
    for (const auto& t : r.teams) {
        json.begin_object_on_one_line().member("name", t.name);
        number_or_null(json, "attack", t.attack);
        number_or_null(json, "attack_se", t.attack_se);
        number_or_null(json, "defence", t.defence);
        number_or_null(json, "defence_se", t.defence_se);
        json.member("matches", t.matches);
        number_or_null(json, "weighted_matches", t.weighted_matches);
        json.member("shrunk", t.shrunk).end_object();
    }
    json.end_array().end_object();
    out.push_back('\n');
    return out;
}

void save_ratings_file(const fit::Ratings& ratings, const std::string& path) {
    protocol::write_file_atomically(path, ratings_to_json(ratings), "the ratings file");
}

fit::Ratings load_ratings_file(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the ratings file");
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    if (auto e = parser.parse(text).get(root); e != simdjson::SUCCESS)
        throw std::runtime_error(
            fmt::format("{}: not valid JSON: {}", path, simdjson::error_message(e)));
    simdjson::dom::object top;
    if (root.get_object().get(top) != simdjson::SUCCESS)
        throw std::runtime_error(fmt::format("{}: expected a JSON object", path));
    const Fields f(top, "", path);
    if (f.text("kind") != kKind) f.fail("kind", fmt::format("expected \"{}\"", kKind));
    if (f.number("version") != 1.0) f.fail("version", "this program reads version 1");
    fit::Ratings r;
    r.xi = f.number("decay_per_day");
    r.rho = f.number("low_score_rho");
    r.intercept = f.number("intercept");
    r.home_advantage = f.number("home_advantage");
    if (const auto as_of = f.raw("as_of"); !as_of.is_null()) {
        std::string_view s;
        std::optional<int> day;
        if (as_of.get_string().get(s) == simdjson::SUCCESS) day = fit::parse_iso_date(s);
        if (!day) f.fail("as_of", "expected null or a date YYYY-MM-DD");
        r.as_of_day = day;
    }
    simdjson::dom::array teams;
    if (f.raw("teams").get_array().get(teams) != simdjson::SUCCESS)
        f.fail("teams", "expected an array");
    std::size_t i = 0;
    for (simdjson::dom::element e : teams) {
        simdjson::dom::object o;
        const std::string where = fmt::format("teams[{}].", i++);
        if (e.get_object().get(o) != simdjson::SUCCESS)
            throw std::runtime_error(fmt::format("{}: {} is not an object", path, where));
        const Fields t(o, where, path);
        fit::TeamRating team;
        team.name = t.text("name");
        team.attack = t.number("attack");
        team.defence = t.number("defence");
        team.shrunk = t.flag("shrunk");
        if (!std::isfinite(team.attack) || !std::isfinite(team.defence))
            t.fail("attack", "not finite");
        r.teams.push_back(std::move(team));
    }
    std::sort(r.teams.begin(), r.teams.end(),
              [](const auto& a, const auto& b) { return a.name < b.name; });
    for (std::size_t k = 1; k < r.teams.size(); ++k)
        if (r.teams[k].name == r.teams[k - 1].name)
            throw std::runtime_error(
                fmt::format("{}: team '{}' appears twice", path, r.teams[k].name));
    return r;
}

std::map<std::string, std::string> load_alias_file(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the alias file");
    std::map<std::string, std::string> aliases;
    std::size_t start = 0;
    int line = 0;
    while (start < text.size()) {
        std::size_t end = text.find('\n', start);
        if (end == std::string::npos) end = text.size();
        const std::string_view row(text.data() + start, end - start);
        start = end + 1;
        ++line;
        if (row.empty() || row == "\r") continue;
        const auto fields = split_csv_line(row);
        if (line == 1) {
            if (fields != std::vector<std::string>{"feed_name", "rating_name"})
                throw std::runtime_error(
                    fmt::format("{}:1: header must be feed_name,rating_name", path));
            continue;
        }
        if (fields.size() != 2 || fields[0].empty() || fields[1].empty())
            throw std::runtime_error(
                fmt::format("{}:{}: expected two non-empty columns", path, line));
        if (!aliases.emplace(fields[0], fields[1]).second)
            throw std::runtime_error(
                fmt::format("{}:{}: feed name '{}' is listed twice", path, line, fields[0]));
    }
    return aliases;
}

}  // namespace liveprob::files
