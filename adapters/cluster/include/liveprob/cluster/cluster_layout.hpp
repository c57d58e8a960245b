// Where the cluster mode keeps things in NATS: one JetStream stream for the feed (a subject per
// match, under its partition, so a partition is read with one wildcard and a retired match's
// messages are purged with one request), core NATS subjects for the updates (one per match), and
// three key-value buckets (the latest update of each match; the final update of each retired
// match; the partitions' leases). `send` and every engine
// must agree on all of it, so it is one struct with one set of defaults; only the partition
// count is a choice, and the feed stream records it (a disagreeing process refuses to start).
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "liveprob/core/messages.hpp"

namespace liveprob::cluster {

struct ClusterLayout {
    std::uint32_t partitions = 16;  // of match ids (protocol/sharding.hpp's function)
    std::uint32_t replicas = 3;     // copies of the feed stream and buckets (at most the nodes)
    // Entries of the latest-state and retired-match buckets age out this long after they were
    // last written; 0: kept for ever. (A retired match's feed messages are purged by its engine.)
    std::uint32_t keep_s = 0;
    std::string feed_stream = "liveprob_feed";
    std::string feed_subject_prefix = "liveprob.feed";     // + ".<partition>.<match id>"
    std::string update_subject_prefix = "liveprob.match";  // + ".<match id>", core NATS
    std::string latest_bucket = "liveprob_latest";         // key "match.<id>", history 1
    std::string retired_bucket = "liveprob_retired";       // key "match.<id>", history 1
    std::string lease_bucket = "liveprob_leases";  // key "partition.<k>" and "engine.<name>"
};

std::uint32_t partition_of(const ClusterLayout& layout, std::uint64_t match_id) noexcept;
// A match's feed subject: "liveprob.feed.<partition>.<match id>".
std::string feed_subject(const ClusterLayout& layout, std::uint64_t match_id);
// Every feed subject of one partition ("liveprob.feed.<partition>.*"): what its engine reads.
std::string partition_subjects(const ClusterLayout& layout, std::uint32_t partition);
// Every feed subject ("liveprob.feed.*.*"), the stream's one subject filter.
std::string feed_subjects(const ClusterLayout& layout);
// The match id a feed subject names; nothing when it names none.
std::optional<std::uint64_t> match_of_feed_subject(std::string_view subject);
std::string update_subject(const ClusterLayout& layout, std::uint64_t match_id);
// A match's key in the latest-state and retired-match buckets: "match.<id>".
std::string match_key(std::uint64_t match_id);
// The match id a bucket key names; nothing when it names none.
std::optional<std::uint64_t> match_of_key(std::string_view key);
std::string lease_key(std::uint32_t partition);
// The stream's duplicate-window id of a feed message: match id and source sequence, the
// engine's own de-duplication key, so a resend is dropped by the stream and, past the window,
// by the fold.
std::string feed_message_id(const core::MessageHeader& header);
// "nats://a:4222,nats://b:4222" -> each URL; empty pieces dropped.
std::vector<std::string> split_servers(std::string_view servers);
// True when every piece of a --to list is a nats:// URL (send's cluster target).
bool is_nats_target(const std::vector<std::string>& endpoints);

}  // namespace liveprob::cluster
