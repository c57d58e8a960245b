// A page open in Debian's headless Chromium, driven over the browser's own remote-debugging
// WebSocket on loopback: evaluate JavaScript in the page, wait for a condition, size the
// viewport, take a screenshot, go to another address. For tests that watch a page change while
// something happens (a service killed) instead of reading it once. Everything that would reach
// outside the machine is turned off; the browser stops when the object goes.
#pragma once

#include <catch2/catch.hpp>

#include <fmt/format.h>
#include <simdjson.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <memory>
#include <regex>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "child_process.hpp"
#include "liveprob/protocol/json_writer.hpp"
#include "web_clients.hpp"

namespace liveprob::test {

inline const char* kChromium = "/usr/bin/chromium";  // tools/setup/install-deps.sh installs it

// Headless Chromium with everything that would reach outside the machine turned off.
inline std::vector<std::string> chromium_command(const std::filesystem::path& profile) {
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

inline std::string base64_decode(std::string_view text) {
    auto value = [](char c) -> int {
        if (c >= 'A' && c <= 'Z') return c - 'A';
        if (c >= 'a' && c <= 'z') return c - 'a' + 26;
        if (c >= '0' && c <= '9') return c - '0' + 52;
        if (c == '+') return 62;
        if (c == '/') return 63;
        return -1;  // '=' padding and anything else
    };
    std::string out;
    unsigned bits = 0;
    int held = 0;
    for (const char c : text) {
        const int v = value(c);
        if (v < 0) continue;
        bits = (bits << 6) | static_cast<unsigned>(v);
        held += 6;
        if (held >= 8) {
            held -= 8;
            out.push_back(static_cast<char>((bits >> held) & 0xFF));
        }
    }
    return out;
}

class DevtoolsPage {
public:
    DevtoolsPage(const std::filesystem::path& dir, const std::string& url) {
        const auto profile = dir / "chromium-profile";
        auto argv = chromium_command(profile);
        argv.insert(argv.end(), {"--remote-debugging-port=0", "--window-size=1280,900", url});
        browser_ = std::make_unique<ChildProcess>(argv, dir / "chromium.log");
        // The browser names its debugging port in this file once it listens.
        const std::string active =
            wait_for_file(profile / "DevToolsActivePort", std::chrono::seconds(30));
        const auto port = static_cast<std::uint16_t>(std::stoi(active));
        std::smatch page;
        const std::regex page_socket(
            R"re("webSocketDebuggerUrl":\s*"ws://[^/"]+(/devtools/page/[^"]+)")re");
        std::string list;
        for (int i = 0; i < 100; ++i) {  // the first page target may take a moment to appear
            list = http_request("127.0.0.1", port, "/json/list").body;
            if (std::regex_search(list, page, page_socket)) break;
            std::this_thread::sleep_for(std::chrono::milliseconds(100));
        }
        if (page.empty()) throw std::runtime_error("no page target in " + list);
        socket_ = std::make_unique<WebSocketClient>(port, std::nullopt, 0, page[1].str());
        REQUIRE_FALSE(socket_->handshake_error());
    }

    // One protocol command; its "result" object as JSON text.
    std::string command(const std::string& method, const std::string& params_json = "{}") {
        const int id = ++last_id_;
        socket_->send(
            fmt::format(R"({{"id":{},"method":"{}","params":{}}})", id, method, params_json));
        auto reply =
            socket_->receive_containing(fmt::format("\"id\":{},", id), std::chrono::seconds(30));
        if (!reply) throw std::runtime_error("no answer to " + method);
        if (reply->find("\"error\":") != std::string::npos &&
            reply->find("\"result\":") == std::string::npos)
            throw std::runtime_error(method + " failed: " + *reply);
        return *reply;
    }

    // The value of a JavaScript expression evaluated in the page, as text (String(value)).
    std::string evaluate(const std::string& expression) {
        std::string params;
        protocol::JsonWriter json(params);
        json.begin_object()
            .member("expression", "String(" + expression + ")")
            .member("returnByValue", true)
            .end_object();
        const std::string reply = command("Runtime.evaluate", params);
        simdjson::dom::parser parser;
        const simdjson::dom::element doc = parser.parse(reply);
        std::string_view value;
        if (doc["result"]["exceptionDetails"].error() == simdjson::SUCCESS ||
            doc["result"]["result"]["value"].get(value) != simdjson::SUCCESS)
            throw std::runtime_error("evaluating " + expression + ": " + reply);
        return std::string(value);
    }

    // Polls `condition` (a JavaScript expression) until it is true; false when `limit` passes.
    // A condition that throws (the page still loading: no body yet) counts as not yet true.
    bool wait_until(const std::string& condition,
                    std::chrono::milliseconds limit = std::chrono::seconds(20)) {
        const auto deadline = std::chrono::steady_clock::now() + limit;
        while (std::chrono::steady_clock::now() < deadline) {
            try {
                if (evaluate("!!(" + condition + ")") == "true") return true;
            } catch (const std::runtime_error&) {}
            std::this_thread::sleep_for(std::chrono::milliseconds(50));
        }
        return false;
    }

    // Sizes the viewport as a device `width` px wide (a phone's below 600 px).
    void set_viewport(int width, int height) {
        command("Emulation.setDeviceMetricsOverride",
                fmt::format(R"({{"width":{},"height":{},"deviceScaleFactor":1,"mobile":{}}})",
                            width, height, width < 600 ? "true" : "false"));
    }

    // The viewport as a PNG file.
    void screenshot(const std::filesystem::path& png) {
        const std::string reply = command("Page.captureScreenshot", R"({"format":"png"})");
        simdjson::dom::parser parser;
        const simdjson::dom::element doc = parser.parse(reply);
        std::string_view data;
        if (doc["result"]["data"].get(data) != simdjson::SUCCESS)
            throw std::runtime_error("no screenshot in " + reply.substr(0, 200));
        std::ofstream(png, std::ios::binary) << base64_decode(data);
    }

    void navigate(const std::string& url) {
        command("Page.navigate", fmt::format(R"({{"url":"{}"}})", url));
    }

private:
    std::unique_ptr<ChildProcess> browser_;
    std::unique_ptr<WebSocketClient> socket_;
    int last_id_ = 0;
};

}  // namespace liveprob::test
