// Load on the gateway: N WebSocket clients on loopback (default 1,000) watching every match of
// a replayed round while this program publishes the round's updates into `liveprob gateway`
// (a separate process). Reports delivery latency (gateway in -> client out, from the frame's
// times_us.gateway_receive to the client's read), the gateway's CPU time and memory, and,
// in the second benchmark, the same with one client that never reads.
//
//   liveprob_bench_gateway_load --benchmark_counters_tabular=true
// Environment: LIVEPROB_BIN (default: ../liveprob beside this program), GATEWAY_CLIENTS.
#include <benchmark/benchmark.h>

#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/websocket.hpp>
#include <fmt/format.h>
#include <spawn.h>
#include <sys/wait.h>
#include <zmq.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>
#include <thread>
#include <vector>

#include "liveprob/adapters/topics.hpp"
#include "liveprob/protocol/update_codec.hpp"

extern char** environ;

namespace {

namespace asio = boost::asio;
namespace beast = boost::beast;
namespace websocket = beast::websocket;
using asio::ip::tcp;
using namespace std::chrono_literals;

std::int64_t now_us() {
    return std::chrono::duration_cast<std::chrono::microseconds>(
               std::chrono::system_clock::now().time_since_epoch()).count();
}

std::string read_file(const std::filesystem::path& p) {
    std::ifstream in(p);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

// The gateway as its own process, so its CPU and memory are its own.
struct GatewayProcess {
    pid_t pid = -1;
    std::uint16_t port = 0;
    GatewayProcess(const std::string& feed, const std::filesystem::path& dir) {
        const char* env = std::getenv("LIVEPROB_BIN");
        const std::string bin = env ? env : (std::filesystem::canonical("/proc/self/exe").parent_path().parent_path() / "liveprob").string();
        const std::string port_file = (dir / "port").string();
        std::vector<std::string> argv{bin, "gateway", "--feed", feed, "--port", "0", "--port-file", port_file,
                                      "--queue-cap", "64", "--client-send-buffer", "16384"};
        std::vector<char*> args;
        for (auto& a : argv) args.push_back(a.data());
        args.push_back(nullptr);
        if (posix_spawn(&pid, bin.c_str(), nullptr, nullptr, args.data(), environ) != 0) throw std::runtime_error("cannot start " + bin);
        for (int i = 0; i < 500 && !std::filesystem::exists(port_file); ++i) std::this_thread::sleep_for(20ms);
        port = static_cast<std::uint16_t>(std::stoi(read_file(port_file)));
    }
    ~GatewayProcess() {
        kill(pid, SIGTERM);
        int status = 0;
        waitpid(pid, &status, 0);
    }
    // utime + stime in seconds (/proc/<pid>/stat fields 14 and 15).
    double cpu_seconds() const {
        const std::string stat = read_file(fmt::format("/proc/{}/stat", pid));
        std::istringstream in(stat.substr(stat.rfind(')') + 2));
        std::string field;
        double ticks = 0;
        for (int i = 3; i <= 15 && in >> field; ++i) {
            if (i >= 14) ticks += std::stod(field);
        }
        return ticks / static_cast<double>(sysconf(_SC_CLK_TCK));
    }
    double memory_mib(const char* key) const {  // VmRSS or VmHWM
        std::istringstream in(read_file(fmt::format("/proc/{}/status", pid)));
        for (std::string line; std::getline(in, line);) {
            if (line.rfind(key, 0) == 0) return std::stod(line.substr(std::strlen(key) + 1)) / 1024.0;
        }
        return 0;
    }
};

struct Client {
    explicit Client(asio::io_context& io) : ws(io) {}
    websocket::stream<beast::tcp_stream> ws;
    beast::flat_buffer buffer;
    bool closed = false;
};

// Reads forever, recording latency of each update frame.
void read_loop(Client& c, std::vector<std::int64_t>& latencies) {
    c.ws.async_read(c.buffer, [&c, &latencies](beast::error_code ec, std::size_t) {
        if (ec) {
            c.closed = true;
            return;
        }
        const auto received = now_us();
        const std::string_view text(static_cast<const char*>(c.buffer.data().data()), c.buffer.size());
        const auto at = text.find("\"gateway_receive\":");
        if (at != std::string_view::npos) latencies.push_back(received - std::atoll(text.data() + at + 18));
        c.buffer.consume(c.buffer.size());
        read_loop(c, latencies);
    });
}

double percentile(std::vector<std::int64_t>& v, double q) {
    if (v.empty()) return 0;
    const auto k = static_cast<std::size_t>(q * static_cast<double>(v.size() - 1));
    std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(k), v.end());
    return static_cast<double>(v[k]);
}

// One replayed round: `matches` matches, each publishing an update every `period` for the
// run's length; probabilities drift as a match would (the gateway never looks at them).
void run_load(benchmark::State& state, bool with_stalled_client) {
    const int clients = std::getenv("GATEWAY_CLIENTS") ? std::atoi(std::getenv("GATEWAY_CLIENTS")) : 1000;
    constexpr int kMatches = 10;
    constexpr auto kPeriod = 200ms;       // 5 updates per second per match
    constexpr auto kRunLength = 15s;
    const auto dir = std::filesystem::temp_directory_path() / fmt::format("liveprob-gateway-load-{}", getpid());
    std::filesystem::create_directories(dir);

    zmq::context_t context(1);
    zmq::socket_t pub(context, zmq::socket_type::pub);
    pub.bind("tcp://127.0.0.1:*");
    GatewayProcess gateway(pub.get(zmq::sockopt::last_endpoint), dir);

    asio::io_context io(1);
    std::vector<std::unique_ptr<Client>> pool;
    std::vector<std::int64_t> latencies;
    latencies.reserve(2'000'000);
    for (int i = 0; i < clients; ++i) {
        auto c = std::make_unique<Client>(io);
        beast::get_lowest_layer(c->ws).connect(tcp::endpoint(asio::ip::make_address("127.0.0.1"), gateway.port));
        c->ws.handshake(fmt::format("127.0.0.1:{}", gateway.port), "/feed");
        c->ws.write(asio::buffer(std::string(R"({"watch":"all"})")));
        read_loop(*c, latencies);
        pool.push_back(std::move(c));
    }
    std::unique_ptr<Client> stalled;
    if (with_stalled_client) {  // small receive buffer, never reads
        stalled = std::make_unique<Client>(io);
        auto& s = beast::get_lowest_layer(stalled->ws).socket();
        s.open(tcp::v4());
        s.set_option(asio::socket_base::receive_buffer_size(4096));
        s.connect(tcp::endpoint(asio::ip::make_address("127.0.0.1"), gateway.port));
        stalled->ws.handshake(fmt::format("127.0.0.1:{}", gateway.port), "/feed");
        stalled->ws.write(asio::buffer(std::string(R"({"watch":"all"})")));
    }
    std::thread client_thread([&io] { io.run(); });
    std::this_thread::sleep_for(500ms);  // subscription settles

    const double cpu_before = gateway.cpu_seconds();
    liveprob::protocol::UpdateEncoder encoder;
    std::uint64_t published = 0;
    for (auto _ : state) {
        const auto start = std::chrono::steady_clock::now();
        auto next = start;
        for (std::uint64_t seq = 1; std::chrono::steady_clock::now() - start < kRunLength; ++seq) {
            for (std::uint64_t m = 1; m <= kMatches; ++m) {
                liveprob::protocol::UpdateMeta meta{m, seq, seq, 0, now_us(), 0};
                liveprob::Outputs o;
                o.status = liveprob::MatchStatus::in_play;
                o.clock = {liveprob::Period::second_half, static_cast<std::uint32_t>(seq * 1000)};
                o.p_home = 0.4 + 0.2 * std::sin(static_cast<double>(seq + m) / 50.0);
                o.p_draw = 0.3;
                o.p_away = 1.0 - o.p_home - o.p_draw;
                o.next_goal_none = 1.0;
                o.goals_added[0][0] = 1.0;
                const auto bytes = encoder.encode(meta, o);
                const std::string topic = liveprob::adapters::match_topic_string(m);
                pub.send(zmq::buffer(topic), zmq::send_flags::sndmore);
                pub.send(zmq::buffer(bytes.data(), bytes.size()), zmq::send_flags::none);
                ++published;
            }
            next += kPeriod;
            std::this_thread::sleep_until(next);
        }
        std::this_thread::sleep_for(1s);  // the last frames arrive
        state.SetIterationTime(std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count());
    }
    const double cpu = gateway.cpu_seconds() - cpu_before;
    state.counters["clients"] = clients;
    state.counters["updates_in"] = static_cast<double>(published);
    state.counters["frames_out"] = static_cast<double>(latencies.size());
    state.counters["gw_cpu_pct"] = 100.0 * cpu / (std::chrono::duration<double>(kRunLength).count() + 1.0);
    state.counters["gw_rss_MiB"] = gateway.memory_mib("VmRSS:");
    state.counters["gw_peak_MiB"] = gateway.memory_mib("VmHWM:");
    io.stop();
    client_thread.join();
    state.counters["p50_us"] = percentile(latencies, 0.50);
    state.counters["p90_us"] = percentile(latencies, 0.90);
    state.counters["p99_us"] = percentile(latencies, 0.99);
    state.counters["p999_us"] = percentile(latencies, 0.999);
    state.counters["max_us"] = percentile(latencies, 1.0);
    std::filesystem::remove_all(dir);
}

void BM_GatewayRound(benchmark::State& state) { run_load(state, false); }
void BM_GatewayRoundWithStalledClient(benchmark::State& state) { run_load(state, true); }

}  // namespace

BENCHMARK(BM_GatewayRound)->Iterations(1)->UseManualTime()->Unit(benchmark::kSecond);
BENCHMARK(BM_GatewayRoundWithStalledClient)->Iterations(1)->UseManualTime()->Unit(benchmark::kSecond);
BENCHMARK_MAIN();
