#include "liveprob/files/ratings_file.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "liveprob/files/csv_line.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "liveprob/fit/calendar.hpp"

namespace liveprob::files {
namespace {

constexpr std::string_view kKind = "liveprob-team-ratings";

std::string json_text(std::string_view s) {
    std::string out = "\"";
    for (char c : s) {
        if (c == '"' || c == '\\') out += '\\';
        if (static_cast<unsigned char>(c) < 0x20) {
            out += fmt::format("\\u{:04x}", static_cast<unsigned>(static_cast<unsigned char>(c)));
            continue;
        }
        out += c;
    }
    return out + "\"";
}

std::string num(double x) { return std::isfinite(x) ? fmt::format("{:.17g}", x) : "null"; }

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
    std::string out = fmt::format("{{\n  \"kind\": \"{}\",\n  \"version\": 1,\n  \"model\": \"dixon-coles\",\n", kKind);
    out += fmt::format("  \"as_of\": {},\n", r.as_of_day ? json_text(fit::iso_date(*r.as_of_day)) : "null");
    out += fmt::format("  \"decay_per_day\": {},\n  \"low_score_rho\": {},\n  \"low_score_rho_se\": {},\n",
                       num(r.xi), num(r.rho), num(r.rho_se));
    out += fmt::format("  \"intercept\": {},\n  \"intercept_se\": {},\n", num(r.intercept), num(r.intercept_se));
    out += fmt::format("  \"home_advantage\": {},\n  \"home_advantage_se\": {},\n", num(r.home_advantage),
                       num(r.home_advantage_se));
    const auto& d = r.diagnostics;
    out += fmt::format("  \"fit\": {{\"log_likelihood\": {}, \"matches\": {}, \"iterations\": {}, \"converged\": {}, "
                       "\"warnings\": [",
                       num(d.log_likelihood), d.matches, d.iterations, d.converged);
    for (std::size_t i = 0; i < d.warnings.size(); ++i) out += (i ? ", " : "") + json_text(d.warnings[i]);
    out += "]},\n  \"teams\": [";
    for (std::size_t i = 0; i < r.teams.size(); ++i) {
        const auto& t = r.teams[i];
        out += fmt::format("{}\n    {{\"name\": {}, \"attack\": {}, \"attack_se\": {}, \"defence\": {}, "
                           "\"defence_se\": {}, \"matches\": {}, \"weighted_matches\": {}, \"shrunk\": {}}}",
                           i ? "," : "", json_text(t.name), num(t.attack), num(t.attack_se), num(t.defence),
                           num(t.defence_se), t.matches, num(t.weighted_matches), t.shrunk);
    }
    out += "\n  ]\n}\n";
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
        throw std::runtime_error(fmt::format("{}: not valid JSON: {}", path, simdjson::error_message(e)));
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
    if (f.raw("teams").get_array().get(teams) != simdjson::SUCCESS) f.fail("teams", "expected an array");
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
        if (!std::isfinite(team.attack) || !std::isfinite(team.defence)) t.fail("attack", "not finite");
        r.teams.push_back(std::move(team));
    }
    std::sort(r.teams.begin(), r.teams.end(), [](const auto& a, const auto& b) { return a.name < b.name; });
    for (std::size_t k = 1; k < r.teams.size(); ++k)
        if (r.teams[k].name == r.teams[k - 1].name)
            throw std::runtime_error(fmt::format("{}: team '{}' appears twice", path, r.teams[k].name));
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
                throw std::runtime_error(fmt::format("{}:1: header must be feed_name,rating_name", path));
            continue;
        }
        if (fields.size() != 2 || fields[0].empty() || fields[1].empty())
            throw std::runtime_error(fmt::format("{}:{}: expected two non-empty columns", path, line));
        if (!aliases.emplace(fields[0], fields[1]).second)
            throw std::runtime_error(fmt::format("{}:{}: feed name '{}' is listed twice", path, line, fields[0]));
    }
    return aliases;
}

}  // namespace liveprob::files
