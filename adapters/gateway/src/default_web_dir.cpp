#include <filesystem>

#include "liveprob/gateway/gateway_config.hpp"

namespace liveprob::gateway {

// The installed page lies beside the installed program: <prefix>/bin/liveprob and
// <prefix>/share/liveprob/web. Looked up from the running program first, so a prefix that was
// moved (a scratch install, a package built for /usr) still finds it; then the configured
// install directory; then the source tree (a build directory).
std::filesystem::path default_web_dir() {
    std::error_code ec;
    const std::filesystem::path program = std::filesystem::read_symlink("/proc/self/exe", ec);
    if (!ec) {
        const auto beside = program.parent_path().parent_path() / "share" / "liveprob" / "web";
        if (std::filesystem::is_regular_file(beside / "index.html", ec)) return beside;
    }
    const std::filesystem::path installed = LIVEPROB_WEB_INSTALL_DIR;
    if (std::filesystem::is_regular_file(installed / "index.html", ec)) return installed;
    return LIVEPROB_WEB_SOURCE_DIR;
}

}  // namespace liveprob::gateway
