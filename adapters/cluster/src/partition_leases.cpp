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

std::optional<std::uint64_t> PartitionLeases::adopt(const std::string& key, bool& answered) {
    // A write whose reply was lost (a node died after storing it) leaves the key with our name
    // at a revision we never heard of; the compare-and-set on the revision read here succeeds
    // only if nobody wrote since, so adopting it cannot take a lease from another engine.
    kvEntry* raw = nullptr;
    const natsStatus got = kvStore_Get(&raw, bucket_, key.c_str());
    if (got == NATS_NOT_FOUND) return std::nullopt;  // expired or given back
    if (got != NATS_OK) {
        answered = false;
        return std::nullopt;
    }
    KvEntryHandle entry(raw);
    if (std::string_view(kvEntry_ValueString(raw)) != name_) return std::nullopt;
    std::uint64_t revision = 0;
    const natsStatus s =
        kvStore_UpdateString(&revision, bucket_, key.c_str(), name_.c_str(), kvEntry_Revision(raw));
    if (s == NATS_OK) return revision;
    // The entry names this engine, so nobody else holds the lease: not lost, only unanswered.
    answered = false;
    return std::nullopt;
}

LeaseChanges PartitionLeases::renew(Clock::time_point now) {
    LeaseChanges changes;
    // While the cluster does not answer (a node lost, an election), each request costs a whole
    // timeout: after the first unanswered one, the rest of this round is skipped and every
    // lease stays as it is (unknown), so one slow round cannot hold the engine up for a timeout
    // per partition.
    bool answered = true;
    const std::string presence = "engine." + name_;
    const natsStatus put = kvStore_PutString(nullptr, bucket_, presence.c_str(), name_.c_str());
    if (no_answer(put)) answered = false;
    if (answered) live_engines_ = count_live_engines();

    for (auto it = held_.begin(); it != held_.end();) {
        const std::string key = lease_key(it->first);
        std::uint64_t revision = 0;
        natsStatus s = NATS_TIMEOUT;
        if (answered) {
            s = kvStore_UpdateString(&revision, bucket_, key.c_str(), name_.c_str(),
                                     it->second.revision);
            if (no_answer(s)) answered = false;
        }
        std::optional<std::uint64_t> adopted;
        if (s != NATS_OK && !no_answer(s)) adopted = adopt(key, answered);
        if (s == NATS_OK || adopted) {
            it->second = {s == NATS_OK ? revision : *adopted, now};
            ++it;
        } else if (!answered && now - it->second.renewed < lease_time_) {
            ++it;  // unknown: fenced_in() stops acting on it once it is overdue
        } else {
            spdlog::warn("partition {}: lease lost ({})", it->first,
                         answered ? natsStatus_GetText(s) : "not renewed within the lease time");
            changes.lost.push_back(it->first);
            it = held_.erase(it);
        }
    }
    if (!answered) return changes;  // no giving back or taking on a cluster that is not answering

    const std::size_t share = (layout_.partitions + live_engines_ - 1) / live_engines_;
    while (held_.size() > share) {
        const auto last = std::prev(held_.end());
        kvStore_Delete(bucket_, lease_key(last->first).c_str());
        spdlog::info("partition {}: given back ({} engines share {} partitions)", last->first,
                     live_engines_, layout_.partitions);
        changes.lost.push_back(last->first);
        held_.erase(last);
    }
    for (std::uint32_t i = 0; i < layout_.partitions && held_.size() < share && answered; ++i) {
        const std::uint32_t p = (start_offset_ + i) % layout_.partitions;
        if (held_.contains(p)) continue;
        const std::string key = lease_key(p);
        std::uint64_t revision = 0;
        const natsStatus s = kvStore_CreateString(&revision, bucket_, key.c_str(), name_.c_str());
        std::optional<std::uint64_t> adopted;
        if (no_answer(s)) answered = false;
        else if (s != NATS_OK)
            adopted = adopt(key, answered);  // ours already, if an earlier create's reply was lost
        if (s == NATS_OK || adopted) {
            held_[p] = {s == NATS_OK ? revision : *adopted, now};
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
