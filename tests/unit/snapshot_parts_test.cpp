// A snapshot reply for any number of matches in parts (protocol/update_codec.hpp): every part
// under the decoder's frame limit even when every update is as large as an update can be, the
// parts read back as the whole in order, the error in the first.
#include <catch2/catch.hpp>

#include <span>
#include <vector>

#include "liveprob/protocol/message_checks.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "sample_messages.hpp"

using namespace liveprob;
using namespace liveprob::protocol;

namespace {

// `n` updates with the full score grid and names as long as the feed allows (the largest update
// there is), match ids 1..n.
SnapshotReplyContents full_reply(std::size_t n) {
    core::Outputs full = test::sample_outputs();
    for (auto& row : full.goals_added) row.fill(1.0 / (core::kGrid * core::kGrid));
    MatchDetails details;
    details.known = true;
    details.home_name = std::string(kMaxNameBytes, 'h');
    details.away_name = std::string(kMaxNameBytes, 'a');
    details.competition = std::string(kMaxNameBytes, 'c');
    SnapshotReplyContents reply;
    for (std::size_t i = 1; i <= n; ++i) {
        UpdateMeta meta;
        meta.match_id = i;
        meta.output_seq = i;
        reply.updates.push_back({meta, full, details});
    }
    return reply;
}

std::vector<std::span<const std::uint8_t>> spans(const std::vector<std::vector<std::uint8_t>>& v) {
    return {v.begin(), v.end()};
}

}  // namespace

TEST_CASE("a snapshot of more matches than one frame holds comes in parts under the limit",
          "[snapshot_codec]") {
    // Enough of the largest updates that one reply would pass the 16 MiB limit.
    const std::size_t one = encode_snapshot_reply(full_reply(1)).size();
    const std::size_t n = kMaxSnapshotReplyBytes / one * 5 / 4;
    const SnapshotReplyContents reply = full_reply(n);
    const auto whole = encode_snapshot_reply(reply);
    CHECK(whole.size() > kMaxSnapshotReplyBytes);
    CHECK_FALSE(decode_snapshot_reply(whole).ok());  // what one frame would have been

    const auto parts = encode_snapshot_reply_parts(reply);
    REQUIRE(parts.size() == (n + kSnapshotUpdatesPerPart - 1) / kSnapshotUpdatesPerPart);
    for (const auto& part : parts) {
        CHECK(part.size() <= kMaxSnapshotReplyBytes);
        CHECK(decode_snapshot_reply(part).ok());
    }
    const auto decoded = decode_snapshot_reply_parts(spans(parts));
    REQUIRE(decoded.ok());
    REQUIRE(decoded.value->updates.size() == n);
    for (std::size_t i = 0; i < n; ++i) CHECK(decoded.value->updates[i].meta.match_id == i + 1);
    CHECK(decoded.value->updates.back().outputs.goals_added ==
          reply.updates.back().outputs.goals_added);
}

TEST_CASE("snapshot parts: small replies are one part, the error goes first, a bad part is named",
          "[snapshot_codec]") {
    CHECK(encode_snapshot_reply_parts({}).size() == 1);  // no match: still one (empty) reply
    SnapshotReplyContents reply = full_reply(5);
    reply.error = "shard 1 did not answer";
    const auto parts = encode_snapshot_reply_parts(reply, 2);
    REQUIRE(parts.size() == 3);
    CHECK(decode_snapshot_reply(parts[0]).value->error == "shard 1 did not answer");
    CHECK(decode_snapshot_reply(parts[2]).value->error.empty());
    const auto decoded = decode_snapshot_reply_parts(spans(parts));
    REQUIRE(decoded.ok());
    CHECK(decoded.value->error == "shard 1 did not answer");
    CHECK(decoded.value->updates.size() == 5);

    std::vector<std::uint8_t> damaged = parts[1];
    damaged.resize(damaged.size() / 2);
    const auto refused = decode_snapshot_reply_parts({parts[0], damaged, parts[2]});
    CHECK_FALSE(refused.ok());
    CHECK(refused.detail.rfind("part 2 of 3: ", 0) == 0);
    CHECK_THROWS_AS(encode_snapshot_reply_parts(reply, 0), std::invalid_argument);
}
