// Single-byte corruptions and truncations of every outbound message type are either refused
// or decode to values that pass the decoder's own range checks; never a crash or an
// out-of-bounds read (each mutated buffer sits in an exactly-sized heap block).
#include <catch2/catch.hpp>

#include <cmath>
#include <functional>
#include <memory>

#include "liveprob/protocol/update_codec.hpp"
#include "sample_messages.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {

// Returns true when the buffer was accepted; `check` asserts on the decoded value.
using Probe = std::function<bool(std::span<const std::uint8_t>)>;

template <class T, class Decode, class Check>
Probe probe(Decode decode, Check check) {
    return [decode, check](std::span<const std::uint8_t> bytes) {
        const Decoded<T> result = decode(bytes);
        if (!result.ok()) {
            REQUIRE_FALSE(result.value.has_value());
            REQUIRE_FALSE(result.detail.empty());
            return false;
        }
        REQUIRE(result.value.has_value());
        check(*result.value);
        return true;
    };
}

void check_outputs(const Outputs& o) {
    REQUIRE(static_cast<int>(o.status) <= static_cast<int>(MatchStatus::abandoned));
    REQUIRE(static_cast<int>(o.clock.period) <= static_cast<int>(Period::finished));
    for (double p : o.p_over) REQUIRE(std::isfinite(p));
    for (const auto& row : o.goals_added) {
        for (double cell : row) REQUIRE(std::isfinite(cell));
    }
    REQUIRE(std::isfinite(o.p_home + o.p_draw + o.p_away + o.tail_mass));
}

bool run_exact(const Probe& p, const std::uint8_t* data, std::size_t size) {
    auto block = std::make_unique<std::uint8_t[]>(size == 0 ? 1 : size);
    std::copy(data, data + size, block.get());
    return p({block.get(), size});
}

// Small buffers get every value at every byte; large ones a spread of values per byte.
void corrupt_everywhere(const std::vector<std::uint8_t>& valid, const Probe& p) {
    const bool small = valid.size() <= 512;
    std::size_t accepted = 0;
    std::size_t rejected = 0;
    std::vector<std::uint8_t> mutated = valid;
    for (std::size_t pos = 0; pos < valid.size(); ++pos) {
        const std::uint8_t original = valid[pos];
        const std::uint8_t spread[] = {0x00,
                                       0xFF,
                                       0x01,
                                       0x7F,
                                       0x80,
                                       static_cast<std::uint8_t>(original ^ 0x01),
                                       static_cast<std::uint8_t>(original ^ 0x80),
                                       static_cast<std::uint8_t>(original + 1),
                                       static_cast<std::uint8_t>(original - 1)};
        auto one = [&](std::uint8_t value) {
            mutated[pos] = value;
            (run_exact(p, mutated.data(), mutated.size()) ? accepted : rejected) += 1;
        };
        if (small) {
            for (int v = 0; v < 256; ++v) one(static_cast<std::uint8_t>(v));
        } else {
            for (std::uint8_t v : spread) one(v);
        }
        mutated[pos] = original;
    }
    CHECK(rejected > 0);
    CHECK(accepted > 0);
    std::size_t truncated_rejected = 0;
    for (std::size_t size = 0; size < valid.size(); ++size) {
        if (!run_exact(p, valid.data(), size)) ++truncated_rejected;
    }
    CHECK(truncated_rejected + 8 >= valid.size());  // only trailing padding may be cut
}

}  // namespace

TEST_CASE("corrupted and truncated updates never crash the decoder", "[update_codec][corruption]") {
    UpdateEncoder encoder;
    const auto bytes = encoder.encode({4242, 1, 2, 3, 4, 5}, test::sample_outputs());
    corrupt_everywhere({bytes.begin(), bytes.end()},
                       probe<DecodedUpdate>(decode_update, [](const DecodedUpdate& u) {
                           check_outputs(u.outputs);
                       }));
}

TEST_CASE("corrupted and truncated snapshot requests never crash", "[snapshot_codec][corruption]") {
    corrupt_everywhere(encode_snapshot_request(4242),
                       probe<std::uint64_t>(decode_snapshot_request, [](std::uint64_t) {}));
}

TEST_CASE("corrupted and truncated snapshot replies never crash", "[snapshot_codec][corruption]") {
    MatchSetup named;  // the details' strings are corrupted too
    named.home_name = "Brackwater Albion";
    named.away_name = "Tidemill Town";
    named.competition = "Lantern Coast Cup";
    SnapshotReplyContents reply{"",
                                {{{4242, 1, 2, 3, 4, 5}, test::sample_outputs(), details_of(named)},
                                 {{7, 1, 2, 3, 4, 5}, Outputs{}, {}}}};
    corrupt_everywhere(
        encode_snapshot_reply(reply),
        probe<SnapshotReplyContents>(decode_snapshot_reply, [](const SnapshotReplyContents& r) {
            for (const auto& u : r.updates) check_outputs(u.outputs);
        }));
}

TEST_CASE("corrupted and truncated counters never crash", "[counters_codec][corruption]") {
    const CounterSet counters{99, {{"inbound_accepted", 1200}, {"inbound_malformed", 3}}};
    corrupt_everywhere(encode_counters(counters),
                       probe<CounterSet>(decode_counters, [](const CounterSet& c) {
                           for (const auto& [name, value] : c.values)
                               REQUIRE(name.size() < kMaxCountersBytes);
                       }));
}
