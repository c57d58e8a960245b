#include "soak_run.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

#include <atomic>
#include <csignal>
#include <memory>
#include <thread>
#include <zmq.hpp>

#include "liveprob/clients/shard_sender.hpp"
#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/transport/topics.hpp"
#include "soak_process.hpp"

namespace liveprob::soak {

namespace {

using SteadyClock = std::chrono::steady_clock;
using namespace std::chrono_literals;

std::atomic<bool> g_stop{false};
extern "C" void on_stop_signal(int) { g_stop.store(true); }

// Queues deep enough that neither serve, the relay nor this subscriber ever drops: the soak
// measures how far behind things fall, and a drop would hide it.
constexpr const char* kDeepQueue = "1000000";

double seconds_since(SteadyClock::time_point start) {
    return std::chrono::duration<double>(SteadyClock::now() - start).count();
}

// The serve shards (or forwarders) and the relay, with the endpoints they bound.
struct Topology {
    std::vector<std::unique_ptr<SoakProcess>> processes;  // backends first, then the relay
    std::vector<std::string> ingest;
    std::vector<std::string> backend_publish;
    std::string front_publish;  // where the subscriber connects
};

Topology start_topology(const PhaseSettings& s) {
    Topology t;
    const std::string prefix = s.backend == Backend::serve ? "shard" : "forwarder";
    for (std::uint32_t k = 0; k < s.shards; ++k) {
        const auto endpoints_file = s.scratch / fmt::format("{}-{}.endpoints", prefix, k);
        std::vector<std::string> argv;
        if (s.backend == Backend::serve) {
            argv = {s.liveprob.string(), "serve",
                    "--shard",           fmt::format("{}/{}", k, s.shards),
                    "--ingest",          "tcp://127.0.0.1:*",
                    "--publish",         "tcp://127.0.0.1:*",
                    "--snapshot",        "tcp://127.0.0.1:*",
                    "--endpoints-file",  endpoints_file.string(),
                    "--tick-ms",         std::to_string(s.tick_ms),
                    "--publish-hwm",     kDeepQueue,
                    "--ingest-hwm",      kDeepQueue,
                    "--log-level",       "warn"};
            if (s.journal) {
                const auto journal = s.scratch / fmt::format("shard-{}.journal", k);
                std::filesystem::remove(journal);
                argv.insert(argv.end(),
                            {"--journal", journal.string(), "--journal-sync", "interval"});
            }
        } else {
            argv = {s.self.string(), "forward", "--endpoints-file", endpoints_file.string()};
        }
        auto& p = t.processes.emplace_back(
            std::make_unique<SoakProcess>(fmt::format("{} {}", prefix, k), argv,
                                          s.scratch / fmt::format("{}-{}.log", prefix, k)));
        const auto endpoints = wait_for_endpoints_file(endpoints_file, *p, 30s);
        t.ingest.push_back(endpoints.at("ingest"));
        t.backend_publish.push_back(endpoints.at("publish"));
    }
    t.front_publish = t.backend_publish.front();
    if (s.shards > 1) {
        const auto endpoints_file = s.scratch / fmt::format("relay-{}.endpoints", prefix);
        auto& relay = t.processes.emplace_back(std::make_unique<SoakProcess>(
            "relay",
            std::vector<std::string>{s.liveprob.string(), "relay", "--shard-publish",
                                     fmt::format("{}", fmt::join(t.backend_publish, ",")),
                                     "--publish", "tcp://127.0.0.1:*", "--endpoints-file",
                                     endpoints_file.string(), "--high-water-mark", kDeepQueue},
            s.scratch / fmt::format("relay-{}.log", prefix)));
        t.front_publish = wait_for_endpoints_file(endpoints_file, *relay, 30s).at("publish");
    }
    return t;
}

// Reads every update from the front endpoint and, for serve, each shard's counters directly.
class Subscriber {
public:
    Subscriber(zmq::context_t& context, const PhaseSettings& s, const Topology& t,
               const SoakFeed& feed, std::uint64_t total, const std::atomic<std::int64_t>* sent_ns)
        : settings_(s), feed_(feed), total_(total), sent_ns_(sent_ns), seen_(total, 0),
          updates_(context, zmq::socket_type::sub), last_counters_(t.backend_publish.size()) {
        updates_.set(zmq::sockopt::rcvhwm, 0);
        updates_.set(zmq::sockopt::subscribe, std::string(transport::kMatchTopicPrefix));
        updates_.connect(t.front_publish);
        if (s.backend == Backend::serve) {
            for (const auto& ep : t.backend_publish) {
                auto& c = counters_.emplace_back(context, zmq::socket_type::sub);
                c.set(zmq::sockopt::subscribe, std::string(transport::kCountersTopic));
                c.connect(ep);
            }
        }
    }

    void run(SteadyClock::time_point start, const std::atomic<bool>& stop) {
        start_ = start;
        std::vector<zmq::pollitem_t> items{{updates_.handle(), 0, ZMQ_POLLIN, 0}};
        for (auto& c : counters_) items.push_back({c.handle(), 0, ZMQ_POLLIN, 0});
        while (!stop.load()) {
            if (zmq::poll(items, 100ms) <= 0) continue;
            drain_updates();
            for (std::size_t k = 0; k < counters_.size(); ++k) drain_counters(k);
        }
    }

    std::uint64_t arrivals() const { return arrival_count_.load(); }

    void fill(PhaseResult& r) {
        r.arrivals = std::move(arrivals_);
        r.tick_times = std::move(ticks_);
        r.duplicates = duplicates_;
        r.foreign = foreign_;
        for (const auto& set : last_counters_) {
            for (const auto& [name, value] : set.values) {
                if (name == "engine.accepted") r.accepted += value;
                if (name == "engine.rejected") r.rejected += value;
                if (name == "engine.late") r.late += value;
                if (name == "engine.duplicate") r.duplicate_inputs += value;
            }
        }
    }

private:
    void drain_updates() {
        zmq::message_t topic, body;
        while (updates_.recv(topic, zmq::recv_flags::dontwait)) {
            if (!topic.more() || !updates_.recv(body)) continue;
            const auto arrived = SteadyClock::now();
            const std::span<const std::uint8_t> bytes(body.data<std::uint8_t>(), body.size());
            std::uint64_t index = SoakFeed::kNotOurs;
            if (settings_.backend == Backend::serve) {
                const auto u = protocol::decode_update(bytes);
                if (!u.ok()) {
                    ++foreign_;
                    continue;
                }
                if (u.value->meta.receive_time_us == 0) {
                    ticks_.push_back(std::chrono::duration<double>(arrived - start_).count());
                    continue;
                }
                index = feed_.index_of(u.value->meta.match_id, u.value->meta.input_seq);
            } else {
                const auto m = protocol::decode_feed_message(bytes);
                if (m.message)
                    index =
                        feed_.index_of(m.message->header.match_id, m.message->header.source_seq);
            }
            if (index >= total_) {
                ++foreign_;
                continue;
            }
            if (seen_[index] != 0) {
                ++duplicates_;
                continue;
            }
            seen_[index] = 1;
            const auto arrived_ns =
                std::chrono::duration_cast<std::chrono::nanoseconds>(arrived.time_since_epoch())
                    .count();
            const std::int64_t sent_ns = sent_ns_[index].load(std::memory_order_relaxed);
            arrivals_.push_back({std::chrono::duration<double>(arrived - start_).count(),
                                 static_cast<double>(arrived_ns - sent_ns) / 1e3});
            arrival_count_.fetch_add(1);
        }
    }

    void drain_counters(std::size_t k) {
        zmq::message_t topic, body;
        while (counters_[k].recv(topic, zmq::recv_flags::dontwait)) {
            if (!topic.more() || !counters_[k].recv(body)) continue;
            auto decoded = protocol::decode_counters({body.data<std::uint8_t>(), body.size()});
            if (decoded.ok()) last_counters_[k] = std::move(*decoded.value);
        }
    }

    const PhaseSettings& settings_;
    const SoakFeed& feed_;
    std::uint64_t total_;
    const std::atomic<std::int64_t>* sent_ns_;
    std::vector<std::uint8_t> seen_;
    zmq::socket_t updates_;
    std::vector<zmq::socket_t> counters_;
    std::vector<protocol::CounterSet> last_counters_;
    SteadyClock::time_point start_;
    std::vector<Arrival> arrivals_;
    std::vector<double> ticks_;
    std::uint64_t duplicates_ = 0, foreign_ = 0;
    std::atomic<std::uint64_t> arrival_count_{0};
};

// CPU and memory of every process since the previous sample.
class Sampler {
public:
    explicit Sampler(Topology& t) : topology_(t), last_cpu_(t.processes.size(), 0.0) {}
    Sample take(double at_seconds) {
        Sample s;
        s.at_seconds = at_seconds;
        const double wall = at_seconds - last_at_;
        for (std::size_t i = 0; i < topology_.processes.size(); ++i) {
            SoakProcess& p = *topology_.processes[i];
            const double cpu = p.cpu_seconds();
            s.processes.push_back(
                {p.name(), p.rss_kib(), wall > 0 ? (cpu - last_cpu_[i]) / wall : 0.0});
            last_cpu_[i] = cpu;
        }
        last_at_ = at_seconds;
        return s;
    }

private:
    Topology& topology_;
    std::vector<double> last_cpu_;
    double last_at_ = 0.0;
};

}  // namespace

PhaseResult run_phase(const PhaseSettings& settings, const SoakFeed& feed) {
    std::signal(SIGINT, on_stop_signal);
    PhaseResult result;
    result.settings = settings;
    const auto total = static_cast<std::uint64_t>(settings.rate * settings.seconds);
    auto sent_ns = std::make_unique<std::atomic<std::int64_t>[]>(total);

    Topology topology = start_topology(settings);
    zmq::context_t context(2);
    Subscriber subscriber(context, settings, topology, feed, total, sent_ns.get());
    // Subscriptions travel to the publishers (and through the relay) asynchronously; give them
    // time, so the first messages are not published to nobody.
    std::this_thread::sleep_for(2s);

    const auto start = SteadyClock::now();
    std::atomic<bool> stop_reading{false};
    std::atomic<std::uint64_t> sent{0};
    std::thread reader([&] { subscriber.run(start, stop_reading); });
    std::thread sender([&] {
        clients::ShardSenderOptions options;
        options.linger_ms = 10'000;
        options.send_high_water_mark = 10'000'000;
        clients::ShardSender out(context, topology.ingest, options);
        for (std::uint64_t i = 0; i < total && !g_stop.load(); ++i) {
            const auto due = start + std::chrono::nanoseconds(static_cast<std::int64_t>(
                                         1e9 * static_cast<double>(i) / settings.rate));
            if (SteadyClock::now() < due) std::this_thread::sleep_until(due);
            const core::InboundMessage m = feed.event(i);
            const auto bytes = protocol::encode_feed_message(m);
            sent_ns[i].store(std::chrono::duration_cast<std::chrono::nanoseconds>(
                                 SteadyClock::now().time_since_epoch())
                                 .count(),
                             std::memory_order_relaxed);
            out.send(m.header.match_id, bytes);
            sent.store(i + 1);
        }
    });

    // Sample while sending, then while the backlog drains (until every event is in, nothing has
    // arrived for five seconds, or the drain time is up).
    Sampler sampler(topology);
    double next_sample = settings.sample_seconds;
    double sending_done_at = -1.0;
    std::uint64_t last_count = 0;
    double last_progress = 0.0;
    for (;;) {
        std::this_thread::sleep_for(200ms);
        const double now = seconds_since(start);
        if (now >= next_sample) {
            result.samples.push_back(sampler.take(now));
            next_sample += settings.sample_seconds;
        }
        const std::uint64_t count = subscriber.arrivals();
        if (count != last_count) {
            last_count = count;
            last_progress = now;
        }
        if (sending_done_at < 0 && sent.load() == total) sending_done_at = now;
        if (g_stop.load()) break;
        if (sending_done_at >= 0 && (count == total || now - last_progress > 5.0 ||
                                     now - sending_done_at > settings.drain_seconds))
            break;
    }
    sender.join();
    result.sent = sent.load();
    result.send_seconds = sending_done_at >= 0 ? sending_done_at : seconds_since(start);
    const double ended = seconds_since(start);
    if (result.samples.empty() || ended - result.samples.back().at_seconds >= 1.0) {
        result.samples.push_back(sampler.take(ended));
    }

    // Stopping serve publishes its final counters; read them, then close everything.
    for (std::size_t k = 0; k < settings.shards; ++k) topology.processes[k]->stop();
    std::this_thread::sleep_for(500ms);
    stop_reading.store(true);
    reader.join();
    subscriber.fill(result);
    topology.processes.clear();
    return result;
}

int run_bare_forwarder(const std::string& endpoints_file) {
    std::signal(SIGTERM, on_stop_signal);
    std::signal(SIGINT, on_stop_signal);
    zmq::context_t context(1);
    zmq::socket_t pull(context, zmq::socket_type::pull);
    zmq::socket_t pub(context, zmq::socket_type::pub);
    pull.set(zmq::sockopt::rcvhwm, 1'000'000);
    pub.set(zmq::sockopt::sndhwm, 1'000'000);
    pull.bind("tcp://127.0.0.1:*");
    pub.bind("tcp://127.0.0.1:*");
    files::write_endpoints_file(endpoints_file,
                                {{"ingest", pull.get(zmq::sockopt::last_endpoint)},
                                 {"publish", pub.get(zmq::sockopt::last_endpoint)}});
    const std::string_view topic = transport::kMatchTopicPrefix;
    while (!g_stop.load()) {
        zmq::pollitem_t item{pull.handle(), 0, ZMQ_POLLIN, 0};
        if (zmq::poll(&item, 1, 100ms) <= 0) continue;
        zmq::message_t m;
        while (pull.recv(m, zmq::recv_flags::dontwait)) {
            pub.send(zmq::const_buffer(topic.data(), topic.size()), zmq::send_flags::sndmore);
            pub.send(m, zmq::send_flags::none);
        }
    }
    return 0;
}

}  // namespace liveprob::soak
