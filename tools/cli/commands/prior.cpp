// `liveprob prior`: ratings + fixture → expected regulation goals and the match-setup message.
#include <fmt/format.h>

#include <algorithm>
#include <iostream>
#include <memory>
#include <string>

#include "command_registry.hpp"
#include "liveprob/core/validate.hpp"
#include "liveprob/files/ratings_file.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "liveprob/fit/team_names.hpp"
#include "liveprob/protocol/json_feed.hpp"

namespace {

namespace fit = liveprob::fit;

struct PriorOptions {
    std::string ratings;
    std::string home, away;
    std::string aliases;
    bool neutral = false;
    std::uint64_t match_id = 0;
    bool setup_line = false;
};

int run_prior(const PriorOptions& o) {
    const fit::Ratings ratings = liveprob::files::load_ratings_file(o.ratings);
    std::vector<std::string> known;
    for (const auto& t : ratings.teams) known.push_back(t.name);
    const fit::TeamNameResolver names(known, o.aliases.empty()
                                                 ? std::map<std::string, std::string>{}
                                                 : liveprob::files::load_alias_file(o.aliases));
    const fit::TeamRating& home = *ratings.find(names.resolve(o.home));
    const fit::TeamRating& away = *ratings.find(names.resolve(o.away));
    fit::ExpectedGoals e = fit::expected_goals(ratings, home, away, o.neutral);
    // The engine takes at most kMaxPriorGoals per side (calc, serve and the feed refuse more):
    // a larger value is held at it, as `import` holds it, and said.
    const double most = liveprob::core::kMaxPriorGoals;
    const bool held = e.home > most || e.away > most;
    e.home = std::min(e.home, most);
    e.away = std::min(e.away, most);
    if (held)
        std::cerr << fmt::format(
            "note: expected goals above {} held at {} (the engine's largest)\n", most, most);
    if (!o.setup_line) {
        std::cout << fmt::format("{} v {}{}: expected regulation goals {:.4f} - {:.4f}{}\n",
                                 home.name, away.name, o.neutral ? " (neutral venue)" : "", e.home,
                                 e.away, held ? " (held at the largest the engine takes)" : "");
        return liveprob::cli::kExitOk;
    }
    liveprob::core::MatchSetup setup;
    setup.home_name = o.home;
    setup.away_name = o.away;
    setup.neutral_venue = o.neutral;
    setup.prior = liveprob::core::PriorMeans{e.home, e.away};
    liveprob::core::InboundMessage message;
    message.header.match_id = o.match_id;
    message.body = setup;
    std::cout << liveprob::protocol::to_json_line(message) << "\n";
    return liveprob::cli::kExitOk;
}

const liveprob::cli::Registration registration{
    {"prior", "expected regulation goals for a fixture from a ratings file", [](CLI::App& app) {
         auto o = std::make_shared<PriorOptions>();
         app.add_option("--ratings", o->ratings, "ratings file written by `liveprob fit`")
             ->required();
         app.add_option("--home", o->home, "home side (feed name)")->required();
         app.add_option("--away", o->away, "away side (feed name)")->required();
         app.add_option("--aliases", o->aliases, "CSV feed_name,rating_name");
         app.add_flag("--neutral", o->neutral, "neutral venue: no home advantage");
         app.add_option("--match-id", o->match_id, "match id for the setup message");
         app.add_flag("--setup-message", o->setup_line,
                      "print the match-setup message (one JSON feed line)");
         return [o] { return run_prior(*o); };
     }}};

}  // namespace
