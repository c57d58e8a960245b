// Load on the gateway: N WebSocket clients on loopback (default 1,000, on two client threads)
// watching every match of a replayed round: the invented league's first round (10 matches,
// from `liveprob simulate`) is sent by `liveprob send` at 300 times real speed into
// `liveprob serve` (ticking every 200 ms), whose publish socket feeds `liveprob gateway`; all
// three are separate processes. Reports delivery latency (gateway in -> client out, from the
// frame's times_us.gateway_receive to the client's read), the gateway's CPU time and memory,
// and, in the second benchmark, the same with one client that never reads.
//
//   liveprob_bench_gateway_load --benchmark_counters_tabular=true
// Environment: LIVEPROB_BIN (default: ../liveprob beside this program), GATEWAY_CLIENTS.
#include <benchmark/benchmark.h>

#include <fmt/format.h>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/websocket.hpp>

#include <algorithm>
#include <chrono>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>
#include <thread>
#include <vector>

#include "harness/child_process.hpp"
#include "liveprob/system/wall_clock.hpp"

namespace {

namespace asio = boost::asio;
namespace harness = liveprob::harness;
namespace beast = boost::beast;
namespace websocket = beast::websocket;
using asio::ip::tcp;
using namespace std::chrono_literals;

std::string read_file(const std::filesystem::path& p) {
    std::ifstream in(p);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

std::string liveprob_bin() {
    const char* env = std::getenv("LIVEPROB_BIN");
    return env ? env
               : (std::filesystem::canonical("/proc/self/exe").parent_path().parent_path() /
                  "liveprob")
                     .string();
}

// A liveprob subcommand as its own process, so its CPU and memory are its own; its output goes
// to <dir>/<name>.log.
std::unique_ptr<harness::ChildProcess> run_liveprob(const std::filesystem::path& dir,
                                                    const std::string& name,
                                                    std::vector<std::string> args) {
    args.insert(args.begin(), liveprob_bin());
    return std::make_unique<harness::ChildProcess>(args, dir / (name + ".log"));
}

void wait_for_file(const std::filesystem::path& p) {
    for (int i = 0; i < 500 && !(std::filesystem::exists(p) && std::filesystem::file_size(p) > 0);
         ++i) {
        std::this_thread::sleep_for(20ms);
    }
    if (!std::filesystem::exists(p)) throw std::runtime_error("no " + p.string());
}

std::string endpoint_of(const std::filesystem::path& endpoints_file, const std::string& key) {
    std::istringstream in(read_file(endpoints_file));
    for (std::string line; std::getline(in, line);) {
        if (line.rfind(key + "=", 0) == 0) return line.substr(key.size() + 1);
    }
    throw std::runtime_error("no " + key + " in " + endpoints_file.string());
}

// The first round of the invented league: the first ten match streams in name order.
std::vector<std::filesystem::path> first_round(const std::filesystem::path& dir) {
    const auto simulate = run_liveprob(
        dir, "simulate", {"simulate", "--out", (dir / "streams").string(), "--seed", "2031"});
    if (simulate->wait(5min) != 0) throw std::runtime_error("liveprob simulate failed");
    std::vector<std::filesystem::path> files;
    for (const auto& e : std::filesystem::directory_iterator(dir / "streams" / "league"))
        files.push_back(e.path());
    std::sort(files.begin(), files.end());
    files.resize(std::min<std::size_t>(files.size(), 10));
    return files;
}

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
        const auto received = liveprob::system::wall_clock_us();
        const std::string_view text(static_cast<const char*>(c.buffer.data().data()),
                                    c.buffer.size());
        const auto at = text.find("\"gateway_receive\":");
        if (at != std::string_view::npos)
            latencies.push_back(received - std::atoll(text.data() + at + 18));
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

// One replayed round through serve and the gateway, N clients watching every match.
void run_load(benchmark::State& state, bool with_stalled_client) {
    const int clients =
        std::getenv("GATEWAY_CLIENTS") ? std::atoi(std::getenv("GATEWAY_CLIENTS")) : 1000;
    constexpr int kClientThreads = 2;
    const auto dir =
        std::filesystem::temp_directory_path() / fmt::format("liveprob-gateway-load-{}", getpid());
    std::filesystem::remove_all(dir);
    std::filesystem::create_directories(dir);
    const std::vector<std::filesystem::path> round = first_round(dir);

    const auto endpoints = dir / "endpoints";
    const auto serve =
        run_liveprob(dir, "serve",
                     {"serve", "--ingest", "tcp://127.0.0.1:*", "--publish", "tcp://127.0.0.1:*",
                      "--snapshot", "tcp://127.0.0.1:*", "--endpoints-file", endpoints.string(),
                      "--tick-ms", "200", "--log-level", "warn"});
    wait_for_file(endpoints);
    const auto port_file = dir / "port";
    const auto gateway = run_liveprob(
        dir, "gateway",
        {"gateway", "--serve-endpoints", endpoints.string(), "--port", "0", "--port-file",
         port_file.string(), "--queue-cap", "64", "--client-send-buffer", "16384"});
    wait_for_file(port_file);
    const auto port = static_cast<std::uint16_t>(std::stoi(read_file(port_file)));

    std::vector<std::unique_ptr<asio::io_context>> ios;
    std::vector<std::vector<std::int64_t>> latencies(kClientThreads);
    for (int t = 0; t < kClientThreads; ++t) {
        ios.push_back(std::make_unique<asio::io_context>(1));
        latencies[static_cast<std::size_t>(t)].reserve(1'000'000);
    }
    std::vector<std::unique_ptr<Client>> pool;
    for (int i = 0; i < clients; ++i) {
        const auto t = static_cast<std::size_t>(i % kClientThreads);
        auto c = std::make_unique<Client>(*ios[t]);
        beast::get_lowest_layer(c->ws).connect(
            tcp::endpoint(asio::ip::make_address("127.0.0.1"), port));
        c->ws.handshake(fmt::format("127.0.0.1:{}", port), "/feed");
        c->ws.write(asio::buffer(std::string(R"({"watch":"all"})")));
        read_loop(*c, latencies[t]);
        pool.push_back(std::move(c));
    }
    std::unique_ptr<Client> stalled;
    if (with_stalled_client) {  // small receive buffer, never reads
        stalled = std::make_unique<Client>(*ios[0]);
        auto& s = beast::get_lowest_layer(stalled->ws).socket();
        s.open(tcp::v4());
        s.set_option(asio::socket_base::receive_buffer_size(4096));
        s.connect(tcp::endpoint(asio::ip::make_address("127.0.0.1"), port));
        stalled->ws.handshake(fmt::format("127.0.0.1:{}", port), "/feed");
        stalled->ws.write(asio::buffer(std::string(R"({"watch":"all"})")));
    }
    std::vector<std::thread> client_threads;
    for (auto& io : ios) client_threads.emplace_back([&io] { io->run(); });
    std::this_thread::sleep_for(500ms);  // subscriptions settle

    const double cpu_before = harness::cpu_seconds(gateway->pid());
    const double serve_cpu_before = harness::cpu_seconds(serve->pid());
    const std::string ingest = endpoint_of(endpoints, "ingest");
    double seconds = 0;
    for (auto _ : state) {
        const auto start = std::chrono::steady_clock::now();
        std::vector<std::unique_ptr<harness::ChildProcess>> senders;
        for (const auto& file : round) {
            senders.push_back(
                run_liveprob(dir, "send-" + file.stem().string(),
                             {"send", "--to", ingest, "--speed", "300", "--stamp", file.string()}));
        }
        for (auto& s : senders) s->wait(10min);
        std::this_thread::sleep_for(1s);  // the last frames arrive
        seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        state.SetIterationTime(seconds);
    }
    const double cpu = harness::cpu_seconds(gateway->pid()) - cpu_before;
    state.counters["clients"] = clients;
    state.counters["seconds"] = seconds;
    state.counters["serve_cpu_pct"] =
        100.0 * (harness::cpu_seconds(serve->pid()) - serve_cpu_before) / seconds;
    state.counters["gw_cpu_pct"] = 100.0 * cpu / seconds;
    state.counters["gw_rss_MiB"] =
        static_cast<double>(harness::memory_kib(gateway->pid(), "VmRSS:")) / 1024.0;
    state.counters["gw_peak_MiB"] =
        static_cast<double>(harness::memory_kib(gateway->pid(), "VmHWM:")) / 1024.0;
    for (auto& io : ios) io->stop();
    for (auto& t : client_threads) t.join();
    std::vector<std::int64_t> all;
    for (auto& l : latencies) all.insert(all.end(), l.begin(), l.end());
    state.counters["frames_out"] = static_cast<double>(all.size());
    state.counters["p50_us"] = percentile(all, 0.50);
    state.counters["p90_us"] = percentile(all, 0.90);
    state.counters["p99_us"] = percentile(all, 0.99);
    state.counters["p999_us"] = percentile(all, 0.999);
    state.counters["max_us"] = percentile(all, 1.0);
    std::filesystem::remove_all(dir);
}

void BM_GatewayRound(benchmark::State& state) { run_load(state, false); }
void BM_GatewayRoundWithStalledClient(benchmark::State& state) { run_load(state, true); }

}  // namespace

BENCHMARK(BM_GatewayRound)->Iterations(1)->UseManualTime()->Unit(benchmark::kSecond);
BENCHMARK(BM_GatewayRoundWithStalledClient)
    ->Iterations(1)
    ->UseManualTime()
    ->Unit(benchmark::kSecond);
BENCHMARK_MAIN();
