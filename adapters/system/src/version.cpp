#include "liveprob/system/version.hpp"

namespace liveprob::system {
const char* version_string() noexcept { return LIVEPROB_VERSION_STRING; }
}  // namespace liveprob::system
