#include "liveprob/cluster/partition_leases.hpp"

#include <spdlog/spdlog.h>

#include <functional>
#include <set>
#include <string_view>

namespace liveprob::cluster {
namespace {

// A request the cluster did not answer (a node lost, an election under way): the lease is
// neither renewed nor known to be lost; fencing decides until the next try.
bool no_answer(natsStatus s) {
    return s == NATS_TIMEOUT || s == NATS_NO_RESPONDERS || s == NATS_CONNECTION_CLOSED ||
           s == NATS_CONNECTION_DISCONNECTED || s == NATS_IO_ERROR;
}

}  // namespace

PartitionLeases::PartitionLeases(kvStore* bucket, const ClusterLayout& layout,
                                 std::string engine_name, std::chrono::milliseconds lease_time)
    : bucket_(bucket), layout_(layout), name_(std::move(engine_name)), lease_time_(lease_time),
      fence_after_(lease_time * 3 / 4), start_offset_(static_cast<std::uint32_t>(
                                            std::hash<std::string>{}(name_) % layout.partitions)) {}

std::size_t PartitionLeases::count_live_engines() {
    kvKeysList keys{};
    if (kvStore_Keys(&keys, bucket_, nullptr) != NATS_OK) return live_engines_;
    // Distinct names: a key written while the list is read can be listed twice.
    std::set<std::string_view> engines;
    for (int i = 0; i < keys.Count; ++i) {
        if (std::string_view(keys.Keys[i]).starts_with("engine.")) engines.insert(keys.Keys[i]);
    }
    const std::size_t count = engines.size();
    kvKeysList_Destroy(&keys);
    return count == 0 ? 1 : count;
}

LeaseChanges PartitionLeases::renew(Clock::time_point now) {
    LeaseChanges changes;
    const std::string presence = "engine." + name_;
    kvStore_PutString(nullptr, bucket_, presence.c_str(), name_.c_str());
    live_engines_ = count_live_engines();

    for (auto it = held_.begin(); it != held_.end();) {
        const std::string key = lease_key(it->first);
        std::uint64_t revision = 0;
        const natsStatus s = kvStore_UpdateString(&revision, bucket_, key.c_str(), name_.c_str(),
                                                  it->second.revision);
        if (s == NATS_OK) {
            it->second = {revision, now};
            ++it;
        } else if (no_answer(s) && now - it->second.renewed < lease_time_) {
            ++it;  // unknown: fenced_in() stops acting on it once it is overdue
        } else {
            spdlog::warn("partition {}: lease lost ({})", it->first, natsStatus_GetText(s));
            changes.lost.push_back(it->first);
            it = held_.erase(it);
        }
    }

    const std::size_t share = (layout_.partitions + live_engines_ - 1) / live_engines_;
    while (held_.size() > share) {
        const auto last = std::prev(held_.end());
        kvStore_Delete(bucket_, lease_key(last->first).c_str());
        spdlog::info("partition {}: given back ({} engines share {} partitions)", last->first,
                     live_engines_, layout_.partitions);
        changes.lost.push_back(last->first);
        held_.erase(last);
    }
    for (std::uint32_t i = 0; i < layout_.partitions && held_.size() < share; ++i) {
        const std::uint32_t p = (start_offset_ + i) % layout_.partitions;
        if (held_.contains(p)) continue;
        std::uint64_t revision = 0;
        if (kvStore_CreateString(&revision, bucket_, lease_key(p).c_str(), name_.c_str()) ==
            NATS_OK) {
            held_[p] = {revision, now};
            changes.gained.push_back(p);
        }
    }
    return changes;
}

void PartitionLeases::release_all() {
    for (const auto& [partition, lease] : held_)
        kvStore_Delete(bucket_, lease_key(partition).c_str());
    held_.clear();
    kvStore_Delete(bucket_, ("engine." + name_).c_str());
}

bool PartitionLeases::fenced_in(std::uint32_t partition, Clock::time_point now) const {
    const auto it = held_.find(partition);
    return it != held_.end() && now - it->second.renewed < fence_after_;
}

std::uint64_t PartitionLeases::revision(std::uint32_t partition) const {
    const auto it = held_.find(partition);
    return it == held_.end() ? 0 : it->second.revision;
}

}  // namespace liveprob::cluster
