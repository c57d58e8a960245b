// The one JSON form of an update (protocol/update_json.hpp): every member where
// protocol/README.md puts it, numbers exact, names escaped, optional parts null.
#include <catch2/catch.hpp>

#include "json_probe.hpp"
#include "liveprob/protocol/update_json.hpp"
#include "sample_messages.hpp"

using namespace liveprob;
using namespace liveprob::core;
using namespace liveprob::protocol;

TEST_CASE("an update in the JSON form names the match and keeps every number exact",
          "[update_json]") {
    DecodedUpdate u;
    u.meta = UpdateMeta{7, 12, 40, 1'790'000'000'000'000, 1'790'000'000'000'150, 48'000};
    u.meta.feed_stale = true;
    u.outputs = test::sample_outputs();
    u.outputs.has_advance = true;
    u.outputs.p_advance_home = 0.625;
    u.outputs.p_advance_away = 0.375;
    u.outputs.shootout.first = Side::away;
    u.outputs.shootout.taken = {2, 3};
    u.outputs.shootout.scored = {1, 2};
    u.outputs.shootout.scored_bits = {0b10, 0b011};
    MatchSetup setup;
    setup.home_name = "Brackwater \"Albion\"";
    setup.away_name = "Tidemill Town";
    setup.competition = "Lantern Coast Cup";
    setup.format.extra_time = true;
    setup.format.shootout = true;
    u.details = details_of(setup);

    const std::string text = update_json(u, {.source = "live", .gateway_receive_us = 0});
    const test::JsonProbe json(text);
    CHECK(text.rfind(R"({"kind":"update","source":"live","match_id":7,"update_seq":12,)", 0) == 0);
    CHECK(json.text("/match/home") == "Brackwater \"Albion\"");
    CHECK(json.text("/match/competition") == "Lantern Coast Cup");
    CHECK(json.flag("/match/format/shootout"));
    CHECK(json.is_null("/match/format/first_leg"));
    CHECK(json.number("/full_time/home") == u.outputs.p_home);
    CHECK(json.number("/full_time/draw") == u.outputs.p_draw);
    CHECK(json.number("/to_advance/home") == 0.625);
    CHECK(json.text("/shootout/first") == "away");
    CHECK(json.number("/shootout/away/taken") == 3);
    CHECK(json.flag("/shootout/home/kicks/0") == false);
    CHECK(json.flag("/shootout/home/kicks/1") == true);
    CHECK(json.flag("/shootout/away/kicks/2") == false);
    CHECK(json.number("/total_over/p/2") == u.outputs.p_over[2]);
    CHECK(json.number("/times_us/engine_publish") == 1'790'000'000'000'150.0);
    CHECK_THROWS(json.at("/times_us/gateway_receive"));  // only the gateway adds it
    CHECK_FALSE(json.flag("/tick"));
    CHECK(json.flag("/feed_stale"));  // serve's marks travel in the same form
    CHECK_FALSE(json.flag("/journal_failing"));

    // A 1.0 update names nothing; no shoot-out yet is null; no extras, no members for them.
    DecodedUpdate bare;
    bare.outputs = test::sample_outputs();
    bare.outputs.has_advance = false;  // a format that needs no winner
    const test::JsonProbe plain(update_json(bare));
    CHECK(plain.is_null("/match"));
    CHECK(plain.is_null("/shootout"));
    CHECK(plain.is_null("/to_advance"));
    CHECK(plain.flag("/tick"));  // receive time 0: a clock tick
    CHECK_THROWS(plain.at("/source"));
    CHECK_FALSE(plain.flag("/feed_stale"));
}
