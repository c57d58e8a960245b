// The update encoder allocates nothing per update once it is warm (the service encodes one
// update per event and per tick).
#include <catch2/catch.hpp>

#include "heap_allocation_counter.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "sample_messages.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {
const UpdateMeta kMeta{4242, 17, 93, 1'790'000'000'000'000, 1'790'000'000'000'150, 48'000};
}  // namespace

TEST_CASE("encoding an update allocates nothing once the encoder is warm", "[update_codec]") {
    UpdateEncoder encoder;
    Outputs outputs = test::sample_outputs();
    for (auto& row : outputs.goals_added) row.fill(0.001);
    (void)encoder.encode(kMeta, outputs);  // warm-up: the builder grows to size here
    const long before = test::heap_allocations();
    std::size_t total = 0;
    for (int i = 0; i < 1000; ++i) {
        outputs.p_home = 0.001 * i;
        total += encoder.encode(kMeta, outputs).size();
    }
    const long after = test::heap_allocations();
    CHECK(total > 0);
    CHECK(after - before == 0);
}
