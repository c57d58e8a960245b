// A match brought to a stated position (minute, score, red cards) through the same Match API
// the service uses, by synthesising the messages that lead there. `liveprob calc` prices a
// position this way, so the calculator and the live engine agree exactly.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <vector>

#include "liveprob/core/match.hpp"
#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::core {

struct MatchPosition {
    PriorMeans prior;
    CompetitionFormat format;
    MatchClock clock{Period::first_half, 0};  // a period of play
    std::array<int, 2> score{};
    std::array<int, 2> reds{};
    std::optional<int> stoppage_minutes;  // announced for the current period
};

// The messages that take a fresh match to `position`: each period before the current one
// starts at its start and ends at its nominal end plus the expected stoppage; the goals and
// cards come at the position's clock (in extra time: at the end of regulation, so the score
// given is the regulation score), then the announced stoppage. Throws std::invalid_argument
// when the position is impossible (say why: clock outside every period, extra time with the
// score not level, more than the score grid holds).
[[nodiscard]] std::vector<InboundMessage> position_messages(std::uint64_t match_id,
                                                            const MatchPosition& position,
                                                            const ModelParams& params);

// A Match with those messages applied (every one of them must be accepted).
[[nodiscard]] Match match_at(const MatchPosition& position, const ModelParams& params);

}  // namespace liveprob::core
