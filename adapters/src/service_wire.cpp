#include "liveprob/adapters/service_wire.hpp"

#include <flatbuffers/flatbuffers.h>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/wire/counters_generated.h"
#include "liveprob/wire/snapshot_reply_generated.h"
#include "liveprob/wire/snapshot_request_generated.h"
#include "liveprob/wire/update_generated.h"

namespace liveprob::adapters {

namespace wire = liveprob::wire;
using protocol::kSchemaMajor;
using protocol::kSchemaMinor;

struct WireEncoder::Builder {
    flatbuffers::FlatBufferBuilder fbb{4096};
    std::vector<flatbuffers::Offset<wire::Update>> update_offsets;
    std::vector<flatbuffers::Offset<wire::Counter>> counter_offsets;
};

namespace {

constexpr std::size_t kGridCells = static_cast<std::size_t>(kGrid) * static_cast<std::size_t>(kGrid);

flatbuffers::Offset<wire::Update> build_update(flatbuffers::FlatBufferBuilder& fbb, const PublishedUpdate& u) {
    const Outputs& o = u.outputs;
    const auto p_over = fbb.CreateVector(o.p_over.data(), o.p_over.size());
    const auto grid = fbb.CreateVector(o.goals_added.front().data(), kGridCells);
    const wire::MatchClock clock(static_cast<wire::Period>(o.clock.period), o.clock.clock_ms);
    return wire::CreateUpdate(fbb, kSchemaMajor, kSchemaMinor, u.match_id, u.output_seq, u.input_seq,
                              u.receive_time_us, u.publish_time_us, u.compute_ns,
                              static_cast<wire::Status>(o.status), &clock, o.home_goals, o.away_goals,
                              o.home_reds, o.away_reds, o.p_home, o.p_draw, o.p_away, o.has_advance,
                              o.p_advance_home, o.p_advance_away, o.expected_home_goals,
                              o.expected_away_goals, o.next_goal_home, o.next_goal_away, o.next_goal_none,
                              p_over, o.p_both_score, static_cast<std::uint8_t>(kGrid), grid, o.tail_mass,
                              o.events_applied);
}

std::span<const std::uint8_t> finished(flatbuffers::FlatBufferBuilder& fbb) {
    return {fbb.GetBufferPointer(), fbb.GetSize()};
}

// A table that passed the Verifier: read it into the plain struct, checking ranges.
bool read_update(const wire::Update& w, PublishedUpdate& u, std::string& why) {
    if (w.schema_major() != kSchemaMajor) {
        why = "wrong schema version";
        return false;
    }
    if (w.clock() == nullptr || w.p_over() == nullptr || w.goals_added() == nullptr ||
        w.p_over()->size() != kTotalsLines || w.grid_size() != kGrid || w.goals_added()->size() != kGridCells) {
        why = "update lacks a part or has the wrong grid size";
        return false;
    }
    if (static_cast<int>(w.status()) > static_cast<int>(MatchStatus::abandoned) ||
        static_cast<int>(w.clock()->period()) > static_cast<int>(Period::finished)) {
        why = "unknown status or period";
        return false;
    }
    u.match_id = w.match_id();
    u.output_seq = w.output_seq();
    u.input_seq = w.input_seq();
    u.receive_time_us = w.receive_time_us();
    u.publish_time_us = w.publish_time_us();
    u.compute_ns = w.compute_ns();
    Outputs& o = u.outputs;
    o.status = static_cast<MatchStatus>(w.status());
    o.clock = {static_cast<Period>(w.clock()->period()), w.clock()->clock_ms()};
    o.home_goals = w.home_goals();
    o.away_goals = w.away_goals();
    o.home_reds = w.home_reds();
    o.away_reds = w.away_reds();
    o.p_home = w.p_home();
    o.p_draw = w.p_draw();
    o.p_away = w.p_away();
    o.has_advance = w.has_advance();
    o.p_advance_home = w.p_advance_home();
    o.p_advance_away = w.p_advance_away();
    o.expected_home_goals = w.expected_home_goals();
    o.expected_away_goals = w.expected_away_goals();
    o.next_goal_home = w.next_goal_home();
    o.next_goal_away = w.next_goal_away();
    o.next_goal_none = w.next_goal_none();
    for (flatbuffers::uoffset_t i = 0; i < kTotalsLines; ++i) o.p_over[i] = w.p_over()->Get(i);
    o.p_both_score = w.p_both_score();
    for (flatbuffers::uoffset_t i = 0; i < kGridCells; ++i) {
        o.goals_added[i / kGrid][i % kGrid] = w.goals_added()->Get(i);
    }
    o.tail_mass = w.tail_mass();
    o.events_applied = w.events_applied();
    return true;
}

template <class Root>
const Root* verified(std::span<const std::uint8_t> bytes, const char* identifier, std::string& why) {
    if (bytes.size() < 8 || bytes.size() > (1u << 20)) {
        why = "too small or oversize";
        return nullptr;
    }
    if (!flatbuffers::BufferHasIdentifier(bytes.data(), identifier)) {
        why = "wrong identifier";
        return nullptr;
    }
    flatbuffers::Verifier verifier(bytes.data(), bytes.size());
    if (!verifier.VerifyBuffer<Root>(identifier)) {
        why = "malformed";
        return nullptr;
    }
    return flatbuffers::GetRoot<Root>(bytes.data());
}

}  // namespace

WireEncoder::WireEncoder() : builder_(std::make_unique<Builder>()) {}
WireEncoder::~WireEncoder() = default;

std::span<const std::uint8_t> WireEncoder::update(const PublishedUpdate& update) {
    auto& fbb = builder_->fbb;
    fbb.Clear();
    fbb.Finish(build_update(fbb, update), wire::UpdateIdentifier());
    return finished(fbb);
}

std::span<const std::uint8_t> WireEncoder::snapshot_request(std::uint64_t match_id) {
    auto& fbb = builder_->fbb;
    fbb.Clear();
    fbb.Finish(wire::CreateSnapshotRequest(fbb, kSchemaMajor, kSchemaMinor, match_id),
               wire::SnapshotRequestIdentifier());
    return finished(fbb);
}

std::span<const std::uint8_t> WireEncoder::snapshot_reply(const std::vector<PublishedUpdate>& updates,
                                                          const std::string& error) {
    auto& fbb = builder_->fbb;
    fbb.Clear();
    auto& offsets = builder_->update_offsets;
    offsets.clear();
    for (const auto& u : updates) offsets.push_back(build_update(fbb, u));
    const auto list = fbb.CreateVector(offsets);
    const auto text = fbb.CreateString(error);
    fbb.Finish(wire::CreateSnapshotReply(fbb, kSchemaMajor, kSchemaMinor, text, list),
               wire::SnapshotReplyIdentifier());
    return finished(fbb);
}

std::span<const std::uint8_t> WireEncoder::counters(std::int64_t publish_time_us,
                                                    const std::vector<NamedCounter>& values) {
    auto& fbb = builder_->fbb;
    fbb.Clear();
    auto& offsets = builder_->counter_offsets;
    offsets.clear();
    for (const auto& c : values) offsets.push_back(wire::CreateCounter(fbb, fbb.CreateString(c.name), c.value));
    const auto list = fbb.CreateVector(offsets);
    fbb.Finish(wire::CreateCounters(fbb, kSchemaMajor, kSchemaMinor, publish_time_us, list),
               wire::CountersIdentifier());
    return finished(fbb);
}

std::optional<PublishedUpdate> decode_update(std::span<const std::uint8_t> bytes, std::string& why) {
    const auto* root = verified<wire::Update>(bytes, wire::UpdateIdentifier(), why);
    if (root == nullptr) return std::nullopt;
    PublishedUpdate u;
    if (!read_update(*root, u, why)) return std::nullopt;
    return u;
}

std::optional<std::uint64_t> decode_snapshot_request(std::span<const std::uint8_t> bytes, std::string& why) {
    const auto* root = verified<wire::SnapshotRequest>(bytes, wire::SnapshotRequestIdentifier(), why);
    if (root == nullptr) return std::nullopt;
    if (root->schema_major() != kSchemaMajor) {
        why = "wrong schema version";
        return std::nullopt;
    }
    return root->match_id();
}

std::optional<SnapshotReplyContent> decode_snapshot_reply(std::span<const std::uint8_t> bytes, std::string& why) {
    const auto* root = verified<wire::SnapshotReply>(bytes, wire::SnapshotReplyIdentifier(), why);
    if (root == nullptr) return std::nullopt;
    if (root->schema_major() != kSchemaMajor) {
        why = "wrong schema version";
        return std::nullopt;
    }
    SnapshotReplyContent content;
    if (root->error() != nullptr) content.error = root->error()->str();
    if (root->updates() != nullptr) {
        for (const auto* w : *root->updates()) {
            PublishedUpdate u;
            if (w == nullptr || !read_update(*w, u, why)) return std::nullopt;
            content.updates.push_back(u);
        }
    }
    return content;
}

std::optional<std::vector<NamedCounter>> decode_counters(std::span<const std::uint8_t> bytes, std::string& why) {
    const auto* root = verified<wire::Counters>(bytes, wire::CountersIdentifier(), why);
    if (root == nullptr) return std::nullopt;
    std::vector<NamedCounter> values;
    if (root->values() != nullptr) {
        for (const auto* c : *root->values()) {
            if (c == nullptr || c->name() == nullptr) continue;
            values.push_back({c->name()->str(), c->value()});
        }
    }
    return values;
}

}  // namespace liveprob::adapters
