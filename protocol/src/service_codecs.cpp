// Snapshot request/reply and service counters: encode, and decode after verification.
#include <fmt/format.h>

#include <algorithm>
#include <stdexcept>

#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/wire/counters_generated.h"
#include "liveprob/wire/snapshot_reply_generated.h"
#include "liveprob/wire/snapshot_request_generated.h"
#include "update_table.hpp"
#include "verified_root.hpp"

namespace liveprob::protocol {

namespace {

namespace w = liveprob::wire;

constexpr detail::EnvelopeLimits kRequestLimits{kMaxSnapshotRequestBytes, "LPQ1", 2, 2};
// A reply nests one update per live match; a few thousand matches at most.
constexpr detail::EnvelopeLimits kReplyLimits{kMaxSnapshotReplyBytes, "LPR1", 6, 10'000};
constexpr detail::EnvelopeLimits kCountersLimits{kMaxCountersBytes, "LPC1", 4, 2'000};

std::vector<std::uint8_t> bytes_of(const flatbuffers::FlatBufferBuilder& fbb) {
    return {fbb.GetBufferPointer(), fbb.GetBufferPointer() + fbb.GetSize()};
}

template <class T, class Root>
bool failed(const detail::VerifiedRoot<Root>& verified, Decoded<T>& out) {
    if (verified.root) return false;
    out.error = verified.error;
    out.detail = verified.detail;
    return true;
}

template <class T>
Decoded<T> reject(DecodeError error, const std::string& text) {
    Decoded<T> out;
    out.error = error;
    out.detail = detail::error_detail(error, text);
    return out;
}

}  // namespace

std::vector<std::uint8_t> encode_snapshot_request(std::uint64_t match_id) {
    flatbuffers::FlatBufferBuilder fbb(64);
    fbb.Finish(w::CreateSnapshotRequest(fbb, kSchemaMajor, kSchemaMinor, match_id),
               w::SnapshotRequestIdentifier());
    return bytes_of(fbb);
}

Decoded<std::uint64_t> decode_snapshot_request(std::span<const std::uint8_t> bytes) {
    Decoded<std::uint64_t> out;
    const auto verified = detail::verify_root<w::SnapshotRequest>(bytes, kRequestLimits);
    if (failed(verified, out)) return out;
    out.value = verified.root->match_id();
    return out;
}

namespace {

std::vector<std::uint8_t> encode_reply(const std::string& error_text,
                                       std::span<const DecodedUpdate> updates) {
    flatbuffers::FlatBufferBuilder fbb(1024 + updates.size() * 2600);
    std::vector<flatbuffers::Offset<w::Update>> written;
    written.reserve(updates.size());
    for (const auto& u : updates) {
        flatbuffers::Offset<w::MatchDetails> details;
        if (u.details.known) details = detail::write_details(fbb, u.details);
        written.push_back(detail::write_update(fbb, u.meta, u.outputs, details));
    }
    const auto error = fbb.CreateString(error_text);
    const auto list = fbb.CreateVector(written);
    fbb.Finish(w::CreateSnapshotReply(fbb, kSchemaMajor, kSchemaMinor, error, list),
               w::SnapshotReplyIdentifier());
    return bytes_of(fbb);
}

}  // namespace

std::vector<std::uint8_t> encode_snapshot_reply(const SnapshotReplyContents& reply) {
    return encode_reply(reply.error, reply.updates);
}

std::vector<std::vector<std::uint8_t>> encode_snapshot_reply_parts(
    const SnapshotReplyContents& reply, std::size_t per_part) {
    if (per_part == 0) throw std::invalid_argument("a snapshot part holds at least one update");
    const std::span<const DecodedUpdate> all(reply.updates);
    std::vector<std::vector<std::uint8_t>> parts;
    std::size_t at = 0;
    do {
        const std::size_t n = std::min(per_part, all.size() - at);
        parts.push_back(encode_reply(at == 0 ? reply.error : std::string(), all.subspan(at, n)));
        at += n;
    } while (at < all.size());
    return parts;
}

Decoded<SnapshotReplyContents> decode_snapshot_reply_parts(
    const std::vector<std::span<const std::uint8_t>>& parts) {
    Decoded<SnapshotReplyContents> out;
    SnapshotReplyContents whole;
    for (std::size_t i = 0; i < parts.size(); ++i) {
        auto part = decode_snapshot_reply(parts[i]);
        if (!part.ok()) {
            out.error = part.error;
            out.detail = fmt::format("part {} of {}: {}", i + 1, parts.size(), part.detail);
            return out;
        }
        if (!part.value->error.empty())
            whole.error += (whole.error.empty() ? "" : "; ") + part.value->error;
        for (auto& u : part.value->updates) whole.updates.push_back(std::move(u));
    }
    out.value = std::move(whole);
    return out;
}

Decoded<SnapshotReplyContents> decode_snapshot_reply(std::span<const std::uint8_t> bytes) {
    Decoded<SnapshotReplyContents> out;
    const auto verified = detail::verify_root<w::SnapshotReply>(bytes, kReplyLimits);
    if (failed(verified, out)) return out;
    SnapshotReplyContents reply;
    if (const auto* error = verified.root->error()) reply.error = error->str();
    if (const auto* updates = verified.root->updates()) {
        reply.updates.resize(updates->size());
        for (flatbuffers::uoffset_t i = 0; i < updates->size(); ++i) {
            const w::Update* update = updates->Get(i);
            if (!update)
                return reject<SnapshotReplyContents>(DecodeError::missing_field,
                                                     fmt::format("update {} is absent", i));
            if (auto problem = detail::read_update(*update, reply.updates[i])) {
                return reject<SnapshotReplyContents>(
                    problem->error, fmt::format("update {}: {}", i, problem->describe()));
            }
        }
    }
    out.value = std::move(reply);
    return out;
}

std::vector<std::uint8_t> encode_counters(const CounterSet& counters) {
    flatbuffers::FlatBufferBuilder fbb(256);
    std::vector<flatbuffers::Offset<w::Counter>> values;
    values.reserve(counters.values.size());
    for (const auto& [name, value] : counters.values) {
        const auto name_offset = fbb.CreateString(name);
        values.push_back(w::CreateCounter(fbb, name_offset, value));
    }
    const auto list = fbb.CreateVector(values);
    fbb.Finish(w::CreateCounters(fbb, kSchemaMajor, kSchemaMinor, counters.publish_time_us, list),
               w::CountersIdentifier());
    return bytes_of(fbb);
}

Decoded<CounterSet> decode_counters(std::span<const std::uint8_t> bytes) {
    Decoded<CounterSet> out;
    const auto verified = detail::verify_root<w::Counters>(bytes, kCountersLimits);
    if (failed(verified, out)) return out;
    CounterSet counters;
    counters.publish_time_us = verified.root->publish_time_us();
    if (const auto* values = verified.root->values()) {
        for (const w::Counter* c : *values) {
            if (!c || !c->name())
                return reject<CounterSet>(DecodeError::missing_field, "a counter has no name");
            counters.values.emplace_back(c->name()->str(), c->value());
        }
    }
    out.value = std::move(counters);
    return out;
}

}  // namespace liveprob::protocol
