// `liveprob simulate`: writes the invented demo league's season (and its cup) as recorded
// streams, one file per match, from a fixed seed.
#include <filesystem>
#include <iostream>
#include <memory>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/demo/demo_season.hpp"

namespace liveprob::cli {
namespace {

struct SimulateOptions {
    std::string out_dir;
    std::uint64_t seed = 2031;
    std::string form = "frames";
};

const Registration registration{{
    "simulate",
    "write the invented demo league's season and cup as recorded streams (one file per match)",
    [](CLI::App& sub) -> std::function<int()> {
        auto o = std::make_shared<SimulateOptions>();
        sub.add_option("--out", o->out_dir, "directory for the streams")->required();
        sub.add_option("--seed", o->seed, "seed of the league and of every match")
            ->capture_default_str();
        sub.add_option("--form", o->form, "frames (size-prefixed binary) or json (JSON lines)")
            ->capture_default_str();
        return [o] {
            backtest::StreamForm form{};
            try {
                form = backtest::parse_stream_form(o->form);
            } catch (const std::invalid_argument& e) {
                throw UsageError(e.what());
            }
            const auto league = demo::make_demo_league(o->seed);
            const auto season = demo::simulate_demo_season(league, o->seed);
            const std::filesystem::path dir(o->out_dir);
            std::filesystem::create_directories(dir / "league");
            std::filesystem::create_directories(dir / "cup");
            const char* ext = form == backtest::StreamForm::frames    ? "stream"
                              : form == backtest::StreamForm::journal ? "journal"
                                                                      : "jsonl";
            for (const auto& match : season.league) {
                backtest::write_stream(
                    dir / "league" /
                        fmt::format("{}.{}", match.messages.front().header.match_id, ext),
                    match.messages, form);
            }
            for (const auto& match : season.cup) {
                backtest::write_stream(
                    dir / "cup" / fmt::format("{}.{}", match.messages.front().header.match_id, ext),
                    match.messages, form);
            }
            std::cout << fmt::format("{}: {} league matches, {} cup ties in {}\n", league.name,
                                     season.league.size(), season.cup.size(), dir.string());
            return kExitOk;
        };
    },
}};

}  // namespace
}  // namespace liveprob::cli
