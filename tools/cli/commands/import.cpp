// `liveprob import`: recorded streams from the open datasets' formats. Each match whose goal
// records are complete becomes the feed a live source would have sent (adapters/timeline_feed.hpp),
// with a pre-match prior from the ratings fitted walk-forward on the results strictly before its
// day. Streams are written one file per year (international) or per championship file.
#include <fmt/format.h>

#include <chrono>
#include <cmath>
#include <filesystem>
#include <iostream>
#include <map>
#include <memory>
#include <set>
#include <string>
#include <thread>
#include <vector>

#include "command_registry.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/backtest/walk_forward_priors.hpp"
#include "liveprob/datasets/league_record.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/datasets/timeline_feed.hpp"
#include "liveprob/files/ratings_file.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/team_names.hpp"
#include "progress_bar.hpp"
#include "rating_settings.hpp"

namespace liveprob::cli {
namespace {

namespace fs = std::filesystem;

inline constexpr std::uint64_t kInternationalIdBase = 10'000'000;  // + line of results.csv
inline constexpr std::uint64_t kChampionshipIdBase = 20'000'000;   // + year * 1,000 + match number
// + season's first year * 10,000 + league (its place among the folder's leagues) * 1,000 + the
// match's place in its file
inline constexpr std::uint64_t kLeagueIdBase = 100'000'000;

struct ImportOptions {
    std::string international;
    std::vector<std::string> championships;
    std::string leagues;
    double league_half_life_days = 365.0;
    bool promoted_as_relegated = false;
    std::string out;
    std::string form = "frames";
    double half_life_days = 730.0;
    std::string refit = "match-day";
    double coverage = 0.9;
    double min_matches = 6.0;
    double shrink_precision = 2.0;
    RatingModelSettings rating_model;
    std::string from, to;
    std::string aliases;
    datasets::BadRows bad_rows = datasets::BadRows::fail;
    bool quiet = false;
};

struct ImportedMatch {
    datasets::MatchTimeline timeline;
    std::uint64_t match_id = 0;
    fs::path file;            // the stream it goes to, relative to --out
    std::size_t history = 0;  // the rating history its prior is fitted on (below)
    std::vector<std::string> home_stand_ins, away_stand_ins;
};

// One rating history and the half-life of its fits: the international results with the
// championships', or one league's results (ratings fitted per league).
struct History {
    std::string name;
    std::vector<fit::MatchResult> results;
    double half_life_days = 0.0;
};

// What the league files held and how import treats it (league_record.hpp).
void print_league_checks(const datasets::LeagueRecord& r, bool promoted_as_relegated) {
    const auto& c = r.checks;
    std::cout << fmt::format(
        "leagues: {} played matches in {} leagues; left out: {} not played, {} awarded (not "
        "played: out of the ratings too), {} repeated; {} without a half-time score that ended "
        "0-0 kept with half-time 0-0, {} others without one kept in the ratings only; dates: {} "
        "outside their season, {} where a side plays twice within a day\n",
        c.played, r.leagues.size(), c.not_played, c.awarded, c.duplicates, c.half_time_inferred,
        c.half_time_missing, c.outside_season, c.side_twice_in_a_day);
    for (const auto& p : c.date_problems) std::cout << "  date to check: " << p << "\n";
    for (const auto& n : r.renames)
        std::cout << fmt::format("  renamed ({} {}): '{}' -> '{}'\n", n.league, n.season,
                                 n.old_name, n.new_name);
    std::cout << fmt::format(
        "leagues: {} renames kept as one team; {} sides promoted into their league (not in it "
        "the season before): one without a result in the fit is rated as {}\n",
        r.renames.size(), r.newcomers.size(),
        promoted_as_relegated ? "the mean of the sides relegated the season before"
                              : "the average side");
}

std::optional<int> date_option(const std::string& text, const char* name) {
    if (text.empty()) return std::nullopt;
    const auto day = fit::parse_iso_date(text);
    if (!day) throw UsageError(fmt::format("{}: '{}' is not a date YYYY-MM-DD", name, text));
    return day;
}

// What was read and left out, counting only the matches inside the --from/--to window.
void print_skips(const std::string& what, const datasets::TimelinesRead& read,
                 std::optional<int> from, std::optional<int> to) {
    const auto s = read.skips_between(from, to);
    std::cout << fmt::format(
        "{}: {} matches with complete goal records{}; left out: {} without a result, {} "
        "unreadable rows skipped, {} repeated, {} with goal records incomplete, {} in competitions "
        "and years without goal records, {} second legs of two-legged ties\n",
        what, read.taken_between(from, to), from || to ? " in the chosen dates" : "", s.no_result,
        s.unreadable, s.duplicates, s.goals_incomplete, s.not_covered, s.aggregate_tie);
}

// Championship spellings mapped to the results file's (`--aliases`); with the international
// results as the history, every championship side must be one of their sides.
class SideNames {
public:
    explicit SideNames(const std::string& alias_file)
        : aliases_(alias_file.empty() ? std::map<std::string, std::string>{}
                                      : files::load_alias_file(alias_file)) {}

    const std::map<std::string, std::string>& aliases() const { return aliases_; }
    void rename(std::string& name) const {
        if (const auto it = aliases_.find(name); it != aliases_.end()) name = it->second;
    }
    // Throws when `name` (already renamed) is not a side of `known`, naming the closest ones.
    static void check_known(const std::string& name, const std::set<std::string>& known,
                            const std::string& where) {
        if (known.contains(name)) return;
        const std::vector<std::string> list(known.begin(), known.end());
        std::string closest;
        for (const auto& c : fit::closest_names(name, list))
            closest += (closest.empty() ? "" : ", ") + fmt::format("'{}'", c);
        throw std::runtime_error(fmt::format(
            "{}: side '{}' is not in the international results (closest: {}); map it with "
            "--aliases FILE (feed_name,rating_name)",
            where, name, closest));
    }

private:
    std::map<std::string, std::string> aliases_;
};

int run_import(const ImportOptions& o) {
    if (o.international.empty() && o.championships.empty() && o.leagues.empty()) {
        throw UsageError(
            "nothing to import: give --international DIR, --championship FILE and/or --leagues "
            "DIR");
    }
    if (o.league_half_life_days < 0.0)
        throw UsageError("--league-half-life must be 0 (no decay) or positive");
    if (o.half_life_days < 0.0) throw UsageError("--half-life must be 0 (no decay) or positive");
    if (o.coverage < 0.0 || o.coverage > 1.0) throw UsageError("--coverage must lie in [0, 1]");
    if (o.refit != "match-day" && o.refit != "month")
        throw UsageError("--refit must be match-day or month");
    backtest::StreamForm form{};
    try {
        form = backtest::parse_stream_form(o.form);
    } catch (const std::invalid_argument& e) {
        throw UsageError(e.what());
    }
    const auto from = date_option(o.from, "--from"), to = date_option(o.to, "--to");
    const char* ext = form == backtest::StreamForm::frames    ? "stream"
                      : form == backtest::StreamForm::journal ? "journal"
                                                              : "jsonl";
    using Clock = std::chrono::steady_clock;
    auto since = [](Clock::time_point t) {
        return std::chrono::duration<double>(Clock::now() - t).count();
    };
    const auto start = Clock::now();

    std::vector<ImportedMatch> matches;
    std::vector<History> histories{{"international", {}, o.half_life_days}};
    std::vector<fit::MatchResult>& history = histories[0].results;
    const SideNames names(o.aliases);
    std::set<std::string> international_sides;
    auto wanted = [&](int day) { return (!from || day >= *from) && (!to || day < *to); };
    if (!o.international.empty()) {
        auto read =
            datasets::read_international_timelines(o.international, {o.coverage, o.bad_rows});
        print_skips("international", read, from, to);
        auto results = datasets::read_international_results(
            (fs::path(o.international) / "results.csv").string(), o.bad_rows);
        history = std::move(results.matches);
        for (auto& r : history) {
            names.rename(r.home);
            names.rename(r.away);
            international_sides.insert(r.home);
            international_sides.insert(r.away);
        }
        for (auto& t : read.matches) {
            if (!wanted(t.day)) continue;
            names.rename(t.home);
            names.rename(t.away);
            const std::uint64_t id = kInternationalIdBase + t.origin_number;
            fs::path file = fs::path("international") /
                            fmt::format("{}.{}", fit::iso_date(t.day).substr(0, 4), ext);
            matches.push_back({std::move(t), id, std::move(file), 0, {}, {}});
        }
    }
    int repeated_results = 0;
    for (const auto& path : o.championships) {
        auto read = datasets::read_championship_timelines(path);
        print_skips(path, read, from, to);
        // Every result of the file joins the history the later fits learn from (also those
        // whose goal records are incomplete), once: a result the international file already
        // holds is not counted twice.
        auto results = datasets::read_championship_results(path).matches;
        for (auto& r : results) {
            names.rename(r.home);
            names.rename(r.away);
            if (!international_sides.empty()) {
                SideNames::check_known(r.home, international_sides, path);
                SideNames::check_known(r.away, international_sides, path);
            }
        }
        repeated_results += datasets::append_new_results(history, results);
        if (read.matches.empty()) continue;
        const std::string year = fit::iso_date(read.matches.front().day).substr(0, 4);
        const fs::path file =
            fs::path("championship") / fmt::format("{}-{}-{}.{}",
                                                   fs::path(path).parent_path().filename().string(),
                                                   fs::path(path).stem().string(), year, ext);
        for (auto& t : read.matches) {
            if (!wanted(t.day)) continue;
            names.rename(t.home);
            names.rename(t.away);
            if (t.origin_number >= 1000)
                throw std::runtime_error(t.origin + ": match number too large for an id");
            const std::uint64_t id = kChampionshipIdBase +
                                     static_cast<std::uint64_t>(std::stoi(year)) * 1000 +
                                     t.origin_number;
            matches.push_back({std::move(t), id, file, 0, {}, {}});
        }
    }
    if (repeated_results > 0)
        std::cout << fmt::format(
            "{} championship results already in the international results counted once\n",
            repeated_results);
    if (!o.leagues.empty()) {
        const auto record = datasets::read_league_folder(o.leagues, names.aliases());
        print_league_checks(record, o.promoted_as_relegated);
        std::map<std::string, std::size_t> history_of;
        for (std::size_t l = 0; l < record.leagues.size(); ++l) {
            history_of[record.leagues[l]] = histories.size();
            histories.push_back(
                {record.leagues[l], record.results.at(record.leagues[l]), o.league_half_life_days});
        }
        for (std::size_t i = 0; i < record.matches.size(); ++i) {
            const auto& t = record.matches[i];
            if (!wanted(t.day)) continue;
            const std::string& season = record.match_season[i];
            const auto league = static_cast<std::uint64_t>(
                std::find(record.leagues.begin(), record.leagues.end(), t.competition) -
                record.leagues.begin());
            if (league >= 10 || t.origin_number >= 1000)
                throw std::runtime_error(t.origin + ": too many leagues or matches for an id");
            ImportedMatch m{
                t,
                kLeagueIdBase +
                    static_cast<std::uint64_t>(std::stoi(season.substr(0, 4))) * 10'000 +
                    league * 1000 + t.origin_number,
                fs::path("leagues") / fmt::format("{}-{}.{}", t.competition, season, ext),
                history_of.at(t.competition),
                {},
                {}};
            if (const auto* s = record.stand_ins(t.competition, season, t.home);
                s && o.promoted_as_relegated)
                m.home_stand_ins = *s;
            if (const auto* s = record.stand_ins(t.competition, season, t.away);
                s && o.promoted_as_relegated)
                m.away_stand_ins = *s;
            matches.push_back(std::move(m));
        }
    }
    std::set<std::uint64_t> ids;
    for (const auto& m : matches) {
        if (!ids.insert(m.match_id).second)
            throw std::runtime_error(
                fmt::format("{}: match id {} used twice", m.timeline.origin, m.match_id));
    }

    const double read_seconds = since(start);
    const auto fit_start = Clock::now();
    backtest::WalkForwardOptions wf;
    wf.fit.min_matches = o.min_matches;
    wf.fit.shrink_precision = o.shrink_precision;
    o.rating_model.apply_to(wf.fit);
    wf.fit.min_weight = kMinMatchWeight;
    wf.fit.standard_errors = false;
    wf.schedule =
        o.refit == "month" ? backtest::RefitSchedule::month : backtest::RefitSchedule::match_day;
    wf.threads = std::max(1U, std::thread::hardware_concurrency());
    ProgressBar bar("import: walk-forward fits", "fits", o.quiet);
    std::size_t fits_before = 0, fits_in_all = 0;
    wf.progress = [&](std::size_t done, std::size_t total) {
        bar.update(fits_before + done, std::max(fits_in_all, fits_before + total));
    };
    // Each history's matches priced by fits on that history alone.
    backtest::WalkForwardPriors priors;
    priors.priors.resize(matches.size());
    for (std::size_t h = 0; h < histories.size(); ++h) {
        std::vector<backtest::FixtureToPrice> fixtures;
        std::vector<std::size_t> members;
        for (std::size_t i = 0; i < matches.size(); ++i) {
            if (matches[i].history != h) continue;
            const auto& t = matches[i].timeline;
            fixtures.push_back({t.day, t.home, t.away, t.neutral, matches[i].home_stand_ins,
                                matches[i].away_stand_ins});
            members.push_back(i);
        }
        if (fixtures.empty()) continue;
        wf.fit.xi =
            histories[h].half_life_days > 0.0 ? std::log(2.0) / histories[h].half_life_days : 0.0;
        const auto part = backtest::walk_forward_priors(histories[h].results, fixtures, wf);
        fits_before += part.refits + part.no_history;
        for (std::size_t k = 0; k < members.size(); ++k) priors.priors[members[k]] = part.priors[k];
        priors.refits += part.refits;
        priors.not_converged += part.not_converged;
        priors.unrated_sides += part.unrated_sides;
        priors.stood_in_sides += part.stood_in_sides;
        priors.held_at_maximum += part.held_at_maximum;
        priors.no_history += part.no_history;
    }
    const double fit_seconds = since(fit_start);
    const auto write_start = Clock::now();

    std::map<fs::path, std::vector<core::InboundMessage>> files;
    std::size_t written = 0, shootouts = 0, extra_time = 0;
    for (std::size_t i = 0; i < matches.size(); ++i) {
        const core::PriorMeans& prior = priors.priors[i];
        if (prior.home_goals <= 0.0 || prior.away_goals <= 0.0)
            continue;  // no history before its day
        auto feed = datasets::feed_from_timeline(matches[i].timeline, matches[i].match_id, prior);
        auto& stream = files[matches[i].file];
        stream.insert(stream.end(), std::make_move_iterator(feed.begin()),
                      std::make_move_iterator(feed.end()));
        ++written;
        if (matches[i].timeline.shootout) ++shootouts;
        if (matches[i].timeline.extra_time) ++extra_time;
    }
    for (const auto& [file, messages] : files) {
        fs::create_directories((fs::path(o.out) / file).parent_path());
        backtest::write_stream(fs::path(o.out) / file, messages, form);
    }
    std::cout << fmt::format(
        "walk-forward priors: {} fits ({} not converged), {} sides without an earlier result "
        "({} rated as their stand-ins, the rest as average), {} expected-goal values held at {}, "
        "{} matches before any result left out\n",
        priors.refits, priors.not_converged, priors.unrated_sides, priors.stood_in_sides,
        priors.held_at_maximum, wf.max_expected_goals, priors.no_history);
    std::cout << fmt::format(
        "wrote {} matches ({} with extra time, {} shoot-outs with reconstructed kicks) in {} "
        "stream files under {}\n",
        written, extra_time, shootouts, files.size(), o.out);
    std::cout << fmt::format(
        "{:.2f} s in all: files read {:.2f} s, walk-forward fits {:.2f} s, streams written {:.2f} "
        "s\n",
        since(start), read_seconds, fit_seconds, since(write_start));
    return kExitOk;
}

const Registration registration{{
    "import",
    "build recorded streams from the open datasets, with walk-forward fitted priors",
    [](CLI::App& sub) -> std::function<int()> {
        auto o = std::make_shared<ImportOptions>();
        sub.add_option("--international", o->international,
                       "folder with results.csv, goalscorers.csv and shootouts.csv");
        sub.add_option("--championship", o->championships,
                       "championship JSON file (rounds of matches with goals)");
        sub.add_option("--leagues", o->leagues,
                       "folder of league seasons (SEASON/LEAGUE.json: half-time and full-time "
                       "scores), ratings fitted per league");
        sub.add_option("--league-half-life", o->league_half_life_days,
                       "league rating fits: time-decay half-life in days (0: no decay)")
            ->capture_default_str();
        sub.add_option_function<std::string>(
               "--promoted-rating",
               [o](const std::string& v) { o->promoted_as_relegated = v == "relegated"; },
               "a promoted side without results in the fit: rated as the sides relegated the "
               "season before (relegated) or as the average side (average, the default)")
            ->check(CLI::IsMember({"relegated", "average"}));
        sub.add_option("--out", o->out, "directory for the streams")->required();
        sub.add_option("--form", o->form,
                       "frames (size-prefixed, the journal's format) or json (JSON lines)")
            ->capture_default_str();
        sub.add_option("--half-life", o->half_life_days,
                       "rating fit: time-decay half-life in days (0: no decay)")
            ->capture_default_str();
        sub.add_option(
               "--refit", o->refit,
               "match-day: one fit per match day on everything before it; month: one per month")
            ->capture_default_str();
        sub.add_option("--coverage", o->coverage,
                       "share of a competition-year's scoring matches with complete goal records "
                       "needed to take it")
            ->capture_default_str();
        sub.add_option("--min-matches", o->min_matches,
                       "rating fit: teams with fewer weighted matches are shrunk")
            ->capture_default_str();
        sub.add_option("--shrink-precision", o->shrink_precision,
                       "rating fit: prior precision for shrunk teams")
            ->capture_default_str();
        add_rating_model_options(sub, o->rating_model);
        sub.add_option("--from", o->from,
                       "import matches on or after this date (the fits still use all before)");
        sub.add_option("--to", o->to, "import matches before this date");
        sub.add_option("--aliases", o->aliases,
                       "CSV feed_name,rating_name: championship spellings mapped to the "
                       "international results' names (an unknown side is an error)");
        add_bad_rows_flag(sub, o->bad_rows);
        sub.add_flag("--quiet", o->quiet, "no progress bar");
        return [o] { return run_import(*o); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
