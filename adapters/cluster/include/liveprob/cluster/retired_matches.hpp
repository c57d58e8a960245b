// The cluster's store of retired matches' final updates (the service core's FinalStateStore):
// a key-value bucket, key "match.<id>", written by the engine that retires the match, read by
// any engine that later holds its partition and by any client. The engine keeps the set of ids
// in memory, since the core asks about every message; it reads the bucket's keys again each
// time it starts reading a partition, so matches another engine retired are known before their
// messages are replayed. A put is acknowledged once a quorum stored it: sync() has nothing left
// to do.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <unordered_set>
#include <vector>

#include "liveprob/cluster/nats_client.hpp"
#include "liveprob/service/service_ports.hpp"

namespace liveprob::cluster {

class RetiredMatches final : public service::FinalStateStore {
public:
    // `bucket` must outlive this.
    explicit RetiredMatches(kvStore* bucket) : bucket_(bucket) {}

    // Reads every key of the bucket again (entries aged out leave the set). Throws NatsError.
    void reload();

    // Throws service::RecordLogError when the bucket does not acknowledge the put.
    void keep(std::uint64_t match_id, std::span<const std::uint8_t> update) override;
    void sync() override {}
    bool holds(std::uint64_t match_id) const override { return ids_.contains(match_id); }
    std::optional<std::vector<std::uint8_t>> find(std::uint64_t match_id) const override;

    std::size_t size() const noexcept { return ids_.size(); }

private:
    kvStore* bucket_;
    std::unordered_set<std::uint64_t> ids_;
};

}  // namespace liveprob::cluster
