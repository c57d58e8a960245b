// The league files (a folder of seasons, SEASON/LEAGUE.json, each {"matches": [{date, time,
// team1, team2, score: {ht, ft}, status}]}) read as one record per league: the results the
// rating fit learns from and the matches a backtest replays, which carry the half-time and
// full-time scores only.
//
// What the files need before they can be trusted, and how it is treated here:
//  - a match without a final score (not played yet, or "cancelled"/"postponed") is left out;
//    one "awarded" (a result given at a desk, not played) is left out of the streams and of
//    the ratings;
//  - a finished match without a half-time score: when it ended 0-0 its half-time score was
//    0-0 (certain), so it is kept with it (dropping those rows would leave out a share of the
//    goalless first halves and bias the 45' scores); otherwise it stays in the ratings and is
//    left out of the streams (its half-time score is unknown), counted;
//  - dates: a match dated outside its season (1 July to 31 August of the next year) or a side
//    with two matches within a day is counted and named; such a match stays in (which of the
//    two dates is wrong cannot be told), so the count is what to look at;
//  - a club renamed between seasons stays one team: a side whose spelling the league has not
//    seen is the same team as one that left the league when their names, compared word by word
//    without club-form abbreviations (upper-case words of up to five letters), founding years
//    and the words for "of", "the", "club" and "football", agree: one contains the other when
//    the team played the season before (an abbreviation such as "Bor." standing for the word it
//    begins), or, when the team has been away for a season or more, they are equal or the
//    shorter has at least two words. A team playing in the same season can never be the one
//    renamed. Exactly one candidate must qualify. `aliases` (spelling -> name) are applied
//    first and settle any case the rule misses or takes wrongly: a name an alias gives is
//    never taken for a rename (an alias of a spelling to itself keeps that club its own team).
//    Every rename found is listed;
//  - a side promoted into the league (not in it the season before: new to it, or back after
//    years away, when its old results may have decayed out of the fit) is listed with the sides
//    that left the league after the season before (relegated), which stand in for its rating
//    while the fit has no result of its own.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/fit/match_result.hpp"

namespace liveprob::datasets {

struct LeagueRename {
    std::string league, season, old_name, new_name;
};

struct LeagueNewcomer {
    std::string league, season, name;
    std::vector<std::string> stand_ins;  // the sides that left after the season before
};

struct LeagueChecks {
    int played = 0;               // matches with a final score, not awarded
    int not_played = 0;           // no final score, or cancelled / postponed / abandoned
    int awarded = 0;              // a result given at a desk: left out everywhere
    int half_time_inferred = 0;   // no half-time score, 0-0 at full time: half-time 0-0
    int half_time_missing = 0;    // no half-time score otherwise: left out of the streams
    int duplicates = 0;           // the same (date, home, away) again: left out
    int outside_season = 0;       // dated outside its season
    int side_twice_in_a_day = 0;  // a side with two matches within a day (counted per match)
    std::vector<std::string> date_problems;  // "FILE: match N: ..." for each of the last two
};

struct LeagueRecord {
    std::vector<std::string> leagues;  // file names without ".json", sorted
    // Per league: every played result, by date (names as the league's canonical names: the
    // first spelling seen, after `aliases`).
    std::map<std::string, std::vector<fit::MatchResult>> results;
    // Played matches with both scores, by date: competition = league, goal_minutes_known false;
    // first-half goals listed at minute 45, second-half goals at 90 (minutes unknown).
    std::vector<MatchTimeline> matches;
    std::vector<std::string> match_season;  // per match, its season folder
    std::vector<LeagueRename> renames;
    std::vector<LeagueNewcomer> newcomers;
    LeagueChecks checks;

    // The stand-ins of `side` when it is new to `league` in `season` (empty otherwise).
    const std::vector<std::string>* stand_ins(const std::string& league, const std::string& season,
                                              const std::string& side) const;
};

// `dir` holds one folder per season (sorted by name: "2010-11" before "2011-12"), each with one
// JSON file per league. Throws std::runtime_error naming the file for one that cannot be read or
// a match that cannot be (no date, a malformed score).
LeagueRecord read_league_folder(const std::string& dir,
                                const std::map<std::string, std::string>& aliases = {});

// The rename rule above, on two spellings (exposed for tests): whether `newer` can be a renamed
// `older`, with `consecutive` telling whether the older side played the season before.
bool could_be_renamed(const std::string& older, const std::string& newer, bool consecutive);

}  // namespace liveprob::datasets
