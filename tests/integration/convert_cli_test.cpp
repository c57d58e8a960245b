// `liveprob convert` run as a program: frames -> JSON lines -> frames gives back the same bytes,
// and a damaged record stops the conversion (nothing written) unless --skip-bad.
#include <catch2/catch.hpp>

#include <fstream>

#include <fmt/format.h>

#include "child_process.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/demo/demo_season.hpp"
#include "test_env.hpp"

using namespace liveprob;

using namespace liveprob::core;

TEST_CASE("convert: frames to JSON lines and back gives the same bytes, damaged input is refused",
          "[convert]") {
    const auto dir = liveprob::test::scratch_dir("convert-cli");
    const auto season = demo::simulate_demo_season(demo::make_demo_league(3), 3);
    std::vector<InboundMessage> messages;
    for (std::size_t i = 0; i < 5; ++i)
        messages.insert(messages.end(), season.league[i].messages.begin(),
                        season.league[i].messages.end());
    backtest::write_stream(dir / "a.stream", messages, backtest::StreamForm::frames);
    const std::string bin = liveprob::test::liveprob_binary().string();
    auto convert = [&](const std::string& args) {
        return liveprob::test::run_command(fmt::format("{} convert {} 2>&1", bin, args));
    };

    REQUIRE(convert(fmt::format("{} --out {} --form json", (dir / "a.stream").string(),
                                (dir / "a.jsonl").string()))
                .exit_code == 0);
    CHECK(backtest::read_stream(dir / "a.jsonl").messages == messages);
    REQUIRE(convert(fmt::format("{} --out {} --form frames", (dir / "a.jsonl").string(),
                                (dir / "b.stream").string()))
                .exit_code == 0);
    CHECK(liveprob::test::read_whole_file(dir / "b.stream") ==
          liveprob::test::read_whole_file(dir / "a.stream"));

    // A damaged line in the middle of the JSON form.
    {
        std::ifstream in(dir / "a.jsonl");
        std::ofstream out(dir / "damaged.jsonl");
        int line = 0;
        for (std::string text; std::getline(in, text);)
            out << (++line == 7 ? text.substr(0, text.size() / 2) : text) << '\n';
    }
    const auto refused =
        convert(fmt::format("{} --out {} --form frames", (dir / "damaged.jsonl").string(),
                            (dir / "c.stream").string()));
    CHECK(refused.exit_code == 1);
    CHECK(refused.out.find("1 bad record") != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(dir / "c.stream"));
    const auto skipped =
        convert(fmt::format("{} --out {} --form frames --skip-bad",
                            (dir / "damaged.jsonl").string(), (dir / "c.stream").string()));
    CHECK(skipped.exit_code == 0);
    CHECK(backtest::read_stream(dir / "c.stream").messages.size() == messages.size() - 1);
}

TEST_CASE(
    "convert: a journal of the previous format (bare frames) becomes a journal folder that "
    "check-feed and the replay read",
    "[convert]") {
    const auto dir = liveprob::test::scratch_dir("convert-journal");
    const auto season = demo::simulate_demo_season(demo::make_demo_league(4), 4);
    std::vector<InboundMessage> messages;
    for (std::size_t i = 0; i < 3; ++i)
        messages.insert(messages.end(), season.league[i].messages.begin(),
                        season.league[i].messages.end());
    backtest::write_stream(dir / "old.lpf", messages, backtest::StreamForm::frames);
    const auto old_bytes = liveprob::test::read_whole_file(dir / "old.lpf");
    const std::string bin = liveprob::test::liveprob_binary().string();
    const auto converted = liveprob::test::run_command(
        fmt::format("{} convert {} --out {} --form journal 2>&1", bin, (dir / "old.lpf").string(),
                    (dir / "journal").string()));
    REQUIRE(converted.exit_code == 0);
    CHECK(liveprob::test::read_whole_file(dir / "old.lpf") == old_bytes);
    CHECK(backtest::read_stream(dir / "journal").messages == messages);
    const auto checked = liveprob::test::run_command(
        fmt::format("{} check-feed --json {} 2>&1", bin, (dir / "journal").string()));
    CHECK(checked.exit_code == 0);
    CHECK(checked.out.find("\"form\": \"journal\"") != std::string::npos);
    CHECK(checked.out.find(fmt::format("\"ok\": {}", messages.size())) != std::string::npos);
    // Never over an existing folder (a journal a serve may hold).
    const auto again = liveprob::test::run_command(
        fmt::format("{} convert {} --out {} --form journal 2>&1", bin, (dir / "old.lpf").string(),
                    (dir / "journal").string()));
    CHECK(again.exit_code != 0);
}
