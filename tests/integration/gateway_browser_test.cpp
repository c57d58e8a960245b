// The page as a viewer sees it: serve, gateway and two matches played through the feed, the
// page loaded in Debian's headless Chromium, and the figures it shows compared with what the
// engine published for the same state. A screenshot is kept as a test artefact.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <cstdlib>
#include <regex>
#include <string>

#include "child_process.hpp"
#include "feed_builder.hpp"
#include "live_stack.hpp"
#include "test_env.hpp"

namespace {

using namespace liveprob;

using namespace liveprob::core;
using namespace std::chrono_literals;

const char* kChromium = "/usr/bin/chromium";

// Headless Chromium with everything that would reach outside the machine turned off.
std::vector<std::string> chromium_args(const std::filesystem::path& profile) {
    return {kChromium,
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--disable-dev-shm-usage",
            "--hide-scrollbars",
            "--user-data-dir=" + profile.string()};
}

// Plays a short match: setup, kick-off, a goal, a red card, more play.
std::uint64_t play(test::LiveStack& stack, std::uint64_t match_id, double home_mean,
                   double away_mean) {
    test::FeedBuilder feed(match_id);
    MatchSetup setup;
    setup.home_name = fmt::format("Home side {}", match_id);
    setup.away_name = fmt::format("Away side {}", match_id);
    setup.prior = PriorMeans{home_mean, away_mean};
    stack.send(feed.next(setup, MatchClock{}));
    stack.send(feed.start(Period::first_half, 0.0));
    stack.send(feed.goal(Side::home, Period::first_half, 12.0));
    stack.send(feed.red(Side::away, Period::first_half, 31.5));
    stack.send(feed.end(Period::first_half, 45.0));
    stack.send(feed.start(Period::second_half, 45.0));
    stack.send(feed.goal(Side::away, Period::second_half, 58.0));
    stack.send(feed.next(ClockSync{true}, test::at_minute(Period::second_half, 67.0)));
    return feed.last_seq();
}

struct ShownFigures {
    std::string update_seq;
    std::map<std::string, std::pair<std::string, std::string>> p;  // side -> (data-value, text)
};

// The figures in the card of `match_id` in the page's DOM.
ShownFigures shown_for(const std::string& dom, std::uint64_t match_id) {
    ShownFigures shown;
    const std::regex card(fmt::format(
        R"re(<section class="match" data-match-id="{}" data-update-seq="(\d+)"[^>]*>([\s\S]*?)</section>)re",
        match_id));
    std::smatch m;
    if (!std::regex_search(dom, m, card)) return shown;
    shown.update_seq = m[1];
    const std::string body = m[2];
    for (const char* side : {"home", "draw", "away"}) {
        const std::regex figure(
            fmt::format(R"re(<dd class="p p-{}" data-value="([^"]+)">([^<]*)</dd>)re", side));
        std::smatch f;
        if (std::regex_search(body, f, figure)) shown.p[side] = {f[1], f[2]};
    }
    return shown;
}

}  // namespace

TEST_CASE("the page shows what the engine published, in a real browser",
          "[gateway][browser][sockets]") {
    REQUIRE(std::filesystem::exists(kChromium));  // tools/setup/install-deps.sh installs it
    const auto dir = test::scratch_dir("gateway-browser");
    test::LiveStack stack(dir);
    const std::uint16_t port = stack.start_gateway();

    const std::uint64_t last_a = play(stack, 101, 1.6, 1.1);
    const std::uint64_t last_b = play(stack, 102, 0.9, 1.4);
    REQUIRE(stack.await_update(101, last_a));
    REQUIRE(stack.await_update(102, last_b));
    std::this_thread::sleep_for(300ms);  // the gateway reads the same feed; let it catch up

    const std::string url = fmt::format("http://127.0.0.1:{}/", port);
    auto args = chromium_args(dir / "profile-dom");
    args.insert(args.end(), {"--virtual-time-budget=8000", "--dump-dom", url});
    {
        test::ChildProcess browser(args, dir / "dom.html");
        REQUIRE(browser.wait(60s) == 0);
    }
    const std::string dom = test::read_whole_file(dir / "dom.html");
    INFO(dom.substr(0, 2000));
    CHECK(dom.find("not advice") != std::string::npos);

    for (const auto& [match_id, update] : stack.latest()) {
        INFO("match " << match_id);
        const ShownFigures shown = shown_for(dom, match_id);
        CHECK(shown.update_seq == std::to_string(update.meta.output_seq));
        const std::map<std::string, double> published{{"home", update.outputs.p_home},
                                                      {"draw", update.outputs.p_draw},
                                                      {"away", update.outputs.p_away}};
        for (const auto& [side, p] : published) {
            INFO(side);
            REQUIRE(shown.p.count(side) == 1);
            // The page keeps the exact double it received and shows it to one decimal.
            CHECK(std::strtod(shown.p.at(side).first.c_str(), nullptr) == p);
            CHECK(shown.p.at(side).second == fmt::format("{:.1f}%", p * 100.0));
        }
    }
    CHECK(stack.latest().size() == 2);

    // The screenshot, kept in the build tree beside the test.
    const auto artefacts = std::filesystem::current_path() / "artefacts";
    std::filesystem::create_directories(artefacts);
    const auto png = artefacts / "gateway_page.png";
    std::filesystem::remove(png);
    auto shot = chromium_args(dir / "profile-shot");
    shot.insert(shot.end(), {"--virtual-time-budget=8000", "--window-size=1280,900",
                             "--screenshot=" + png.string(), url});
    {
        test::ChildProcess browser(shot, dir / "screenshot.log");
        REQUIRE(browser.wait(60s) == 0);
    }
    REQUIRE(std::filesystem::exists(png));
    CHECK(std::filesystem::file_size(png) > 10'000);
}
