// Which partitions this engine owns, held as leases in a JetStream key-value bucket whose
// entries age out after the lease time. Key "partition.<k>" holds the owner's name; taking a
// partition is a create (only when no live entry exists), renewing is an update that names the
// revision the owner last wrote (compare-and-set: it fails if anyone else wrote in between), so
// two engines can never both renew one lease. Each engine also keeps "engine.<name>" alive, and
// aims at an equal share: ceil(partitions / live engines). An engine over its share gives the
// highest-numbered extras back; one under it takes free ones, starting at an offset of its own.
// A dead engine's entries age out after the lease time and the survivors take its partitions.
// A write whose reply was lost (a node died after storing it) is adopted by a compare-and-set
// on the revision read back, when the entry names this engine. While the cluster does not
// answer, the round stops at the first timeout and the leases stay unknown until they are
// renewed or their time is up.
// Fencing: an engine treats a lease as its own only until `fence_after` past its last
// successful renewal (shorter than the lease time), so it has stopped publishing for a partition
// before any other engine can take it.
#pragma once

#include <chrono>
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"

namespace liveprob::cluster {

struct LeaseChanges {
    std::vector<std::uint32_t> gained;
    std::vector<std::uint32_t> lost;  // taken by another, expired, or given back
};

class PartitionLeases {
public:
    using Clock = std::chrono::steady_clock;

    PartitionLeases(kvStore* bucket, const ClusterLayout& layout, std::string engine_name,
                    std::chrono::milliseconds lease_time);

    // Renews what is held, gives back extras, takes free partitions up to the share. Call it
    // every renew_interval().
    LeaseChanges renew(Clock::time_point now);
    // Gives every lease back (a clean stop), so others need not wait for them to age out.
    void release_all();

    // True while the lease on `partition` is held and renewed recently enough to act on.
    bool fenced_in(std::uint32_t partition, Clock::time_point now) const;
    std::chrono::milliseconds renew_interval() const { return lease_time_ / 4; }
    std::size_t held() const noexcept { return held_.size(); }
    std::uint64_t revision(std::uint32_t partition) const;
    std::size_t live_engines() const noexcept { return live_engines_; }

private:
    struct Held {
        std::uint64_t revision = 0;
        Clock::time_point renewed;
    };
    std::size_t count_live_engines();
    // The lease under `key` when its last write was this engine's, renewed now by a
    // compare-and-set on the revision read; `answered` turns false when the cluster did not.
    std::optional<std::uint64_t> adopt(const std::string& key, bool& answered);

    kvStore* bucket_;
    ClusterLayout layout_;
    std::string name_;
    std::chrono::milliseconds lease_time_;
    std::chrono::milliseconds fence_after_;
    std::map<std::uint32_t, Held> held_;
    std::size_t live_engines_ = 1;
    std::uint32_t start_offset_;
};

}  // namespace liveprob::cluster
