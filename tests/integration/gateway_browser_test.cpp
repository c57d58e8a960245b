// The page as a viewer sees it: serve, gateway, two league matches and a knock-out round played
// through the feed, the page open in Debian's headless Chromium (driven over its debugging
// socket), and what it shows compared with what the engine published: the figures, the team
// names, the to-advance bar, the shoot-out and its winner, a clock in stoppage, a time axis that
// never runs backwards. Screenshots at 390 px and 1920 px are kept as test artefacts (paths
// printed) and neither width overflows sideways. Then serve is killed and the page must show
// every match stale within the gateway's silence limit; ?match=ID shows one match alone. A
// match whose own feed goes silent in play is marked stale on its card, and fresh once it speaks.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <csignal>
#include <cstdlib>
#include <iostream>
#include <regex>
#include <string>

#include "devtools_page.hpp"
#include "feed_builder.hpp"
#include "live_stack.hpp"
#include "test_env.hpp"

namespace {

using namespace liveprob;
using namespace liveprob::core;
using namespace std::chrono_literals;

constexpr int kSilenceLimitMs = 1500;  // the gateway's --upstream-silence-ms here

MatchSetup setup_of(std::string home, std::string away, double home_mean, double away_mean) {
    MatchSetup setup;
    setup.home_name = std::move(home);
    setup.away_name = std::move(away);
    setup.prior = PriorMeans{home_mean, away_mean};
    return setup;
}

// A league match: a goal, a red card, a goal in first-half stoppage, more play.
std::uint64_t play_league(test::LiveStack& stack, std::uint64_t match_id, double home_mean,
                          double away_mean) {
    test::FeedBuilder feed(match_id);
    stack.send(feed.next(setup_of(fmt::format("Home side {}", match_id),
                                  fmt::format("Away side {}", match_id), home_mean, away_mean),
                         MatchClock{}));
    stack.send(feed.start(Period::first_half, 0.0));
    stack.send(feed.goal(Side::home, Period::first_half, 12.0));
    stack.send(feed.red(Side::away, Period::first_half, 31.5));
    stack.send(feed.goal(Side::away, Period::first_half, 46.5));  // 45+2
    stack.send(feed.end(Period::first_half, 47.0));
    stack.send(feed.start(Period::second_half, 45.0));
    stack.send(feed.goal(Side::away, Period::second_half, 58.0));
    stack.send(feed.next(ClockSync{true}, test::at_minute(Period::second_half, 67.0)));
    return feed.last_seq();
}

MatchSetup knockout(std::string home, std::string away) {
    MatchSetup setup = setup_of(std::move(home), std::move(away), 1.3, 1.2);
    setup.competition = "Lowland Cup";
    setup.format.extra_time = true;
    setup.format.shootout = true;
    return setup;
}

// A knock-out level after 90 minutes, into extra time: stops at 106:30 (105+1:30) when
// `to_shootout` is false, else level after 120 and won 4-3 on penalties by the home side.
std::uint64_t play_knockout(test::LiveStack& stack, std::uint64_t match_id, std::string home,
                            std::string away, bool to_shootout) {
    test::FeedBuilder feed(match_id);
    stack.send(feed.next(knockout(std::move(home), std::move(away)), MatchClock{}));
    for (const auto& m : feed.level_into_extra_time()) stack.send(m);
    if (!to_shootout) {
        stack.send(feed.next(ClockSync{true}, test::at_minute(Period::extra_first, 106.5)));
        return feed.last_seq();
    }
    stack.send(feed.end(Period::extra_first, 105.0));
    stack.send(feed.start(Period::extra_second, 105.0));
    stack.send(feed.end(Period::extra_second, 120.0));
    stack.send(feed.start(Period::shootout, 120.0));
    // Home kicks first: home 1 1 1 0 1 (4), away 1 0 1 1 0 (3).
    for (const auto& [side, scored] : std::vector<std::pair<Side, bool>>{{Side::home, true},
                                                                         {Side::away, true},
                                                                         {Side::home, true},
                                                                         {Side::away, false},
                                                                         {Side::home, true},
                                                                         {Side::away, true},
                                                                         {Side::home, false},
                                                                         {Side::away, true},
                                                                         {Side::home, true},
                                                                         {Side::away, false}})
        stack.send(feed.kick(side, scored));
    stack.send(feed.whistle(Period::shootout, 120.0));
    return feed.last_seq();
}

struct ShownFigures {
    std::string update_seq;
    std::map<std::string, std::pair<std::string, std::string>> p;  // side -> (data-value, text)
};

// The full-time figures in the card of `match_id` in the page's DOM.
ShownFigures shown_for(const std::string& dom, std::uint64_t match_id) {
    ShownFigures shown;
    // Found by plain search: a regular expression spanning the whole card recurses once per
    // character in libstdc++ and overflows the stack under the address sanitizer.
    const std::string opening =
        fmt::format(R"(<section class="match" data-match-id="{}" data-update-seq=")", match_id);
    const auto start = dom.find(opening);
    if (start == std::string::npos) return shown;
    const auto seq_start = start + opening.size();
    const auto seq_end = dom.find('"', seq_start);
    const auto body_start = dom.find('>', seq_end);
    const auto body_end = dom.find("</section>", body_start);
    if (seq_end == std::string::npos || body_start == std::string::npos ||
        body_end == std::string::npos)
        return shown;
    shown.update_seq = dom.substr(seq_start, seq_end - seq_start);
    const std::string body = dom.substr(body_start + 1, body_end - body_start - 1);
    for (const char* side : {"home", "draw", "away"}) {
        const std::regex figure(
            fmt::format(R"re(<dd class="p full-{}" data-value="([^"]+)">([^<]*)</dd>)re", side));
        std::smatch f;
        if (std::regex_search(body, f, figure)) shown.p[side] = {f[1], f[2]};
    }
    return shown;
}

// JavaScript: the text, or an attribute, of the first element matching `selector` in a card.
std::string in_card(std::uint64_t match_id, const std::string& selector,
                    const std::string& what = "textContent") {
    return fmt::format(R"((document.querySelector('[data-match-id="{}"] {}') || {{}}).{})",
                       match_id, selector, what);
}

// JavaScript: "ok" when every chart's lines only move rightwards, else the first step back.
const char* kLinesMoveForward = R"((() => {
  for (const chart of document.querySelectorAll('.timeline')) {
    for (const side of ['home', 'away']) {
      let last = -1;
      for (const line of chart.querySelectorAll('.line-' + side)) {
        for (const pair of line.getAttribute('points').trim().split(' ')) {
          const x = Number(pair.split(',')[0]);
          if (x < last) return 'back from ' + last + ' to ' + x;
          last = x;
        }
      }
    }
  }
  return 'ok';
})())";

}  // namespace

TEST_CASE("the page shows what the engine published, in a real browser",
          "[gateway][browser][sockets]") {
    REQUIRE(std::filesystem::exists(test::kChromium));  // tools/setup/install-deps.sh installs it
    const auto dir = test::scratch_dir("gateway-browser");
    test::LiveStack stack(dir, 3'600'000, {"--counters-ms", "200"});
    const std::uint16_t port =
        stack.start_gateway({"--upstream-silence-ms", std::to_string(kSilenceLimitMs)});

    const std::map<std::uint64_t, std::uint64_t> last_seq{
        {101, play_league(stack, 101, 1.6, 1.1)},
        {102, play_league(stack, 102, 0.9, 1.4)},
        {103, play_knockout(stack, 103, "Harbour Athletic", "Kiln Street", true)},
        {104, play_knockout(stack, 104, "Fernbrook", "Old Quarry", false)}};
    for (const auto& [match_id, seq] : last_seq) REQUIRE(stack.await_update(match_id, seq));
    std::this_thread::sleep_for(300ms);  // the gateway reads the same feed; let it catch up

    const std::string url = fmt::format("http://127.0.0.1:{}/", port);
    test::DevtoolsPage page(dir, url);
    REQUIRE(page.wait_until(
        "document.body.dataset.loaded === '1' && document.querySelectorAll('.match').length === 4 "
        "&& document.getElementById('feed-state').dataset.state === 'live'"));
    const std::string dom = page.evaluate("document.documentElement.outerHTML");
    INFO(dom.substr(0, 3000));
    CHECK(dom.find("not advice") != std::string::npos);
    CHECK(dom.find("responsible-gambling") != std::string::npos);

    // Every card's full-time figures are exactly what serve published last.
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
    REQUIRE(stack.latest().size() == 4);

    // The knock-out round: names, competition, the to-advance bar, the shoot-out and its winner.
    CHECK(page.evaluate(in_card(103, ".match-title")) == "Harbour Athletic v Kiln Street");
    CHECK(page.evaluate(in_card(103, ".team-home")) == "Harbour Athletic");
    CHECK(page.evaluate(in_card(103, ".competition")).rfind("Lowland Cup", 0) == 0);
    CHECK(page.evaluate(in_card(103, ".advance", "hidden")) == "false");
    CHECK(page.evaluate(in_card(103, ".adv-home", "dataset.value")) == "1");
    CHECK(page.evaluate(in_card(103, ".decision", "hidden")) == "false");
    CHECK(page.evaluate(in_card(103, ".decision", "dataset.winner")) == "home");
    CHECK(page.evaluate(in_card(103, ".decision")) == "Harbour Athletic advance on penalties 4–3");
    CHECK(page.evaluate(in_card(103, ".kicks-home", "dataset.kicks")) == "11101");
    CHECK(page.evaluate(in_card(103, ".kicks-away", "dataset.kicks")) == "10110");
    CHECK(page.evaluate(in_card(103, ".timeline .meaning", "tagName")) == "line");
    // In extra time: the chances to advance as published, no winner yet, the clock past 105'.
    const auto& in_extra = stack.latest().at(104).outputs;
    REQUIRE(in_extra.has_advance);
    CHECK(page.evaluate(in_card(104, ".match-title")) == "Fernbrook v Old Quarry");
    CHECK(page.evaluate(in_card(104, ".advance", "hidden")) == "false");
    CHECK(std::strtod(page.evaluate(in_card(104, ".adv-home", "dataset.value")).c_str(), nullptr) ==
          in_extra.p_advance_home);
    CHECK(page.evaluate(in_card(104, ".decision", "hidden")) == "true");
    CHECK(page.evaluate(in_card(104, ".clock")) == "105+1:30");
    CHECK(page.evaluate(in_card(104, ".timeline .line-advance", "tagName")) == "polyline");
    // A league match has no to-advance bar; stoppage never draws a line backwards.
    CHECK(page.evaluate(in_card(101, ".advance", "hidden")) == "true");
    CHECK(page.evaluate(in_card(101, ".stale", "hidden")) == "true");
    CHECK(page.evaluate(kLinesMoveForward) == "ok");

    // Screenshots at a phone's width and a wall's, kept in the build tree beside the test; the
    // page is never wider than the viewport.
    const auto artefacts = std::filesystem::current_path() / "artefacts";
    std::filesystem::create_directories(artefacts);
    for (const int width : {390, 1920}) {
        INFO("width " << width);
        page.set_viewport(width, 900);
        const int height = std::stoi(page.evaluate("document.documentElement.scrollHeight"));
        page.set_viewport(width, std::min(height, 4000));
        CHECK(page.evaluate("window.innerWidth") == std::to_string(width));
        const int scroll_width = std::stoi(page.evaluate("document.documentElement.scrollWidth"));
        CHECK(scroll_width <= width);
        const auto png = artefacts / fmt::format("gateway_page_{}px.png", width);
        std::filesystem::remove(png);
        page.screenshot(png);
        REQUIRE(std::filesystem::exists(png));
        CHECK(std::filesystem::file_size(png) > 10'000);
        std::cout << "screenshot (" << width << " px wide, page " << scroll_width
                  << " px): " << png.string() << "\n";
    }

    // serve dies: the gateway hears nothing more, tells the page, and every card goes stale.
    page.set_viewport(1280, 900);
    stack.serve_process().signal(SIGKILL);
    const auto killed = std::chrono::steady_clock::now();
    REQUIRE(page.wait_until("document.getElementById('feed-state').dataset.state === 'lost'",
                            std::chrono::milliseconds(kSilenceLimitMs + 5000)));
    const auto shown_after = std::chrono::duration_cast<std::chrono::milliseconds>(
        std::chrono::steady_clock::now() - killed);
    std::cout << "stale shown " << shown_after.count() << " ms after serve was killed (limit "
              << kSilenceLimitMs << " ms, checked every " << kSilenceLimitMs / 4 << " ms)\n";
    // The limit, a quarter of it between the gateway's checks, and the page's own handling.
    CHECK(shown_after.count() <= kSilenceLimitMs + kSilenceLimitMs / 4 + 1000);
    CHECK(page.evaluate("document.getElementById('feed-state').textContent").find("live") ==
          std::string::npos);
    CHECK(page.evaluate("[...document.querySelectorAll('.match')].every((c) => "
                        "c.dataset.stale.split(' ').includes('upstream'))") == "true");
    CHECK(page.evaluate(in_card(104, ".stale", "hidden")) == "false");

    // One match alone, for an overlay: only its card, stale from the start (serve is gone).
    page.navigate(url + "?match=103");
    REQUIRE(
        page.wait_until("document.body && document.body.dataset.loaded === '1' && "
                        "document.body.classList.contains('single') && "
                        "document.querySelectorAll('.match').length === 1 && "
                        "document.getElementById('feed-state').dataset.state === 'lost'"));
    CHECK(page.evaluate("document.querySelector('.match').dataset.matchId") == "103");
    CHECK(page.evaluate(in_card(103, ".decision", "dataset.winner")) == "home");
}

TEST_CASE(
    "in a real browser, a match is marked stale while serve says its feed is silent, and fresh "
    "after",
    "[gateway][browser][sockets]") {
    REQUIRE(std::filesystem::exists(test::kChromium));
    const auto dir = test::scratch_dir("gateway-browser-feed-stale");
    // Ticks every 300 ms re-publish the match; past 1 s of feed silence in play they say so.
    test::LiveStack stack(dir, 300, {"--feed-stale-s", "1"});
    const std::uint16_t port = stack.start_gateway();
    test::FeedBuilder feed(201);
    stack.send(feed.next(setup_of("Marsh End", "Tollgate", 1.4, 1.2), MatchClock{}));
    stack.send(feed.start(Period::first_half, 0.0));
    stack.send(feed.goal(Side::home, Period::first_half, 3.0));
    REQUIRE(stack.await_update(201, feed.last_seq()));

    test::DevtoolsPage page(dir, fmt::format("http://127.0.0.1:{}/?match=201", port));
    const std::string feed_silent =
        R"((document.querySelector('[data-match-id="201"]') || {dataset: {stale: 'x'}}).dataset.stale)";
    REQUIRE(page.wait_until(feed_silent + " === 'feed'", 15s));
    CHECK(page.evaluate(in_card(201, ".stale")) == "stale: match feed silent");
    CHECK(page.evaluate("document.getElementById('feed-state').dataset.state") == "live");
    // The feed speaks again: the next update vouches for the match and the mark goes.
    stack.send(feed.shot(Side::away, 0.1, Period::first_half, 4.0));
    REQUIRE(page.wait_until(feed_silent + " === ''", 15s));
    CHECK(page.evaluate(in_card(201, ".stale", "hidden")) == "true");
}
