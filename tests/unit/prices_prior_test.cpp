// Prices to prior: margin removal and the λ solver, by round trips λ → fair prices → λ.
#include <catch2/catch.hpp>

#include <array>
#include <cmath>

#include "liveprob/fit/margin.hpp"
#include "liveprob/fit/prices_to_prior.hpp"

namespace fit = liveprob::fit;

namespace {
const std::array<std::array<double, 2>, 5> kLambdas{
    {{1.45, 1.10}, {2.8, 0.4}, {0.6, 2.1}, {1.0, 1.0}, {3.5, 2.9}}};
}

TEST_CASE("proportional round trip: lambda -> fair prices -> lambda within 1e-9") {
    for (const auto& [lh, la] : kLambdas) {
        const fit::PriceBook book = fit::fair_prices(lh, la, std::nullopt);
        const auto r = fit::prior_from_prices(book, fit::MarginMethod::proportional);
        CHECK(std::abs(r.lambda_home - lh) < 1e-9);
        CHECK(std::abs(r.lambda_away - la) < 1e-9);
    }
}

TEST_CASE("Shin round trip: a Shin-margined book of the model's probabilities gives lambda back") {
    for (const auto& [lh, la] : kLambdas) {
        const auto p = fit::independent_poisson(lh, la, std::nullopt);
        const std::array<double, 3> fair{p.home, p.draw, p.away};
        const auto quoted = fit::shin_quoted_probabilities(fair, 0.025);
        const fit::PriceBook book{1.0 / quoted[0], 1.0 / quoted[1], 1.0 / quoted[2], std::nullopt};
        const auto r = fit::prior_from_prices(book, fit::MarginMethod::shin);
        CHECK(r.insider_share == Approx(0.025).margin(1e-9));
        CHECK(r.overround_1x2 > 0.0);
        CHECK(std::abs(r.lambda_home - lh) < 1e-9);
        CHECK(std::abs(r.lambda_away - la) < 1e-9);
    }
}

TEST_CASE("with a total-goals line the round trip also holds, proportional and Shin") {
    for (const auto& [lh, la] : kLambdas) {
        const fit::PriceBook fair = fit::fair_prices(lh, la, 2.5);
        for (auto method : {fit::MarginMethod::proportional, fit::MarginMethod::shin}) {
            const auto r = fit::prior_from_prices(fair, method);
            CHECK(std::abs(r.lambda_home - lh) < 1e-9);
            CHECK(std::abs(r.lambda_away - la) < 1e-9);
            CHECK(r.residual < 1e-12);
        }
    }
}

TEST_CASE("proportional margin removal divides by the book sum") {
    const std::array<double, 3> prices{2.0, 3.4, 4.0};
    const auto f = fit::remove_margin(prices, fit::MarginMethod::proportional);
    const double booksum = 0.5 + 1.0 / 3.4 + 0.25;
    CHECK(f.overround == Approx(booksum - 1.0));
    CHECK(f.p[0] == Approx(0.5 / booksum).epsilon(1e-15));
    CHECK(f.p[0] + f.p[1] + f.p[2] == Approx(1.0).epsilon(1e-15));
}

TEST_CASE("Shin moves probability from the long shot toward the favourite") {
    // The favourite–long-shot bias Shin's model describes: relative to proportional removal,
    // the long shot's fair probability is lower and the favourite's higher.
    const std::array<double, 3> prices{1.5, 4.2, 7.5};
    const auto prop = fit::remove_margin(prices, fit::MarginMethod::proportional);
    const auto shin = fit::remove_margin(prices, fit::MarginMethod::shin);
    CHECK(shin.p[0] > prop.p[0]);
    CHECK(shin.p[2] < prop.p[2]);
    CHECK(shin.p[0] + shin.p[1] + shin.p[2] == Approx(1.0).epsilon(1e-14));
}

TEST_CASE("the pre-match model is a parameter of the solver") {
    // A model that shifts half a goal of expectation to the home side: the solver inverts it.
    const fit::PreMatchModel shifted = [](double lh, double la, std::optional<double> line) {
        return fit::independent_poisson(lh + 0.5, la, line);
    };
    const fit::PriceBook book = fit::fair_prices(1.2, 1.3, std::nullopt, shifted);
    const auto r = fit::prior_from_prices(book, fit::MarginMethod::proportional, shifted);
    CHECK(std::abs(r.lambda_home - 1.2) < 1e-9);
    CHECK(std::abs(r.lambda_away - 1.3) < 1e-9);
}

TEST_CASE("unusable prices are refused with a reason") {
    CHECK_THROWS_WITH(
        fit::prior_from_prices({1.0, 3.0, 4.0, std::nullopt}, fit::MarginMethod::proportional),
        Catch::Contains("above 1"));
    CHECK_THROWS_WITH(
        fit::prior_from_prices({5.0, 5.0, 5.0, std::nullopt}, fit::MarginMethod::shin),
        Catch::Contains("less than 1"));
    fit::PriceBook with_whole_line{2.0, 3.5, 4.0, fit::PriceBook::TotalLine{2.0, 1.9, 1.9}};
    CHECK_THROWS_WITH(fit::prior_from_prices(with_whole_line, fit::MarginMethod::proportional),
                      Catch::Contains("half line"));
    CHECK_THROWS_AS(fit::independent_poisson(-1.0, 1.0, std::nullopt), std::invalid_argument);
}
