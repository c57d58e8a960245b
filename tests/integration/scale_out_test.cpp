// Scale-out on loopback with real processes: three `serve --shard K/3` behind one `relay`,
// 300 concurrent matches fed through `send`'s routing, one subscriber on the relay. Every
// match's outputs arrive exactly once per update and equal the engine's; snapshot requests to
// the relay reach the owning shard; after `kill -9` of one shard the others go on publishing,
// and the restarted shard rebuilds its matches from its own journal.
//
// Order of events, and why:
//  1. first halves of all 300 matches (routed by `send` to the three shards);
//  2. kill -9 shard 1 (idle by then: everything it received is published, so journalled);
//  3. second halves of shards 0 and 2's matches while shard 1 is down (as JSON lines);
//  4. restart shard 1, wait until its updates reach the relay again;
//  5. second halves of shard 1's matches.
// Shard 1's second halves wait for step 4 because a PUB socket drops what it publishes before
// the relay's subscription has reached it again: sending them during the outage would make the
// test depend on a reconnection race, not on anything the system promises.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <algorithm>
#include <set>

#include "live_service_harness.hpp"
#include "liveprob/clients/shard_sender.hpp"
#include "liveprob/clients/snapshot_client.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/sharding.hpp"
#include "liveprob/system/wall_clock.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::test;

namespace {

constexpr std::uint32_t kShards = 3;
constexpr std::uint64_t kMatches = 300;
constexpr std::uint64_t kFirstMatch = 7001;
constexpr std::uint64_t kVariants = 10;
constexpr std::uint32_t kKilled = 1;

std::uint64_t variant_of(std::uint64_t match_id) { return match_id % kVariants; }

// Ten kinds of match: the invented match with a prior and a goal that differ by kind, so the
// shards carry different streams and a message routed to the wrong match would show.
std::vector<InboundMessage> varied_match(std::uint64_t match_id) {
    std::vector<InboundMessage> feed = invented_match(match_id);
    const std::uint64_t v = variant_of(match_id);
    const double shift = static_cast<double>(v);
    std::get<MatchSetup>(feed.front().body).prior =
        PriorMeans{1.05 + 0.09 * shift, 1.45 - 0.07 * shift};
    for (auto& m : feed) {
        if (auto* goal = std::get_if<Goal>(&m.body); goal && v % 3 == 1) goal->side = Side::away;
        if (auto* red = std::get_if<RedCard>(&m.body); red && v % 2 == 1) red->side = Side::home;
    }
    return feed;
}

// Where the second half starts (the message after the first half's end).
std::size_t second_half_start(const std::vector<InboundMessage>& feed) {
    for (std::size_t i = 0; i < feed.size(); ++i) {
        if (const auto* s = std::get_if<PeriodStart>(&feed[i].body);
            s && s->period == Period::second_half)
            return i;
    }
    throw std::runtime_error("no second half");
}

std::uint32_t shard_of(std::uint64_t match_id) { return protocol::shard_of(match_id, kShards); }

// The chosen matches' messages in [from(feed), to(feed)), interleaved message by message across
// matches as a live feed of concurrent matches would be.
template <class From, class To>
std::vector<InboundMessage> interleaved(const std::vector<std::uint64_t>& ids, From from, To to) {
    std::vector<std::vector<InboundMessage>> parts;
    std::size_t longest = 0;
    for (const std::uint64_t id : ids) {
        const auto feed = varied_match(id);
        parts.emplace_back(feed.begin() + static_cast<std::ptrdiff_t>(from(feed)),
                           feed.begin() + static_cast<std::ptrdiff_t>(to(feed)));
        longest = std::max(longest, parts.back().size());
    }
    std::vector<InboundMessage> out;
    for (std::size_t i = 0; i < longest; ++i) {
        for (const auto& p : parts) {
            if (i < p.size()) out.push_back(p[i]);
        }
    }
    return out;
}

struct Seen {
    protocol::DecodedUpdate update;
    std::int64_t arrival_us = 0;
};

// The one subscriber, on the relay: every match update it reads, per match, in arrival order.
class RelaySubscriber {
public:
    RelaySubscriber(zmq::context_t& context, const std::string& endpoint)
        : socket_(context, zmq::socket_type::sub) {
        socket_.set(zmq::sockopt::linger, 0);
        socket_.set(zmq::sockopt::rcvhwm, 0);  // keep everything: the test counts every update
        socket_.set(zmq::sockopt::subscribe, std::string(transport::kMatchTopicPrefix));
        socket_.connect(endpoint);
    }

    // Reads until `done()` holds or `limit` passes; returns whether it holds.
    template <class Done>
    bool read_until(Done done, std::chrono::milliseconds limit) {
        const auto deadline = std::chrono::steady_clock::now() + limit;
        while (!done()) {
            if (std::chrono::steady_clock::now() > deadline) return false;
            zmq::pollitem_t item{socket_.handle(), 0, ZMQ_POLLIN, 0};
            if (zmq::poll(&item, 1, 50ms) <= 0) continue;
            zmq::message_t topic, body;
            while (socket_.recv(topic, zmq::recv_flags::dontwait)) {
                REQUIRE(topic.more());
                REQUIRE(socket_.recv(body));
                auto decoded = protocol::decode_update({body.data<std::uint8_t>(), body.size()});
                REQUIRE(decoded.ok());
                const std::uint64_t id = decoded.value->meta.match_id;
                seen_[id].push_back({std::move(*decoded.value), liveprob::system::wall_clock_us()});
                ++total_;
            }
        }
        return true;
    }

    const std::vector<Seen>& of(std::uint64_t match_id) { return seen_[match_id]; }
    std::size_t total() const { return total_; }

private:
    zmq::socket_t socket_;
    std::map<std::uint64_t, std::vector<Seen>> seen_;
    std::size_t total_ = 0;
};

std::string bin() { return liveprob_binary().string(); }

std::vector<std::string> shard_args(const std::filesystem::path& dir, std::uint32_t k) {
    return {"--shard",       fmt::format("{}/{}", k, kShards),
            "--journal",     (dir / fmt::format("shard-{}.lpf", k)).string(),
            "--tick-ms",     "3600000",
            "--counters-ms", "200"};
}

enum class FeedFormat { frames, json_lines };

// Pushes a feed file through `liveprob send` to every shard's ingest; returns what send printed.
std::string send_routed(const std::filesystem::path& dir, const std::string& name,
                        const std::vector<InboundMessage>& messages, const std::string& ingest_list,
                        FeedFormat format, std::vector<std::string> extra = {}) {
    const auto file = dir / (name + (format == FeedFormat::frames ? ".lpf" : ".jsonl"));
    if (format == FeedFormat::frames) {
        write_frames(file, messages);
    } else {
        std::ofstream out(file);
        for (const auto& m : messages) out << protocol::to_json_line(m) << "\n";
    }
    std::vector<std::string> args = {bin(), "send", "--to", ingest_list, file.string()};
    args.insert(args.end(), extra.begin(), extra.end());
    ChildProcess send(args, dir / (name + ".out"), dir / (name + ".err"));
    const auto code = send.wait(120s);
    INFO(read_whole_file(dir / (name + ".err")));
    REQUIRE(code == std::optional<int>(0));
    return send.output();
}

// A match used only to learn that a shard's updates reach the subscriber through the relay: it
// is given clock syncs until one arrives. (A PUB socket drops what it publishes before a
// subscription has reached it, so nothing is sent to a shard until this holds.)
class RouteProbe {
public:
    RouteProbe(zmq::context_t& context, const std::vector<std::string>& ingest)
        : sender_(context, ingest) {
        for (std::uint32_t k = 0; k < kShards; ++k) {
            std::uint64_t id = 900'000;
            while (shard_of(id) != k) ++id;
            ids_.push_back(id);
        }
    }
    bool is_probe(std::uint64_t id) const {
        return std::find(ids_.begin(), ids_.end(), id) != ids_.end();
    }

    void await_route(std::uint32_t shard, RelaySubscriber& sub) {
        const std::uint64_t id = ids_[shard];
        const std::size_t before = sub.of(id).size();
        if (next_seq_[shard] == 1) {
            MatchSetup setup;
            setup.home_name = "Probe Home";
            setup.away_name = "Probe Away";
            setup.prior = PriorMeans{1.3, 1.2};
            send(id, shard, setup);
        }
        const auto deadline = std::chrono::steady_clock::now() + 30s;
        while (!sub.read_until([&] { return sub.of(id).size() > before; }, 100ms)) {
            REQUIRE(std::chrono::steady_clock::now() < deadline);
            send(id, shard, ClockSync{false});
        }
    }

private:
    void send(std::uint64_t id, std::uint32_t shard, MessageBody body) {
        const auto message =
            feed_message(id, next_seq_[shard]++, Period::pre_match, 0, std::move(body));
        sender_.send(id, protocol::encode_feed_message(message));
    }
    clients::ShardSender sender_;
    std::vector<std::uint64_t> ids_;
    std::array<std::uint64_t, kShards> next_seq_{1, 1, 1};
};

protocol::SnapshotReplyContents ask(zmq::context_t& context, const std::string& endpoint,
                                    std::uint64_t match_id) {
    return clients::request_snapshot(context, endpoint, match_id, 10s);
}

// The "key=value" lines of an endpoints file, once the program has written it.
std::map<std::string, std::string> read_endpoints(const std::filesystem::path& path) {
    const auto deadline = std::chrono::steady_clock::now() + 20s;
    while (!std::filesystem::exists(path)) {
        if (std::chrono::steady_clock::now() > deadline)
            throw std::runtime_error("no " + path.string());
        std::this_thread::sleep_for(20ms);
    }
    std::map<std::string, std::string> out;
    std::istringstream lines(read_whole_file(path));
    for (std::string line; std::getline(lines, line);) {
        if (const auto eq = line.find('='); eq != std::string::npos)
            out[line.substr(0, eq)] = line.substr(eq + 1);
    }
    return out;
}

}  // namespace

TEST_CASE(
    "three shards behind a relay: every update once, snapshots routed, a killed shard recovers "
    "while the "
    "others carry on",
    "[integration][sockets][scale-out]") {
    const auto dir = scratch_dir("scale-out");
    zmq::context_t context(1);

    std::vector<std::uint64_t> ids;
    std::array<std::vector<std::uint64_t>, kShards> owned;
    for (std::uint64_t id = kFirstMatch; id < kFirstMatch + kMatches; ++id) {
        ids.push_back(id);
        owned[shard_of(id)].push_back(id);
    }
    for (const auto& o : owned) REQUIRE(o.size() > 60);  // every shard has a real share

    // What the engine gives for each kind of match, message by message.
    std::vector<std::vector<ReferenceOutput>> reference;
    for (std::uint64_t v = 0; v < kVariants; ++v)
        reference.push_back(
            engine_outputs(varied_match(kFirstMatch - kFirstMatch % kVariants + v)));
    const auto reference_of = [&](std::uint64_t id) -> const std::vector<ReferenceOutput>& {
        return reference[variant_of(id)];
    };
    // Every kind of match has the same shape: its second half starts at the same message, and
    // message i has sequence number i + 1.
    const std::size_t cut = second_half_start(varied_match(kFirstMatch));
    for (std::uint64_t v = 0; v < kVariants; ++v)
        REQUIRE(second_half_start(varied_match(kFirstMatch + v)) == cut);
    const auto in_second_half = [&](const protocol::DecodedUpdate& u) {
        return u.meta.input_seq > cut;
    };
    // Updates of the first half: the setup's and one per message accepted before the second half.
    const auto first_half_updates = [&](std::uint64_t id) {
        const auto& ref = reference_of(id);
        return static_cast<std::size_t>(std::count_if(
            ref.begin(), ref.end(), [&](const ReferenceOutput& r) { return r.input_seq <= cut; }));
    };

    // The shards and the relay.
    std::vector<std::unique_ptr<ServeProcess>> shards;
    for (std::uint32_t k = 0; k < kShards; ++k) {
        shards.push_back(
            std::make_unique<ServeProcess>(dir, fmt::format("shard-{}", k), shard_args(dir, k)));
    }
    std::vector<std::string> ingest, publish, snapshot;
    for (const auto& s : shards) {
        ingest.push_back(s->ingest());
        publish.push_back(s->publish());
        snapshot.push_back(s->snapshot());
    }
    const std::string ingest_list = fmt::format("{}", fmt::join(ingest, ","));
    ChildProcess relay(
        {bin(), "relay", "--shard-publish", fmt::format("{}", fmt::join(publish, ",")),
         "--shard-snapshot", fmt::format("{}", fmt::join(snapshot, ",")), "--publish",
         "tcp://127.0.0.1:*", "--snapshot", "tcp://127.0.0.1:*", "--endpoints-file",
         (dir / "relay.endpoints").string(), "--shard-timeout-ms", "500"},
        dir / "relay.out", dir / "relay.err");
    const auto relay_endpoints = read_endpoints(dir / "relay.endpoints");
    const std::string relay_publish = relay_endpoints.at("publish");
    const std::string relay_snapshot = relay_endpoints.at("snapshot");

    RelaySubscriber sub(context, relay_publish);
    RouteProbe probe(context, ingest);
    for (std::uint32_t k = 0; k < kShards; ++k) probe.await_route(k, sub);

    // 1. First halves of all 300 matches, through send's routing.
    const auto first_halves = interleaved(
        ids, [](const auto&) { return std::size_t{0}; },
        [](const auto& feed) { return second_half_start(feed); });
    const std::string sent =
        send_routed(dir, "first-halves", first_halves, ingest_list, FeedFormat::frames);
    std::array<std::size_t, kShards> per_shard{};
    for (const auto& m : first_halves) ++per_shard[shard_of(m.header.match_id)];
    CHECK(sent.find(fmt::format("sent {} messages to 3 shards ({}, {}, {} each",
                                first_halves.size(), per_shard[0], per_shard[1], per_shard[2])) !=
          std::string::npos);
    const auto have_first_halves = [&] {
        return std::all_of(ids.begin(), ids.end(), [&](std::uint64_t id) {
            return sub.of(id).size() >= first_half_updates(id);
        });
    };
    REQUIRE(sub.read_until(have_first_halves, 180s));

    // Each shard holds exactly its own matches (asked directly, not through the relay).
    for (std::uint32_t k = 0; k < kShards; ++k) {
        const auto mine = ask(context, snapshot[k], 0);
        std::set<std::uint64_t> held;
        for (const auto& u : mine.updates) {
            if (!probe.is_probe(u.meta.match_id)) held.insert(u.meta.match_id);
        }
        CHECK(held == std::set<std::uint64_t>(owned[k].begin(), owned[k].end()));
    }
    // Through the relay: every match (merged from the three), and single matches from their owners.
    const auto all = ask(context, relay_snapshot, 0);
    CHECK(all.error.empty());
    CHECK(all.updates.size() == kMatches + kShards);
    for (const auto& u : all.updates) {
        const auto& last = sub.of(u.meta.match_id).back().update;
        CHECK(u.meta.output_seq == last.meta.output_seq);
        CHECK(same_outputs(u.outputs, last.outputs));
    }
    for (std::uint32_t k = 0; k < kShards; ++k) {
        for (const std::uint64_t id : {owned[k].front(), owned[k].back()}) {
            const auto one = ask(context, relay_snapshot, id);
            REQUIRE(one.updates.size() == 1);
            CHECK(one.updates[0].meta.match_id == id);
            CHECK(same_outputs(one.updates[0].outputs, sub.of(id).back().update.outputs));
        }
    }

    // A message for another shard's match, pushed straight to the wrong shard: counted, dropped.
    {
        const std::uint64_t stray = owned[0].front();
        TestSubscriber counters(context, shards[2]->publish(), "no.match.");
        REQUIRE(counters.next_counters(20s).has_value());
        zmq::socket_t push(context, zmq::socket_type::dealer);
        push.set(zmq::sockopt::linger, 2000);
        push.connect(shards[2]->ingest());
        push.send(zmq::buffer(protocol::encode_feed_message(varied_match(stray).front())));
        std::optional<protocol::CounterSet> seen;
        const auto deadline = std::chrono::steady_clock::now() + 20s;
        do {
            seen = counters.next_counters(5s);
            REQUIRE(seen.has_value());
        } while (counter(*seen, "ingest.not_our_shard") == 0 &&
                 std::chrono::steady_clock::now() < deadline);
        CHECK(counter(*seen, "ingest.not_our_shard") == 1);
        CHECK(ask(context, shards[2]->snapshot(), stray).error ==
              fmt::format("unknown match {}", stray));
    }
    // A request the relay cannot read gets an error reply, not silence.
    {
        zmq::socket_t dealer(context, zmq::socket_type::dealer);
        dealer.set(zmq::sockopt::linger, 0);
        dealer.set(zmq::sockopt::rcvtimeo, 10000);
        dealer.connect(relay_snapshot);
        dealer.send(zmq::str_buffer("not a snapshot request"));
        zmq::message_t reply;
        REQUIRE(dealer.recv(reply));
        const auto decoded =
            protocol::decode_snapshot_reply({reply.data<std::uint8_t>(), reply.size()});
        REQUIRE(decoded.ok());
        CHECK(decoded.value->error.rfind("bad request", 0) == 0);
    }

    // 2. kill -9 one shard.
    std::map<std::uint64_t, protocol::DecodedUpdate> before_kill;
    for (const std::uint64_t id : owned[kKilled]) before_kill[id] = sub.of(id).back().update;
    const auto killed_endpoints = shards[kKilled]->endpoints();
    shards[kKilled]->process().signal(SIGKILL);
    REQUIRE(shards[kKilled]->process().wait(10s) == std::optional<int>(-SIGKILL));
    const std::int64_t killed_at = liveprob::system::wall_clock_us();

    // Snapshots still reach the live owners; the dead one is named.
    const auto dead = ask(context, relay_snapshot, owned[kKilled].front());
    CHECK(dead.updates.empty());
    CHECK(dead.error.find(fmt::format("shard {} did not answer", kKilled)) != std::string::npos);
    const auto alive = ask(context, relay_snapshot, owned[0].front());
    CHECK(alive.updates.size() == 1);

    // 3. Second halves of the other shards' matches, paced, while shard 1 is down.
    std::vector<std::uint64_t> survivors;
    for (std::uint32_t k = 0; k < kShards; ++k) {
        if (k != kKilled) survivors.insert(survivors.end(), owned[k].begin(), owned[k].end());
    }
    const auto to_end = [](const auto& feed) { return feed.size(); };
    const auto from_second_half = [](const auto& feed) { return second_half_start(feed); };
    // (As JSON lines: send is also the JSON feed adapter, and routes the same way.)
    send_routed(dir, "survivors-second-halves", interleaved(survivors, from_second_half, to_end),
                ingest_list, FeedFormat::json_lines, {"--rate", "2000"});
    const auto complete = [&](const std::vector<std::uint64_t>& which) {
        return [&, which] {
            return std::all_of(which.begin(), which.end(), [&](std::uint64_t id) {
                const auto& s = sub.of(id);
                return !s.empty() &&
                       s.back().update.meta.input_seq == reference_of(id).back().input_seq;
            });
        };
    };
    REQUIRE(sub.read_until(complete(survivors), 180s));
    const std::int64_t restarted_at = liveprob::system::wall_clock_us();

    // The other shards never paused: all their second-half updates were published while shard
    // 1 was down. The largest gap between two of them is printed for the record.
    std::vector<std::int64_t> published;
    for (const std::uint64_t id : survivors) {
        for (const Seen& s : sub.of(id)) {
            if (in_second_half(s.update)) published.push_back(s.update.meta.publish_time_us);
        }
    }
    std::sort(published.begin(), published.end());
    REQUIRE(!published.empty());
    CHECK(published.front() > killed_at);
    CHECK(published.back() < restarted_at);
    std::int64_t widest = 0;
    for (std::size_t i = 1; i < published.size(); ++i)
        widest = std::max(widest, published[i] - published[i - 1]);
    WARN(fmt::format("survivors during the outage: {} updates over {:.2f} s, widest gap {:.1f} ms",
                     published.size(),
                     static_cast<double>(published.back() - published.front()) / 1e6,
                     static_cast<double>(widest) / 1e3));

    // 4. Restart shard 1 on its old endpoints with its journal.
    shards[kKilled] = std::make_unique<ServeProcess>(dir, "shard-1-restarted",
                                                     shard_args(dir, kKilled), killed_endpoints);
    probe.await_route(kKilled, sub);
    for (const std::uint64_t id : owned[kKilled]) {
        const auto restored = ask(context, relay_snapshot, id);
        REQUIRE(restored.updates.size() == 1);
        INFO("match " << id);
        CHECK(restored.updates[0].meta.input_seq == before_kill[id].meta.input_seq);
        CHECK(same_outputs(restored.updates[0].outputs, before_kill[id].outputs));
        CHECK(restored.updates[0].meta.output_seq >
              before_kill[id].meta.output_seq);  // never goes back
    }

    // 5. Second halves of shard 1's matches.
    send_routed(dir, "restarted-second-halves",
                interleaved(owned[kKilled], from_second_half, to_end), ingest_list,
                FeedFormat::frames);
    REQUIRE(sub.read_until(complete(ids), 180s));

    // Every match: each update exactly once, in order, equal to the engine's; output_seq rises by
    // one, except once for shard 1's matches (the restart).
    for (const std::uint64_t id : ids) {
        INFO("match " << id << " on shard " << shard_of(id));
        const auto& ref = reference_of(id);
        const auto& seen = sub.of(id);
        std::size_t r = 0;
        int jumps = 0;
        for (std::size_t i = 0; i < seen.size(); ++i) {
            const auto& u = seen[i].update;
            if (i > 0) {
                const std::uint64_t prev = seen[i - 1].update.meta.output_seq;
                REQUIRE(u.meta.output_seq > prev);
                if (u.meta.output_seq != prev + 1) ++jumps;
                // The restarted shard republishes each rebuilt state once; it may reach the
                // relay or not (see the top of the file), and repeats the last input.
                if (u.meta.output_seq != prev + 1 && r > 0 &&
                    u.meta.input_seq == ref[r - 1].input_seq) {
                    CHECK(same_outputs(u.outputs, ref[r - 1].outputs));
                    continue;
                }
            }
            REQUIRE(r < ref.size());
            CHECK(u.meta.input_seq == ref[r].input_seq);
            CHECK(same_outputs(u.outputs, ref[r].outputs));
            ++r;
        }
        CHECK(r == ref.size());
        CHECK(seen.front().update.meta.output_seq == 1);
        CHECK(jumps == (shard_of(id) == kKilled ? 1 : 0));
    }
    CHECK(relay.wait(0ms) == std::nullopt);  // the relay ran throughout
}
