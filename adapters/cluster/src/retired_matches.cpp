#include "liveprob/cluster/retired_matches.hpp"

#include <fmt/format.h>

#include "liveprob/cluster/cluster_layout.hpp"

namespace liveprob::cluster {

void RetiredMatches::reload() {
    kvKeysList keys{};
    const natsStatus status = kvStore_Keys(&keys, bucket_, nullptr);
    // An empty bucket answers "not found": no retired match.
    if (status == NATS_NOT_FOUND) {
        ids_.clear();
        return;
    }
    check(status, "keys of the retired-match bucket");
    std::unordered_set<std::uint64_t> ids;
    for (int i = 0; i < keys.Count; ++i) {
        if (const auto id = match_of_key(keys.Keys[i])) ids.insert(*id);
    }
    kvKeysList_Destroy(&keys);
    ids_.swap(ids);
}

void RetiredMatches::keep(std::uint64_t match_id, std::span<const std::uint8_t> update) {
    const std::string key = match_key(match_id);
    const natsStatus status =
        kvStore_Put(nullptr, bucket_, key.c_str(), update.data(), static_cast<int>(update.size()));
    if (status != NATS_OK) {
        throw service::RecordLogError(fmt::format("retired-match bucket: {} not stored ({})", key,
                                                  natsStatus_GetText(status)));
    }
    ids_.insert(match_id);
}

std::optional<std::vector<std::uint8_t>> RetiredMatches::find(std::uint64_t match_id) const {
    kvEntry* raw = nullptr;
    if (kvStore_Get(&raw, bucket_, match_key(match_id).c_str()) != NATS_OK) return std::nullopt;
    const KvEntryHandle entry(raw);
    const auto* data = static_cast<const std::uint8_t*>(kvEntry_Value(raw));
    return std::vector<std::uint8_t>(data, data + kvEntry_ValueLen(raw));
}

}  // namespace liveprob::cluster
