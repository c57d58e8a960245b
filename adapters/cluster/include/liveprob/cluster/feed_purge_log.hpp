// One partition's feed stream as the service core's record log. Every message is stored on a
// quorum before the engine sees it, so there is nothing to write or sync; what the log does is
// compaction: the core asks it to drop the records of matches that retired into the
// retired-match bucket (retired_matches.hpp), and it purges each such match's subject from the
// stream (one request per match: every match has a subject of its own). So the stream holds the
// live matches and those finished within the retention, as serve's compacted journal does, and
// a take-over rebuilds only those. The engine tells the log of every message it reads for the
// partition (note()), so it knows which matches the stream holds and what purging them drops.
#pragma once

#include <cstdint>
#include <map>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"
#include "liveprob/service/service_ports.hpp"

namespace liveprob::cluster {

class FeedPurgeLog final : public service::RecordLog {
public:
    // `js` must outlive this.
    FeedPurgeLog(jsCtx* js, const ClusterLayout& layout) : js_(js), layout_(layout) {}

    // A message of `match_id` read from the stream, `bytes` long.
    void note(std::uint64_t match_id, std::size_t bytes);

    void append(std::span<const std::uint8_t>) override {}  // stored before it arrived
    bool awaiting_sync() const override { return false; }
    void sync(std::chrono::steady_clock::time_point, bool) override {}
    // Purges the subject of every noted match `keep` says no to. Throws service::RecordLogError
    // at the first purge the stream refuses (the rest wait for the next compaction).
    service::LogCompaction compact(const std::function<bool(std::uint64_t)>& keep) override;

private:
    struct Held {
        std::uint64_t records = 0;
        std::uint64_t bytes = 0;
    };
    jsCtx* js_;
    ClusterLayout layout_;
    std::map<std::uint64_t, Held> matches_;
};

}  // namespace liveprob::cluster
