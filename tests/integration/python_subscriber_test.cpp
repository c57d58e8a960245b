// The Python subscriber (python3 -m liveprob.subscribe, tools/python/liveprob/subscribe.py)
// against a live serve: it must print, for each update, exactly the probabilities the engine
// published, start from the snapshot, and count nothing as rejected.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <filesystem>
#include <regex>
#include <set>
#include <sstream>
#include <system_error>

#include "feed_builder.hpp"
#include "json_probe.hpp"
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
    const test::JsonProbe first(printed[0]), last_line(printed[2]);
    CHECK(first.text("/source") == "snapshot");
    CHECK(first.text("/match/home") == "Home side");
    CHECK(first.text("/match/away") == "Away side");
    CHECK(last_line.text("/source") == "live");
    CHECK(last_line.number("/score/home") == 1);
    CHECK(last_line.number("/red_cards/away") == 1);
    // The last line is serve's last update, to the last bit (the C++ encoder writes the
    // shortest round-trip form).
    const auto& last = stack.latest().at(55);
    CHECK(last_line.number("/update_seq") == static_cast<double>(last.meta.output_seq));
    CHECK(last_line.number("/full_time/home") == last.outputs.p_home);
    CHECK(last_line.number("/full_time/away") == last.outputs.p_away);
    CHECK(test::read_whole_file(dir / "python.err").find(R"("rejected": 0)") != std::string::npos);
}

namespace {
// An update line with the members only some carriers have, or that differ between a live
// update and a snapshot of the same state, taken out: where it came from, its publish time and
// the time spent computing it.
std::string without_carrier_members(std::string line) {
    line = std::regex_replace(line, std::regex(R"(,"source":"[a-z]+")"), "");
    line = std::regex_replace(line, std::regex(R"(,"compute_ns":\d+)"), "");
    return std::regex_replace(line, std::regex(R"(,"times_us":\{[^}]*\})"), "");
}
}  // namespace

TEST_CASE("tap, the gateway and the Python client print an update in one JSON form",
          "[python][gateway][sockets]") {
    const auto dir = test::scratch_dir("one-json-form");
    test::LiveStack stack(dir);
    const std::uint16_t port = stack.start_gateway();
    test::FeedBuilder feed(71);
    MatchSetup setup;
    setup.home_name = "Quarry \"Reds\"";  // a name that needs escaping
    setup.away_name = "Saltmarsh Rovers";
    setup.competition = "Estuary Shield";
    setup.prior = PriorMeans{1.3, 1.2};
    setup.format.extra_time = true;
    setup.format.shootout = true;
    stack.send(feed.next(setup, MatchClock{}));
    for (const auto& m : feed.level_into_extra_time()) stack.send(m);
    stack.send(feed.end(Period::extra_first, 105.0));
    stack.send(feed.start(Period::extra_second, 105.0));
    stack.send(feed.end(Period::extra_second, 120.0));
    stack.send(feed.start(Period::shootout, 120.0));
    stack.send(feed.kick(Side::home, true));
    stack.send(feed.kick(Side::away, false));
    REQUIRE(stack.await_update(71, feed.last_seq()));
    std::this_thread::sleep_for(std::chrono::milliseconds(300));  // the gateway reads it too

    const auto run = [&](const std::string& name, const std::string& command) {
        const auto out = dir / (name + ".out");
        const auto result = test::run_command(command + " >" + out.string() + " 2>" +
                                              (dir / name).string() + ".err");
        INFO(name << ": " << test::read_whole_file(dir / (name + ".err")));
        REQUIRE(result.exit_code == 0);
        std::string text = test::read_whole_file(out);
        while (!text.empty() && (text.back() == '\n' || text.back() == '\r')) text.pop_back();
        return text;
    };
    const std::string tap =
        run("tap", fmt::format("{} tap --from {} --snapshot {} --match 71 --json --snapshot-only",
                               test::liveprob_binary().string(), stack.publish_endpoint(),
                               stack.snapshot_endpoint()));
    const std::string python =
        run("python", fmt::format("PYTHONPATH={} {} -m liveprob.subscribe --feed {} --snapshot {} "
                                  "--match 71 --count 1 --seconds 20",
                                  python_modules().string(), test::system_python(),
                                  stack.publish_endpoint(), stack.snapshot_endpoint()));
    const std::string state = run(
        "gateway", fmt::format("{} -c \"import urllib.request,sys; sys.stdout.write(urllib.request."
                               "urlopen('http://127.0.0.1:{}/api/matches').read().decode())\"",
                               test::system_python(), port));
    const std::string head = R"({"kind":"state","matches":[)";
    REQUIRE(state.rfind(head, 0) == 0);
    const std::string gateway = state.substr(head.size(), state.size() - head.size() - 2);

    INFO("tap:     " << tap << "\npython:  " << python << "\ngateway: " << gateway);
    const test::JsonProbe probe(tap);
    CHECK(probe.text("/match/home") == "Quarry \"Reds\"");
    CHECK(probe.text("/match/competition") == "Estuary Shield");
    CHECK(probe.text("/source") == "snapshot");
    CHECK(probe.number("/shootout/home/scored") == 1);
    CHECK(probe.flag("/shootout/away/kicks/0") == false);
    CHECK(test::JsonProbe(gateway).number("/times_us/gateway_receive") > 0);
    CHECK(without_carrier_members(tap) == without_carrier_members(python));
    CHECK(without_carrier_members(tap) == without_carrier_members(gateway));
}

TEST_CASE("the Python client reads a snapshot that comes in parts, every match once",
          "[python][sockets][snapshot]") {
    const auto dir = test::scratch_dir("python-snapshot-parts");
    test::LiveStack stack(dir);
    // One part more than one frame holds (each part holds protocol::kSnapshotUpdatesPerPart).
    const std::uint64_t matches = protocol::kSnapshotUpdatesPerPart + 40;
    for (std::uint64_t id = 1; id <= matches; ++id) {
        test::FeedBuilder feed(id);
        MatchSetup setup;
        setup.home_name = fmt::format("Quarry Town {}", id);
        setup.away_name = fmt::format("Saltmarsh {}", id);
        setup.prior = PriorMeans{1.4, 1.1};
        stack.send(feed.next(setup, MatchClock{}));
        if (id == matches) REQUIRE(stack.await_update(id, feed.last_seq()));
    }
    const auto out = dir / "python.out";
    const auto result = test::run_command(fmt::format(
        "PYTHONPATH={} {} -m liveprob.subscribe --feed {} --snapshot {} --count {} --seconds 60 "
        ">{} 2>{}",
        python_modules().string(), test::system_python(), stack.publish_endpoint(),
        stack.snapshot_endpoint(), matches, out.string(), (dir / "python.err").string()));
    INFO(test::read_whole_file(dir / "python.err"));
    REQUIRE(result.exit_code == 0);
    std::istringstream lines(test::read_whole_file(out));
    std::set<std::uint64_t> ids;
    std::size_t from_snapshot = 0;
    for (std::string line; std::getline(lines, line);) {
        const test::JsonProbe json(line);
        const auto id = static_cast<std::uint64_t>(json.number("/match_id"));
        ids.insert(id);
        if (json.text("/source") == "snapshot") ++from_snapshot;
        CHECK(json.text("/match/home") == fmt::format("Quarry Town {}", id));
    }
    CHECK(from_snapshot == matches);  // serve ticks once an hour here: nothing else arrives
    CHECK(ids.size() == matches);
}
