// The Python subscriber (python3 -m liveprob.subscribe, tools/python/liveprob/subscribe.py)
// against a live serve: it must print, for each update, exactly the probabilities the engine
// published, start from the snapshot, and count nothing as rejected.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <filesystem>
#include <regex>
#include <sstream>
#include <system_error>

#include "feed_builder.hpp"
#include "live_stack.hpp"
#include "test_env.hpp"

using namespace liveprob;

using namespace liveprob::core;

namespace {
// The build assembles the Python package in <build>/python (tools/python/CMakeLists.txt: the
// package's files, its compiled engine, flatc's wire tables); the program is
// <build>/tools/liveprob.
std::filesystem::path python_modules() {
    return test::liveprob_binary().parent_path().parent_path() / "python";
}
}  // namespace

TEST_CASE("the Python subscriber prints what serve published", "[python][gateway][sockets]") {
    const auto dir = test::scratch_dir("python-subscriber");
    test::LiveStack stack(dir);
    test::FeedBuilder feed(55);
    MatchSetup setup;
    setup.home_name = "Home side";
    setup.away_name = "Away side";
    setup.prior = PriorMeans{1.4, 1.2};
    stack.send(feed.next(setup, MatchClock{}));
    stack.send(feed.start(Period::first_half, 0.0));
    REQUIRE(stack.await_update(55, feed.last_seq()));  // the snapshot will hold this one

    const auto printed_path = dir / "python.out";
    const std::string command = fmt::format(
        "PYTHONPATH={} {} -m liveprob.subscribe --feed {} --snapshot {} --match 55 --count 3 "
        "--seconds 20 >{} 2>{}",
        python_modules().string(), test::system_python(), stack.publish_endpoint(),
        stack.snapshot_endpoint(), printed_path.string(), (dir / "python.err").string());
    // Two more events while the script runs: it gets one update from the snapshot, two live.
    // They are sent once it has printed the snapshot's line: it subscribes before it asks for
    // the snapshot, so from then on it cannot miss them (however slowly Python starts).
    const auto printed_a_line = [&] {
        std::error_code ec;
        const auto size = std::filesystem::file_size(printed_path, ec);
        return !ec && size > 0;
    };
    std::thread more([&] {
        for (int i = 0; i < 400 && !printed_a_line(); ++i)
            std::this_thread::sleep_for(std::chrono::milliseconds(50));
        stack.send(feed.goal(Side::home, Period::first_half, 20.0));
        stack.send(feed.red(Side::away, Period::first_half, 30.0));
    });
    const auto result = test::run_command(command);
    more.join();
    const std::string out = test::read_whole_file(printed_path);
    INFO(out << test::read_whole_file(dir / "python.err"));
    REQUIRE(result.exit_code == 0);
    REQUIRE(stack.await_update(55, feed.last_seq()));

    std::istringstream lines(out);
    std::vector<std::string> printed;
    for (std::string line; std::getline(lines, line);) printed.push_back(line);
    REQUIRE(printed.size() == 3);
    CHECK(printed[0].find(R"("source": "snapshot")") != std::string::npos);
    CHECK(printed[2].find(R"("score": [1, 0], "red_cards": [0, 1])") != std::string::npos);
    // The last line is serve's last update, to the last bit (Python's repr of a float is the
    // shortest round-trip form too).
    const auto& last = stack.latest().at(55);
    CHECK(printed[2].find(fmt::format(R"("update_seq": {},)", last.meta.output_seq)) !=
          std::string::npos);
    CHECK(printed[2].find(fmt::format(R"("p_home": {},)", last.outputs.p_home)) !=
          std::string::npos);
    CHECK(printed[2].find(fmt::format(R"("p_away": {},)", last.outputs.p_away)) !=
          std::string::npos);
    CHECK(test::read_whole_file(dir / "python.err").find(R"("rejected": 0)") != std::string::npos);
}
