// Real processes and sockets for the live-service tests: start `liveprob serve`/`send`/`tap`
// as child processes (killed when the test ends, pass or fail), read the endpoints serve bound
// on ephemeral ports, build an invented match feed, and compute what the engine gives for it.
#pragma once

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>
#include <zmq.hpp>

#include "child_process.hpp"
#include "liveprob/core/match.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/transport/topics.hpp"
#include "test_env.hpp"

namespace liveprob::test {

using namespace std::chrono_literals;

// `liveprob serve` on ephemeral loopback ports; endpoints read back from its endpoints file.
class ServeProcess {
public:
    ServeProcess(const std::filesystem::path& dir, const std::string& name,
                 std::vector<std::string> extra,
                 const std::map<std::string, std::string>& fixed_endpoints = {}) {
        const auto endpoints_file = dir / (name + ".endpoints");
        std::filesystem::remove(endpoints_file);
        const auto endpoint = [&](const char* key) {
            const auto it = fixed_endpoints.find(key);
            return it == fixed_endpoints.end() ? std::string("tcp://127.0.0.1:*") : it->second;
        };
        std::vector<std::string> args = {liveprob_binary().string(),
                                         "serve",
                                         "--ingest",
                                         endpoint("ingest"),
                                         "--publish",
                                         endpoint("publish"),
                                         "--snapshot",
                                         endpoint("snapshot"),
                                         "--endpoints-file",
                                         endpoints_file.string()};
        // A configuration file given in `extra` says its own log level (a flag would win).
        if (std::find(extra.begin(), extra.end(), "--config") == extra.end()) {
            args.push_back("--log-level");
            args.push_back("info");
        }
        args.insert(args.end(), extra.begin(), extra.end());
        log_ = dir / (name + ".log");
        process_ = std::make_unique<ChildProcess>(args, dir / (name + ".out"), log_);
        const auto deadline = std::chrono::steady_clock::now() + 20s;
        while (!std::filesystem::exists(endpoints_file)) {
            if (process_->wait(0ms)) throw std::runtime_error("serve exited early: " + log());
            if (std::chrono::steady_clock::now() > deadline)
                throw std::runtime_error("serve did not start");
            std::this_thread::sleep_for(20ms);
        }
        std::istringstream lines(read_whole_file(endpoints_file));
        std::string line;
        while (std::getline(lines, line)) {
            const auto eq = line.find('=');
            if (eq != std::string::npos) endpoints_[line.substr(0, eq)] = line.substr(eq + 1);
        }
    }

    const std::string& ingest() const { return endpoints_.at("ingest"); }
    const std::string& publish() const { return endpoints_.at("publish"); }
    const std::string& snapshot() const { return endpoints_.at("snapshot"); }
    const std::map<std::string, std::string>& endpoints() const { return endpoints_; }
    ChildProcess& process() { return *process_; }
    // What serve wrote (spdlog writes to standard output; errors go to standard error).
    std::string log() const { return process_->output() + read_whole_file(log_); }

private:
    std::unique_ptr<ChildProcess> process_;
    std::map<std::string, std::string> endpoints_;
    std::filesystem::path log_;
};

inline core::InboundMessage feed_message(std::uint64_t match_id, std::uint64_t seq,
                                         core::Period period, std::uint32_t clock_ms,
                                         core::MessageBody body) {
    core::InboundMessage m;
    m.header.match_id = match_id;
    m.header.source_seq = seq;
    m.header.source_time_us = 1'800'000'000'000'000 + static_cast<std::int64_t>(clock_ms) * 1000;
    m.header.clock = {period, clock_ms};
    m.body = std::move(body);
    return m;
}

// An invented match: setup, kick-off, a clock sync every five minutes, goals, a red card,
// stoppage, both halves' ends and the final whistle.
inline std::vector<core::InboundMessage> invented_match(std::uint64_t match_id) {
    core::MatchSetup setup;
    setup.home_name = "Harrow Fen";
    setup.away_name = "Lumen Quay";
    setup.competition = "Estuary Shield";
    setup.prior = core::PriorMeans{1.55, 1.10};
    std::vector<core::InboundMessage> m;
    std::uint64_t seq = 1;
    const auto add = [&](core::Period p, std::uint32_t minute_ms, core::MessageBody body) {
        m.push_back(feed_message(match_id, seq++, p, minute_ms, std::move(body)));
    };
    constexpr std::uint32_t kMinute = 60'000;
    add(core::Period::pre_match, 0, setup);
    add(core::Period::first_half, 0, core::PeriodStart{core::Period::first_half});
    for (std::uint32_t minute = 5; minute <= 45; minute += 5) {
        add(core::Period::first_half, minute * kMinute, core::ClockSync{true});
        if (minute == 20)
            add(core::Period::first_half, 20 * kMinute + 30'000,
                core::Goal{core::Side::home, false, false});
        if (minute == 35)
            add(core::Period::first_half, 35 * kMinute + 10'000,
                core::RedCard{core::Side::away, false});
    }
    add(core::Period::first_half, 45 * kMinute,
        core::StoppageAnnounced{core::Period::first_half, 2});
    add(core::Period::first_half, 47 * kMinute, core::PeriodEnd{core::Period::first_half});
    add(core::Period::second_half, 45 * kMinute, core::PeriodStart{core::Period::second_half});
    for (std::uint32_t minute = 50; minute <= 90; minute += 5) {
        add(core::Period::second_half, minute * kMinute, core::ClockSync{true});
        if (minute == 60)
            add(core::Period::second_half, 61 * kMinute,
                core::Goal{core::Side::away, false, false});
        if (minute == 75)
            add(core::Period::second_half, 77 * kMinute, core::Goal{core::Side::home, true, false});
    }
    add(core::Period::second_half, 90 * kMinute,
        core::StoppageAnnounced{core::Period::second_half, 4});
    add(core::Period::second_half, 94 * kMinute, core::PeriodEnd{core::Period::second_half});
    add(core::Period::second_half, 94 * kMinute, core::FinalWhistle{});
    return m;
}

inline void write_frames(const std::filesystem::path& path,
                         const std::vector<core::InboundMessage>& messages) {
    std::vector<std::uint8_t> stream;
    for (const auto& message : messages)
        protocol::append_frame(stream, protocol::encode_feed_message(message));
    std::ofstream out(path, std::ios::binary);
    out.write(reinterpret_cast<const char*>(stream.data()),
              static_cast<std::streamsize>(stream.size()));
}

// What the engine publishes for a feed, message by message: the state after the setup, then
// after every message the match accepts (the service publishes exactly these).
struct ReferenceOutput {
    std::uint64_t input_seq = 0;
    core::Outputs outputs;
};
inline std::vector<ReferenceOutput> engine_outputs(const std::vector<core::InboundMessage>& feed) {
    std::vector<ReferenceOutput> out;
    std::optional<core::Match> match;
    for (const auto& m : feed) {
        if (!match) {
            match.emplace(m.header.match_id, std::get<core::MatchSetup>(m.body),
                          core::ModelParams{});
            out.push_back({m.header.source_seq, match->outputs()});
            continue;
        }
        const core::ApplyResult r = match->apply(m);
        if (r.verdict == core::Verdict::accepted || r.verdict == core::Verdict::late) {
            out.push_back({m.header.source_seq, match->outputs()});
        }
    }
    return out;
}

// A subscriber in the test process (a real SUB socket), decoding every update it reads.
class TestSubscriber {
public:
    TestSubscriber(zmq::context_t& context, const std::string& endpoint, const std::string& topic,
                   int rcvhwm = 1000)
        : socket_(context, zmq::socket_type::sub) {
        socket_.set(zmq::sockopt::linger, 0);
        socket_.set(zmq::sockopt::rcvhwm, rcvhwm);
        socket_.set(zmq::sockopt::subscribe, topic);
        socket_.set(zmq::sockopt::subscribe, std::string(transport::kCountersTopic));
        socket_.connect(endpoint);
    }
    zmq::socket_t& socket() { return socket_; }

    // Waits until the service's counters arrive: from then on the subscription is live.
    std::optional<protocol::CounterSet> next_counters(std::chrono::milliseconds timeout) {
        const auto deadline = std::chrono::steady_clock::now() + timeout;
        while (std::chrono::steady_clock::now() < deadline) {
            auto [topic, body] = receive(50ms);
            if (!topic || *topic != transport::kCountersTopic) continue;
            auto decoded = protocol::decode_counters({body.data(), body.size()});
            if (decoded.ok()) return *decoded.value;
        }
        return std::nullopt;
    }

    // Updates (ticks skipped when `events_only`) until `count` arrive or `timeout` passes.
    std::vector<protocol::DecodedUpdate> updates(std::size_t count,
                                                 std::chrono::milliseconds timeout,
                                                 bool events_only = true) {
        std::vector<protocol::DecodedUpdate> got;
        const auto deadline = std::chrono::steady_clock::now() + timeout;
        while (got.size() < count && std::chrono::steady_clock::now() < deadline) {
            auto [topic, body] = receive(50ms);
            if (!topic || *topic == transport::kCountersTopic) continue;
            auto decoded = protocol::decode_update({body.data(), body.size()});
            if (!decoded.ok())
                throw std::runtime_error("an update failed to decode: " + decoded.detail);
            if (events_only && decoded.value->meta.receive_time_us == 0) continue;
            got.push_back(*decoded.value);
        }
        return got;
    }

private:
    std::pair<std::optional<std::string>, std::vector<std::uint8_t>> receive(
        std::chrono::milliseconds wait) {
        zmq::pollitem_t item{socket_.handle(), 0, ZMQ_POLLIN, 0};
        if (zmq::poll(&item, 1, wait) <= 0) return {std::nullopt, {}};
        zmq::message_t topic;
        zmq::message_t body;
        if (!socket_.recv(topic) || !topic.more() || !socket_.recv(body)) return {std::nullopt, {}};
        const auto* p = body.data<std::uint8_t>();
        return {topic.to_string(), std::vector<std::uint8_t>(p, p + body.size())};
    }
    zmq::socket_t socket_;
};

inline std::uint64_t counter(const protocol::CounterSet& set, const std::string& name) {
    for (const auto& [n, v] : set.values) {
        if (n == name) return v;
    }
    return 0;
}

// Every published field of two outputs, compared exactly (the same engine, the same inputs).
inline bool same_outputs(const core::Outputs& a, const core::Outputs& b) {
    return a.status == b.status && a.clock == b.clock && a.home_goals == b.home_goals &&
           a.away_goals == b.away_goals && a.home_reds == b.home_reds &&
           a.away_reds == b.away_reds && a.p_home == b.p_home && a.p_draw == b.p_draw &&
           a.p_away == b.p_away && a.expected_home_goals == b.expected_home_goals &&
           a.expected_away_goals == b.expected_away_goals && a.next_goal_home == b.next_goal_home &&
           a.next_goal_away == b.next_goal_away && a.next_goal_none == b.next_goal_none &&
           a.p_over == b.p_over && a.p_both_score == b.p_both_score &&
           a.goals_added == b.goals_added && a.events_applied == b.events_applied;
}

}  // namespace liveprob::test
