// Event-to-subscriber latency on loopback: a feed process pushes in-play messages at a fixed
// rate, through `liveprob serve` (decode, journal off, engine, encode, publish) or through a
// bare PULL -> PUB relay doing no work, to a subscriber in this process. Both are measured in
// the same run, so the ratio is fair. The feed process writes each message's send time into
// shared memory; the subscriber reads it back by the update's input sequence.
//   liveprob_bench_live_latency            (needs the liveprob program beside tools/bench/)
#include <benchmark/benchmark.h>
#include <signal.h>
#include <sys/mman.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <thread>
#include <vector>
#include <zmq.hpp>

#include "bench_messages.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/update_codec.hpp"

namespace {

using namespace liveprob;

using namespace liveprob::core;
using namespace std::chrono_literals;

constexpr std::uint64_t kMatches = 100;
constexpr auto kWarmup = 1s;
constexpr auto kMeasure = 4s;

std::int64_t now_ns() {
    return std::chrono::duration_cast<std::chrono::nanoseconds>(
               std::chrono::steady_clock::now().time_since_epoch())
        .count();
}

using bench::message;

// Setups and kick-offs, then clock syncs round-robin over the matches (each one reprices).
std::vector<std::vector<std::uint8_t>> feed(std::size_t events) {
    std::vector<std::vector<std::uint8_t>> out;
    for (std::uint64_t id = 1; id <= kMatches; ++id) {
        MatchSetup setup;
        setup.home_name = "Home side";
        setup.away_name = "Away side";
        setup.prior = PriorMeans{1.4, 1.1};
        out.push_back(protocol::encode_feed_message(message(id, 1, Period::pre_match, 0, setup)));
        out.push_back(
            protocol::encode_feed_message(message(id, 2, Period::first_half, 0, PeriodStart{})));
    }
    for (std::size_t i = 0; i < events; ++i) {
        const std::uint64_t id = 1 + i % kMatches;
        const std::uint64_t round = i / kMatches;
        out.push_back(protocol::encode_feed_message(
            message(id, 3 + round, Period::first_half,
                    static_cast<std::uint32_t>(1000 + 100 * round), ClockSync{})));
    }
    return out;
}

struct Child {
    pid_t pid = -1;
    ~Child() {
        if (pid > 0) {
            ::kill(pid, SIGKILL);
            ::waitpid(pid, nullptr, 0);
        }
    }
};

// The baseline: a process that forwards every ingest message to PUB untouched (a ROUTER, like
// serve's ingest: its first frame, the feed's routing id, is dropped).
void run_relay(const std::string& pull_at, const std::string& pub_at) {
    zmq::context_t context(1);
    zmq::socket_t pull(context, zmq::socket_type::router);
    zmq::socket_t pub(context, zmq::socket_type::pub);
    pull.bind(pull_at);
    pub.bind(pub_at);
    zmq::message_t topic(std::string_view("match.relay"));
    for (;;) {
        zmq::message_t peer;
        zmq::message_t m;
        if (!pull.recv(peer) || !peer.more() || !pull.recv(m)) continue;
        zmq::message_t t(topic.data(), topic.size());
        pub.send(t, zmq::send_flags::sndmore);
        pub.send(m, zmq::send_flags::none);
    }
}

// The feed process: sends every buffer on schedule and records when into `sent_ns`.
void run_feed(const std::string& push_to, const std::vector<std::vector<std::uint8_t>>& buffers,
              double rate, std::int64_t* sent_ns) {
    zmq::context_t context(1);
    zmq::socket_t push(context, zmq::socket_type::dealer);
    push.set(zmq::sockopt::sndhwm, 1'000'000);
    push.set(zmq::sockopt::linger, 2000);
    push.connect(push_to);
    std::this_thread::sleep_for(200ms);
    const auto start = std::chrono::steady_clock::now();
    for (std::size_t i = 0; i < buffers.size(); ++i) {
        std::this_thread::sleep_until(start + std::chrono::nanoseconds(static_cast<std::int64_t>(
                                                  1e9 * static_cast<double>(i) / rate)));
        sent_ns[i] = now_ns();
        push.send(zmq::buffer(buffers[i]), zmq::send_flags::none);
    }
}

std::string liveprob_program() {
    return (std::filesystem::read_symlink("/proc/self/exe").parent_path().parent_path() /
            "liveprob")
        .string();
}

std::string free_endpoint(zmq::context_t& context) {
    // Bind a throwaway socket to an ephemeral port, read it, release it.
    zmq::socket_t s(context, zmq::socket_type::pair);
    s.bind("tcp://127.0.0.1:*");
    return s.get(zmq::sockopt::last_endpoint);
}

double percentile(std::vector<double>& v, double q) {
    if (v.empty()) return 0;
    std::sort(v.begin(), v.end());
    return v[std::min(v.size() - 1,
                      static_cast<std::size_t>(q * static_cast<double>(v.size() - 1) + 0.5))];
}

// relay = true: the bare relay; false: liveprob serve.
void BM_EventToSubscriber(benchmark::State& state, bool relay) {
    const double rate = static_cast<double>(state.range(0));
    const auto events =
        static_cast<std::size_t>(rate * std::chrono::duration<double>(kWarmup + kMeasure).count());
    const auto buffers = feed(events);
    const std::size_t first_measured =
        2 * kMatches +
        static_cast<std::size_t>(rate * std::chrono::duration<double>(kWarmup).count());

    auto* sent_ns =
        static_cast<std::int64_t*>(mmap(nullptr, buffers.size() * sizeof(std::int64_t),
                                        PROT_READ | PROT_WRITE, MAP_SHARED | MAP_ANONYMOUS, -1, 0));
    for (auto _ : state) {
        std::vector<double> latency_us;
        {
            zmq::context_t probe(1);
            const std::string ingest = free_endpoint(probe);
            const std::string publish = free_endpoint(probe);
            const std::string snapshot = free_endpoint(probe);
            probe.close();
            Child server;
            server.pid = fork();
            if (server.pid == 0) {
                if (relay) {
                    run_relay(ingest, publish);
                } else {
                    const std::string program = liveprob_program();
                    execl(program.c_str(), program.c_str(), "serve", "--ingest", ingest.c_str(),
                          "--publish", publish.c_str(), "--snapshot", snapshot.c_str(), "--tick-ms",
                          "600000", "--log-level", "warn", static_cast<char*>(nullptr));
                }
                _exit(127);
            }
            zmq::context_t context(1);
            zmq::socket_t sub(context, zmq::socket_type::sub);
            sub.set(zmq::sockopt::rcvhwm, 0);
            sub.set(zmq::sockopt::subscribe, "match.");
            sub.set(zmq::sockopt::rcvtimeo, 2000);
            sub.connect(publish);
            std::this_thread::sleep_for(500ms);  // the server binds, the subscription arrives
            Child feeder;
            feeder.pid = fork();
            if (feeder.pid == 0) {
                run_feed(ingest, buffers, rate, sent_ns);
                _exit(0);
            }
            // Index of a buffer from its match and sequence (the feed's layout, see feed()).
            const auto index_of = [](std::uint64_t match_id, std::uint64_t seq) -> std::size_t {
                if (seq <= 2) return 2 * (match_id - 1) + (seq - 1);
                return 2 * kMatches + (seq - 3) * kMatches + (match_id - 1);
            };
            std::size_t received = 0;
            while (received < buffers.size()) {
                zmq::message_t topic, body;
                if (!sub.recv(topic)) break;  // quiet for 2 s: the feed is over
                if (!sub.recv(body)) break;
                const std::int64_t arrived = now_ns();
                ++received;
                std::uint64_t match_id = 0, seq = 0;
                const std::span<const std::uint8_t> bytes(body.data<std::uint8_t>(), body.size());
                if (relay) {
                    const auto m = protocol::decode_feed_message(bytes);
                    if (!m.message) continue;
                    match_id = m.message->header.match_id;
                    seq = m.message->header.source_seq;
                } else {
                    const auto u = protocol::decode_update(bytes);
                    if (!u.ok()) continue;
                    match_id = u.value->meta.match_id;
                    seq = u.value->meta.input_seq;
                }
                const std::size_t i = index_of(match_id, seq);
                if (i >= first_measured && i < buffers.size()) {
                    latency_us.push_back(static_cast<double>(arrived - sent_ns[i]) / 1000.0);
                }
            }
            ::waitpid(feeder.pid, nullptr, 0);
            feeder.pid = -1;
        }
        state.SetIterationTime(std::chrono::duration<double>(kMeasure).count());
        state.counters["received"] = static_cast<double>(latency_us.size());
        state.counters["p50_us"] = percentile(latency_us, 0.5);
        state.counters["p99_us"] = percentile(latency_us, 0.99);
        state.counters["p99.9_us"] = percentile(latency_us, 0.999);
        state.counters["max_us"] = percentile(latency_us, 1.0);
    }
    munmap(sent_ns, buffers.size() * sizeof(std::int64_t));
}

void BM_Relay(benchmark::State& state) { BM_EventToSubscriber(state, true); }
void BM_Serve(benchmark::State& state) { BM_EventToSubscriber(state, false); }
BENCHMARK(BM_Relay)->Arg(1000)->Arg(10000)->Iterations(1)->UseManualTime()->Unit(
    benchmark::kSecond);
BENCHMARK(BM_Serve)->Arg(1000)->Arg(10000)->Iterations(1)->UseManualTime()->Unit(
    benchmark::kSecond);

}  // namespace

BENCHMARK_MAIN();
