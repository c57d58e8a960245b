// Fuzz the two configuration readers (service settings and model parameters): any text is
// either read or refused with one line naming the file and the problem (ConfigError,
// ParamsFileError) — never a crash, a hang or another kind of exception — model parameters that
// were read write back to a file that reads back to the same parameters, and whatever the loader
// accepts the engine accepts (one set of limits: core/validate.hpp).
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <stdexcept>
#include <string>

#include "liveprob/core/pricing.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/service/service_config.hpp"

namespace {
// A refusal is one non-empty line.
void require_one_line(const std::exception& e) {
    const std::string what = e.what();
    if (what.empty() || what.find('\n') != std::string::npos) std::abort();
}
}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace liveprob::service;
    const std::string text(reinterpret_cast<const char*>(data), size);
    try {
        const ServiceConfig config = parse_service_config(text, "fuzz.json");
        try {
            validate_service_config(config);
        } catch (const ConfigError& e) {
            require_one_line(e);
        }
    } catch (const ConfigError& e) {
        require_one_line(e);
        if (std::string(e.what()).find("fuzz.json") == std::string::npos)
            std::abort();  // names the file
    }
    try {
        const liveprob::core::ModelParams params =
            liveprob::files::parse_params_json(text, "fuzz.json");
        const liveprob::core::ModelParams again = liveprob::files::parse_params_json(
            liveprob::files::params_to_json(params), "again.json");
        if (liveprob::files::params_to_json(again) != liveprob::files::params_to_json(params))
            std::abort();
        try {
            const liveprob::core::PricingModel model(params);
        } catch (const std::invalid_argument&) {
            std::abort();  // the loader let through what the engine refuses
        }
    } catch (const liveprob::files::ParamsFileError& e) {
        require_one_line(e);
        if (std::string(e.what()).find("fuzz.json") == std::string::npos) std::abort();
    }
    return 0;
}
