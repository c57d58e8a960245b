#include <filesystem>

#include "liveprob/gateway/gateway_config.hpp"

namespace liveprob::gateway {

std::filesystem::path default_web_dir() {
    const std::filesystem::path installed = LIVEPROB_WEB_INSTALL_DIR;
    std::error_code ec;
    if (std::filesystem::is_regular_file(installed / "index.html", ec)) return installed;
    return LIVEPROB_WEB_SOURCE_DIR;
}

}  // namespace liveprob::gateway
