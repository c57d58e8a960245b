#pragma once

namespace liveprob::system {
// The project's version, as set in the top-level CMakeLists.txt.
const char* version_string() noexcept;
}  // namespace liveprob::system
