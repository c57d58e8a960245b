#include "liveprob/adapters/version.hpp"

namespace liveprob {
const char* version_string() noexcept { return LIVEPROB_VERSION_STRING; }
}  // namespace liveprob
