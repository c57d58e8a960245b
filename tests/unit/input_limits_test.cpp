// One set of limits: the engine's validate_* functions decide, and every layer that reads a setup
// or model parameters from outside (the wire, the JSON feed reader, check-feed, the parameter
// file, the C ABI) agrees with the engine on each value where they used to disagree: a prior
// between 10 and 15, an extra-time half of 31 to 60 minutes, 17 to 64 quadrature nodes, a
// shoot-out conversion of 0 or 1 (or past 1 with the first kicker's edge), a multiplier of 0.
#include <catch2/catch.hpp>

#include <string>

#include "liveprob/capi/liveprob_c.h"
#include "liveprob/core/match.hpp"
#include "liveprob/core/pricing.hpp"
#include "liveprob/core/validate.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/protocol/feed_check.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "sample_messages.hpp"

using namespace liveprob;
using namespace liveprob::core;

namespace {

MatchSetup setup_with(double home_prior, bool extra_time, std::uint16_t extra_half) {
    MatchSetup s;
    s.home_name = "Harrow Fen";
    s.away_name = "Lumen Quay";
    s.prior = PriorMeans{home_prior, 1.1};
    s.format.extra_time = extra_time;
    s.format.extra_half_minutes = extra_half;
    return s;
}

bool engine_accepts(const MatchSetup& setup) {
    try {
        Match match(1, setup, ModelParams{});
        return true;
    } catch (const std::invalid_argument&) {
        return false;
    }
}

bool wire_accepts(const MatchSetup& setup) {
    const auto message = test::sample_message(1, Period::pre_match, 0, setup);
    return protocol::decode_feed_message(protocol::encode_feed_message(message))
        .message.has_value();
}

bool json_reader_accepts(const MatchSetup& setup) {
    const auto message = test::sample_message(1, Period::pre_match, 0, setup);
    protocol::JsonFeedReader reader;
    return reader.read_line(protocol::to_json_line(message), 1).kind ==
           protocol::JsonLineKind::message;
}

bool check_feed_accepts(const MatchSetup& setup) {
    const auto line = protocol::to_json_line(test::sample_message(1, Period::pre_match, 0, setup));
    const auto summary =
        protocol::check_feed({reinterpret_cast<const std::uint8_t*>(line.data()), line.size()},
                             [](const std::string&) {});
    return summary.all_good();
}

bool capi_accepts(const MatchSetup& setup) {
    liveprob_setup c;
    liveprob_setup_init(&c, sizeof c);
    c.match_id = 1;
    c.home_goals = setup.prior->home_goals;
    c.away_goals = setup.prior->away_goals;
    c.extra_time = setup.format.extra_time ? 1 : 0;
    c.extra_half_minutes = setup.format.extra_half_minutes;
    liveprob_match* match = nullptr;
    const liveprob_status status = liveprob_match_create(&c, nullptr, &match);
    liveprob_match_destroy(match);
    return status == LIVEPROB_STATUS_OK;
}

bool params_file_accepts(const std::string& members) {
    try {
        files::parse_params_json(R"({"kind":"liveprob-model-params","version":1,)" + members + "}",
                                 "limits.json");
        return true;
    } catch (const files::ParamsFileError&) {
        return false;
    }
}

bool engine_accepts(const ModelParams& params) {
    try {
        PricingModel model(params);
        return true;
    } catch (const std::invalid_argument&) {
        return false;
    }
}

}  // namespace

TEST_CASE("limits: every reader of a setup agrees with the engine on priors and extra time",
          "[unit][limits]") {
    struct Case {
        double prior;
        bool extra_time;
        std::uint16_t extra_half;
        bool valid;
    };
    const Case cases[] = {
        {1.4, false, 15, true},   {10.0, false, 15, true},  {10.0001, false, 15, false},
        {12.0, false, 15, false}, {15.0, false, 15, false}, {0.0, false, 15, false},
        {1.4, true, 30, true},    {1.4, true, 31, false},   {1.4, true, 45, false},
        {1.4, true, 0, false},    {1.4, false, 45, true},  // unused without extra time
    };
    for (const Case& c : cases) {
        const MatchSetup setup = setup_with(c.prior, c.extra_time, c.extra_half);
        INFO("prior " << c.prior << ", extra time " << c.extra_time << ", " << c.extra_half);
        CHECK(validate_setup(setup).has_value() == !c.valid);
        CHECK(engine_accepts(setup) == c.valid);
        CHECK(wire_accepts(setup) == c.valid);
        CHECK(json_reader_accepts(setup) == c.valid);
        CHECK(check_feed_accepts(setup) == c.valid);
        CHECK(capi_accepts(setup) == c.valid);
    }
    // The wire's error is the engine's, in the wire's words.
    const auto message = test::sample_message(1, Period::pre_match, 0, setup_with(12.0, false, 15));
    CHECK(protocol::decode_feed_message(protocol::encode_feed_message(message)).detail ==
          "bad_value: field 'prior.home': must be in (0, 10], got 12");
}

TEST_CASE("limits: the parameter file accepts exactly what the engine accepts", "[unit][limits]") {
    struct Case {
        const char* members;  // JSON members after kind and version
        void (*set)(ModelParams&);
        bool valid;
    };
    const Case cases[] = {
        {R"("quadrature_nodes":16)", [](ModelParams& p) { p.quadrature_nodes = 16; }, true},
        {R"("quadrature_nodes":17)", [](ModelParams& p) { p.quadrature_nodes = 17; }, false},
        {R"("quadrature_nodes":64)", [](ModelParams& p) { p.quadrature_nodes = 64; }, false},
        {R"("shootout":{"conversion":1})", [](ModelParams& p) { p.shootout.conversion = 1.0; },
         false},
        {R"("shootout":{"conversion":0})", [](ModelParams& p) { p.shootout.conversion = 0.0; },
         false},
        {R"("shootout":{"conversion":0.98})", [](ModelParams& p) { p.shootout.conversion = 0.98; },
         false},  // 0.98 + the default first-kicker edge 0.028 is past 1
        {R"("shootout":{"conversion":0.95})", [](ModelParams& p) { p.shootout.conversion = 0.95; },
         true},
        {R"("score_state":{"leading":0})", [](ModelParams& p) { p.score_state.leading = 0.0; },
         false},
        {R"("red_cards":{"own_per_card":0})",
         [](ModelParams& p) { p.red_cards.own_per_card = 0.0; }, false},
        {R"("red_cards":{"opponent_per_card":10})",
         [](ModelParams& p) { p.red_cards.opponent_per_card = 10.0; }, true},
        {R"("red_cards":{"opponent_per_card":10.5})",
         [](ModelParams& p) { p.red_cards.opponent_per_card = 10.5; }, false},
        {R"("red_cards":{"max_cards":12})", [](ModelParams& p) { p.red_cards.max_cards = 12; },
         false},
        {R"("timing":{"expected_stoppage_extra":16})",
         [](ModelParams& p) { p.timing.expected_stoppage_extra = 16.0; }, false},
        {R"("timing":{"first_half_start":0,"first_half_end":0,"second_half_start":0,"second_half_end":0})",
         [](ModelParams& p) {
             p.timing.first_half_start = p.timing.first_half_end = 0.0;
             p.timing.second_half_start = p.timing.second_half_end = 0.0;
         },
         false},
        {R"("kappa":"infinity")",
         [](ModelParams& p) { p.kappa = std::numeric_limits<double>::infinity(); }, true},
    };
    for (const Case& c : cases) {
        INFO(c.members);
        ModelParams params;
        c.set(params);
        CHECK(params_file_accepts(c.members) == c.valid);
        CHECK(engine_accepts(params) == c.valid);
        CHECK(validate_params(params).has_value() == !c.valid);
    }
    CHECK_THROWS_WITH(
        files::parse_params_json(
            R"({"kind":"liveprob-model-params","version":1,"quadrature_nodes":20})", "p.json"),
        "p.json: key 'quadrature_nodes': must be 1..16, got 20");
}
