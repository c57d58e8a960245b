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
