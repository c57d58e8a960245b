// Feed names to rating names: exact, alias, or an error listing the closest known names.
#include <catch2/catch.hpp>

#include "liveprob/fit/team_names.hpp"

namespace fit = liveprob::fit;

TEST_CASE("edit distance is the Levenshtein distance, ignoring case") {
    CHECK(fit::edit_distance("kitten", "sitting") == 3);  // the textbook example
    CHECK(fit::edit_distance("Harbour Town", "harbour town") == 0);
    CHECK(fit::edit_distance("", "abc") == 3);
}

TEST_CASE("names resolve exactly or through an alias, and unknown names list the closest") {
    const fit::TeamNameResolver names(
        {"Harbour Town", "Hill Rovers", "Riverside Athletic", "Harbour United"},
        {{"Hbr Town", "Harbour Town"}});
    CHECK(names.resolve("Hill Rovers") == "Hill Rovers");
    CHECK(names.resolve("Hbr Town") == "Harbour Town");
    try {
        static_cast<void>(names.resolve("Harbor Town"));
        FAIL("an unknown name must throw");
    } catch (const fit::UnknownTeamError& e) {
        const std::string what = e.what();
        CHECK_THAT(what, Catch::Contains("'Harbor Town' is not in the ratings"));
        // Nearest first.
        CHECK(what.find("'Harbour Town'") < what.find("'Harbour United'"));
    }
}

TEST_CASE("an alias pointing at an unknown rating name is refused") {
    CHECK_THROWS_WITH(fit::TeamNameResolver({"Hill Rovers"}, {{"HR", "Hill Rover"}}),
                      Catch::Contains("alias target for 'HR'") && Catch::Contains("'Hill Rovers'"));
}
