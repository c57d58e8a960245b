#include "liveprob/live/live_replay.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <stdexcept>
#include <thread>
#include <unordered_map>

#include <zmq.hpp>

#include "liveprob/clients/feed_pacing.hpp"
#include "liveprob/clients/shard_sender.hpp"
#include "liveprob/clients/update_subscriber.hpp"
#include "liveprob/core/match_state.hpp"
#include "liveprob/protocol/feed_codec.hpp"

namespace liveprob::live {
namespace {

using SteadyClock = std::chrono::steady_clock;
constexpr std::size_t kMaxProblemsKept = 20;

// One update as the subscriber received it: what the scores need.
struct ReceivedUpdate {
    std::uint64_t output_seq = 0;
    bool tick = false;
    core::MatchStatus status = core::MatchStatus::not_started;
    core::MatchClock clock;
    scoring::Forecast forecast{};
};

// Everything the subscriber thread gathers; read by the calling thread after the join.
struct Inbox {
    std::vector<std::vector<ReceivedUpdate>> by_match;  // slot of the match in the replay
    std::uint64_t updates = 0, ticks = 0, undecodable = 0;
    std::atomic<std::uint64_t> received{0};      // updates of our matches, ticks included
    std::atomic<std::uint64_t> ended{0};         // our matches seen finished or abandoned
    std::atomic<std::int64_t> last_event_ns{0};  // steady time of the last event update
};

bool ended_status(core::MatchStatus s) {
    return s == core::MatchStatus::finished || s == core::MatchStatus::abandoned;
}

void subscribe(zmq::context_t& context, const LiveReplayOptions& options,
               const std::unordered_map<std::uint64_t, std::size_t>& slot_of, Inbox& inbox,
               std::stop_token stop) {
    clients::SubscriberOptions subscription;
    subscription.keys = options.keys;
    clients::UpdateSubscriber sub(context, options.publish, subscription);
    std::vector<bool> ended(inbox.by_match.size(), false);
    while (!stop.stop_requested()) {
        const auto received = sub.receive();
        if (!received) continue;
        if (received->kind == clients::ReceivedMessage::Kind::undecodable) {
            ++inbox.undecodable;
            continue;
        }
        if (received->kind != clients::ReceivedMessage::Kind::update) continue;
        const auto& u = received->update;
        const auto slot = slot_of.find(u.meta.match_id);
        if (slot == slot_of.end()) continue;  // another match the service is running
        const bool tick = u.meta.receive_time_us == 0;
        inbox.by_match[slot->second].push_back(
            {u.meta.output_seq,
             tick,
             u.outputs.status,
             u.outputs.clock,
             {u.outputs.p_home, u.outputs.p_draw, u.outputs.p_away}});
        ++(tick ? inbox.ticks : inbox.updates);
        if (!tick) inbox.last_event_ns = SteadyClock::now().time_since_epoch().count();
        if (ended_status(u.outputs.status) && !ended[slot->second]) {
            ended[slot->second] = true;
            ++inbox.ended;
        }
        ++inbox.received;
    }
}

// The messages of every match in the order they were recorded (source time; ties in stream
// order), as (match slot, message index).
std::vector<std::pair<std::size_t, std::size_t>> send_order(
    const std::vector<backtest::MatchMessages>& matches) {
    std::vector<std::pair<std::size_t, std::size_t>> order;
    for (std::size_t m = 0; m < matches.size(); ++m)
        for (std::size_t i = 0; i < matches[m].size(); ++i) order.emplace_back(m, i);
    std::stable_sort(order.begin(), order.end(), [&](const auto& a, const auto& b) {
        return matches[a.first][a.second].header.source_time_us <
               matches[b.first][b.second].header.source_time_us;
    });
    return order;
}

// The forecasts a subscriber saw at each bucket, by the rule in live_replay.hpp. Kick-off: the
// last update before play started.
std::array<std::optional<scoring::Forecast>, scoring::kBuckets> bucket_readings(
    const std::vector<ReceivedUpdate>& updates, const core::CompetitionFormat& format) {
    std::array<std::optional<scoring::Forecast>, scoring::kBuckets> out{};
    std::size_t i = 0;
    std::optional<scoring::Forecast> reading;
    for (; i < updates.size() && updates[i].status == core::MatchStatus::not_started; ++i)
        reading = updates[i].forecast;
    if (!reading || i == updates.size()) return out;  // never saw the kick-off pass
    out[0] = reading;
    int bucket = 1;
    for (; i < updates.size() && bucket < scoring::kBuckets; ++i) {
        const ReceivedUpdate& u = updates[i];
        const bool ends_play = !u.tick && (u.status == core::MatchStatus::interval ||
                                           u.status == core::MatchStatus::finished);
        while (
            bucket < scoring::kBuckets &&
            backtest::bucket_passed(backtest::bucket_clock(format, bucket), u.clock, ends_play)) {
            out[static_cast<std::size_t>(bucket++)] = reading;
        }
        if (ended_status(u.status)) break;  // as in process: no reading once the match is over
        reading = u.forecast;
    }
    return out;
}

}  // namespace

LiveReplayResult run_live_replay(const std::vector<backtest::MatchMessages>& matches,
                                 const LiveReplayOptions& options) {
    if (options.ingest.empty() || options.publish.empty())
        throw std::invalid_argument("live replay: no endpoints");
    LiveReplayResult out;
    std::vector<backtest::MatchReplay> replays =
        backtest::replay_matches(matches, options.in_process);

    std::unordered_map<std::uint64_t, std::size_t> slot_of;
    std::size_t expected_ends = 0;
    for (std::size_t m = 0; m < matches.size(); ++m) {
        if (!matches[m].empty()) slot_of.emplace(matches[m].front().header.match_id, m);
        if (replays[m].fate == backtest::ReplayFate::scored ||
            replays[m].fate == backtest::ReplayFate::abandoned)
            ++expected_ends;
    }
    Inbox inbox;
    inbox.by_match.resize(matches.size());
    zmq::context_t context(1);
    // Stopped and joined however this function ends (the jthread's destructor asks it to stop).
    std::jthread subscriber(
        [&](std::stop_token stop) { subscribe(context, options, slot_of, inbox, stop); });
    auto stop_subscriber = [&] {
        subscriber.request_stop();
        subscriber.join();
    };

    clients::ShardSenderOptions sender_options;
    sender_options.keys = options.keys;
    clients::ShardSender sender(context, options.ingest, sender_options);
    clients::FeedPacer pacer = options.speed > 0.0
                                   ? clients::FeedPacer::by_source_time(options.speed)
                                   : clients::FeedPacer::as_fast_as_possible();
    const auto order = send_order(matches);
    const auto started = SteadyClock::now();
    auto last_progress = started;
    for (std::size_t k = 0; k < order.size(); ++k) {
        const core::InboundMessage& m = matches[order[k].first][order[k].second];
        pacer.wait_for(m);
        const std::vector<std::uint8_t> bytes = protocol::encode_feed_message(m);
        sender.send(m.header.match_id, bytes);
        ++out.messages_sent;
        if (k == 0) {
            // The subscription must be in place before the rest goes out: wait for the first
            // update (the first setup's, or a timer update of it).
            const auto deadline = SteadyClock::now() + options.first_update_timeout;
            while (inbox.received.load() == 0 && SteadyClock::now() < deadline)
                std::this_thread::sleep_for(std::chrono::milliseconds(5));
            if (inbox.received.load() == 0) {
                stop_subscriber();
                throw std::runtime_error(
                    fmt::format("live replay: no update for match {} from {} within {} ms of "
                                "sending its setup to {} (wrong "
                                "endpoint, or does serve already hold this match?)",
                                m.header.match_id, options.publish,
                                options.first_update_timeout.count(), options.ingest.front()));
            }
            pacer = options.speed > 0.0 ? clients::FeedPacer::by_source_time(options.speed)
                                        : clients::FeedPacer::as_fast_as_possible();
            pacer.due(m);  // the clock of the pacing starts again from this message
        }
        if (options.progress &&
            SteadyClock::now() - last_progress > std::chrono::milliseconds(100)) {
            last_progress = SteadyClock::now();
            options.progress(k + 1, order.size());
        }
    }
    out.send_seconds = std::chrono::duration<double>(SteadyClock::now() - started).count();
    if (options.progress) options.progress(order.size(), order.size());

    // The last updates: until every match that ends in its stream was seen ending, or nothing
    // came for the quiet time.
    inbox.last_event_ns = SteadyClock::now().time_since_epoch().count();
    while (inbox.ended.load() < expected_ends &&
           SteadyClock::now().time_since_epoch().count() - inbox.last_event_ns.load() <
               std::chrono::nanoseconds(options.quiet_timeout).count()) {
        std::this_thread::sleep_for(std::chrono::milliseconds(10));
    }
    stop_subscriber();
    out.updates_received = inbox.updates;
    out.ticks_received = inbox.ticks;
    out.undecodable = inbox.undecodable;

    auto problem = [&](std::string text) {
        if (out.problems.size() < kMaxProblemsKept) out.problems.push_back(std::move(text));
    };
    for (std::size_t m = 0; m < matches.size(); ++m) {
        auto& updates = inbox.by_match[m];
        backtest::MatchReplay& replay = replays[m];
        std::stable_sort(updates.begin(), updates.end(),
                         [](const ReceivedUpdate& a, const ReceivedUpdate& b) {
                             return a.output_seq < b.output_seq;
                         });
        // Output sequence numbers run on by one per publication (a restarted serve jumps ahead
        // once: those are counted as missed too, the updates in between were never seen).
        for (std::size_t k = 1; k < updates.size(); ++k) {
            if (updates[k].output_seq > updates[k - 1].output_seq + 1)
                out.missed_updates += updates[k].output_seq - updates[k - 1].output_seq - 1;
        }
        if (!updates.empty() && updates.front().status != core::MatchStatus::not_started) {
            problem(
                fmt::format("match {}: its pre-match updates were not received", replay.match_id));
        }
        if (updates.empty()) {
            ++out.matches_without_updates;
            problem(fmt::format("match {}: no update received", replay.match_id));
        } else if ((replay.fate == backtest::ReplayFate::scored ||
                    replay.fate == backtest::ReplayFate::abandoned) &&
                   !ended_status(updates.back().status)) {
            ++out.matches_not_ended;
            problem(fmt::format("match {}: its end was never received", replay.match_id));
        }
        if (replay.fate == backtest::ReplayFate::unusable) continue;
        const auto& setup = std::get<core::MatchSetup>(matches[m].front().body);
        const auto live = bucket_readings(updates, setup.format);
        for (int b = 0; b < scoring::kBuckets; ++b) {
            auto& slot = replay.forecasts[static_cast<std::size_t>(b)];
            auto& model = slot[static_cast<std::size_t>(backtest::Forecaster::model)];
            const auto& received = live[static_cast<std::size_t>(b)];
            if (!model) continue;  // the match never reached the bucket
            if (!received) {
                // Not seen live: left out for every forecaster, so all are scored on the same set.
                slot = {};
                problem(fmt::format("match {}: no update received for bucket {}", replay.match_id,
                                    scoring::bucket_label(b)));
                continue;
            }
            for (int k = 0; k < scoring::kOutcomes; ++k) {
                const double gap = std::abs((*received)[static_cast<std::size_t>(k)] -
                                            (*model)[static_cast<std::size_t>(k)]);
                if (replay.fate == backtest::ReplayFate::scored)
                    out.largest_difference_from_in_process =
                        std::max(out.largest_difference_from_in_process, gap);
            }
            model = received;
            slot[static_cast<std::size_t>(backtest::Forecaster::fixed_prior)] = live[0];
        }
        if (replay.timeline) {
            replay.timeline->points.clear();
            for (const auto& u : updates) {
                if (u.status == core::MatchStatus::finished ||
                    u.status == core::MatchStatus::shootout)
                    continue;
                replay.timeline->points.push_back(
                    {static_cast<double>(u.clock.clock_ms) / 60'000.0, u.forecast});
            }
        }
    }
    out.scores = backtest::sum_replays(replays, options.in_process.timelines);
    return out;
}

}  // namespace liveprob::live
