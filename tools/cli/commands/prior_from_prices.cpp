// `liveprob prior-from-prices`: decimal 1X2 prices (and optionally a total-goals line) →
// margin removed → expected regulation goals λ_H, λ_A.
#include <fmt/format.h>

#include <iostream>
#include <memory>
#include <string>
#include <vector>

#include "command_registry.hpp"
#include "liveprob/fit/prices_to_prior.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace {

using liveprob::cli::UsageError;
namespace fit = liveprob::fit;
namespace protocol = liveprob::protocol;

struct PricesOptions {
    std::vector<double> three_way;
    std::vector<double> total;  // line, over, under
    std::string method = "shin";
    bool json = false;
};

int run_prices(const PricesOptions& o) {
    if (o.three_way.size() != 3)
        throw UsageError("--1x2 takes three decimal prices: home draw away");
    fit::PriceBook book{o.three_way[0], o.three_way[1], o.three_way[2], std::nullopt};
    if (!o.total.empty()) {
        if (o.total.size() != 3)
            throw UsageError("--total takes three numbers: line over_price under_price");
        book.total = fit::PriceBook::TotalLine{o.total[0], o.total[1], o.total[2]};
    }
    fit::MarginMethod method = fit::MarginMethod::shin;
    if (o.method == "proportional") method = fit::MarginMethod::proportional;
    else if (o.method != "shin") throw UsageError("--margin must be 'shin' or 'proportional'");
    fit::PriorFromPrices r;
    try {
        r = fit::prior_from_prices(book, method);
    } catch (const std::invalid_argument& e) {
        throw UsageError(e.what());
    }
    if (o.json) {
        std::string out;
        protocol::JsonWriter(out, protocol::JsonLayout::spaced)
            .begin_object()
            .member("lambda_home", r.lambda_home)
            .member("lambda_away", r.lambda_away)
            .member("fair_home", r.fair_home)
            .member("fair_draw", r.fair_draw)
            .member("fair_away", r.fair_away)
            .member("overround", r.overround_1x2)
            .member("insider_share", r.insider_share)
            .member("residual", r.residual)
            .end_object();
        std::cout << out << '\n';
    } else {
        std::cout << fmt::format(
            "fair probabilities {:.4f} / {:.4f} / {:.4f} (margin {:.2f}%, {} removal)\n",
            r.fair_home, r.fair_draw, r.fair_away, 100.0 * r.overround_1x2, o.method);
        if (r.fair_over)
            std::cout << fmt::format("fair P(over {}) {:.4f}\n", book.total->line, *r.fair_over);
        std::cout << fmt::format(
            "expected regulation goals {:.4f} - {:.4f} (largest misfit {:.2g})\n", r.lambda_home,
            r.lambda_away, r.residual);
    }
    return liveprob::cli::kExitOk;
}

const liveprob::cli::Registration registration{
    {"prior-from-prices", "expected regulation goals from decimal match prices (margin removed)",
     [](CLI::App& app) {
         auto o = std::make_shared<PricesOptions>();
         app.add_option("--1x2", o->three_way, "decimal prices: home draw away")
             ->required()
             ->expected(3);
         app.add_option("--total", o->total, "total-goals line and its prices: line over under")
             ->expected(3);
         app.add_option("--margin", o->method, "margin removal: shin (default) or proportional");
         app.add_flag("--json", o->json, "print one JSON object");
         return [o] { return run_prices(*o); };
     }}};

}  // namespace
