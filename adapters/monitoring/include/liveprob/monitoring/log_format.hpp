// How serve and the gateway write their log: "text" (spdlog's default lines, for people) or
// "json" (one JSON object per line, for a log collector):
//   {"time":"2026-05-01T19:04:05.123456Z","level":"warning","message":"..."}
// The message is escaped as a JSON string, so any text a log line carries stays one line.
#pragma once

#include <array>
#include <string_view>

namespace liveprob::monitoring {

inline constexpr std::array<std::string_view, 2> kLogFormats = {"text", "json"};

// Applies one of kLogFormats to the default logger; throws std::invalid_argument for others.
void use_log_format(std::string_view format);

}  // namespace liveprob::monitoring
