// Outbound codecs: probability updates (published per match), snapshot request/reply (for a
// subscriber that joins late) and service counters. Every decoder verifies before it reads.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include <flatbuffers/flatbuffers.h>

#include "liveprob/core/outputs.hpp"
#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::protocol {

inline constexpr std::size_t kMaxUpdateBytes = 16 * 1024;
inline constexpr std::size_t kMaxSnapshotRequestBytes = 1024;
inline constexpr std::size_t kMaxSnapshotReplyBytes = 16 * 1024 * 1024;
inline constexpr std::size_t kMaxCountersBytes = 64 * 1024;

// What an update carries beside the outputs: which match, where it sits in the match's output
// sequence, which input it reflects, and the timestamps that let anyone measure latency.
struct UpdateMeta {
    std::uint64_t match_id = 0;
    std::uint64_t output_seq = 0;
    std::uint64_t input_seq = 0;
    std::int64_t receive_time_us = 0;  // 0 for updates driven by the clock alone
    std::int64_t publish_time_us = 0;
    std::uint32_t compute_ns = 0;
    // How far the service vouches for the update (update.fbs, schema 1.1; false from 1.0).
    bool feed_stale = false;       // the match's feed silent past the threshold during play
    bool journal_failing = false;  // the service's journal writes failing: may be behind the feed
    friend bool operator==(const UpdateMeta&, const UpdateMeta&) = default;
};

// What names a match on a screen, as its setup gave it (schema 1.2: an update from an older
// writer has none, and `known` is false).
struct MatchDetails {
    bool known = false;
    std::string home_name;
    std::string away_name;
    std::string competition;  // empty when the setup named none
    std::int64_t scheduled_kickoff_us = 0;
    bool neutral_venue = false;
    core::CompetitionFormat format;
    friend bool operator==(const MatchDetails&, const MatchDetails&) = default;
};
MatchDetails details_of(const core::MatchSetup& setup);

struct DecodedUpdate {
    UpdateMeta meta;
    core::Outputs outputs;
    MatchDetails details;
};

// Reusable update encoder. It keeps its builder between calls, so once the builder has grown
// to an update's size, encoding allocates nothing. The score grid is cut to the smallest
// square that holds every non-zero cell.
class UpdateEncoder {
public:
    UpdateEncoder();
    // The bytes stay valid until the next call on this encoder. With the match's setup, the
    // update names the match (its details); the service always passes it.
    std::span<const std::uint8_t> encode(const UpdateMeta& meta, const core::Outputs& outputs);
    std::span<const std::uint8_t> encode(const UpdateMeta& meta, const core::Outputs& outputs,
                                         const core::MatchSetup& setup);
    // The same with details as decoded (none written when `details.known` is false), so a
    // decoded update re-encodes to the bytes it came from.
    std::span<const std::uint8_t> encode(const UpdateMeta& meta, const core::Outputs& outputs,
                                         const MatchDetails& details);

private:
    flatbuffers::FlatBufferBuilder builder_;
};

// Verifies and decodes one update; cells beyond the sent grid are zero.
Decoded<DecodedUpdate> decode_update(std::span<const std::uint8_t> bytes);

// match_id 0 asks for every live match.
std::vector<std::uint8_t> encode_snapshot_request(std::uint64_t match_id);
Decoded<std::uint64_t> decode_snapshot_request(std::span<const std::uint8_t> bytes);

struct SnapshotReplyContents {
    std::string error;                   // empty on success
    std::vector<DecodedUpdate> updates;  // latest update of each match asked for
};
std::vector<std::uint8_t> encode_snapshot_reply(const SnapshotReplyContents& reply);
// Updates per part of a reply: one update is at most kMaxUpdateBytes, so a part of this many
// stays under kMaxSnapshotReplyBytes (64 KiB kept for the envelope and the error text) and
// under the verifier's table count, whatever the matches' outputs.
inline constexpr std::size_t kSnapshotUpdatesPerPart =
    (kMaxSnapshotReplyBytes - 64 * 1024) / kMaxUpdateBytes;
// A reply for any number of matches as the frames of one ZeroMQ message: parts of at most
// `per_part` updates, each a whole SnapshotReply (the error, if any, in the first); at least one.
std::vector<std::vector<std::uint8_t>> encode_snapshot_reply_parts(
    const SnapshotReplyContents& reply, std::size_t per_part = kSnapshotUpdatesPerPart);
// The parts of one reply read back as one: updates in order, errors joined with "; ".
Decoded<SnapshotReplyContents> decode_snapshot_reply_parts(
    const std::vector<std::span<const std::uint8_t>>& parts);
Decoded<SnapshotReplyContents> decode_snapshot_reply(std::span<const std::uint8_t> bytes);

struct CounterSet {
    std::int64_t publish_time_us = 0;
    std::vector<std::pair<std::string, std::uint64_t>> values;  // name, value
    friend bool operator==(const CounterSet&, const CounterSet&) = default;
};
std::vector<std::uint8_t> encode_counters(const CounterSet& counters);
Decoded<CounterSet> decode_counters(std::span<const std::uint8_t> bytes);

}  // namespace liveprob::protocol
