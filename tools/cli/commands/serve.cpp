// `liveprob serve`: the live service. Settings come from --config (JSON) and flags; a flag
// given on the command line overrides the file. The flags are the configuration's key table
// (service/service_config.hpp), one flag per key. See adapters/service/README.md.
#include <spdlog/spdlog.h>

#include <map>
#include <optional>

#include "command_registry.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/monitoring/log_format.hpp"
#include "liveprob/service/live_service.hpp"
#include "liveprob/service/service_config.hpp"

namespace liveprob::cli {
namespace {

struct ServeFlags {
    std::string config_file;
    // Each key's flag as given on the command line, by key name.
    std::map<std::string_view, std::optional<std::string>> values;
    std::map<std::string_view, bool> switches;
};

// The file, then the flags over it (SIGHUP calls this again: the file may have changed).
service::ServiceConfig read_config(const ServeFlags& f) {
    service::ServiceConfig config;
    if (!f.config_file.empty()) config = service::load_service_config(f.config_file);
    for (const service::ConfigKey& key : service::config_keys()) {
        if (key.value == service::ConfigValue::flag) {
            if (f.switches.at(key.name)) service::set_config_value(config, key, "true", key.flag);
        } else if (const auto& value = f.values.at(key.name)) {
            service::set_config_value(config, key, *value, key.flag);
        }
    }
    service::validate_service_config(config);
    return config;
}

int run_serve(const ServeFlags& f) {
    service::ServiceConfig config;
    try {
        config = read_config(f);
    } catch (const service::ConfigError& e) {
        throw UsageError(e.what());
    }
    spdlog::set_level(spdlog::level::from_str(config.log_level));
    monitoring::use_log_format(config.log_format);
    const core::ModelParams params = config.params_file.empty()
                                         ? core::ModelParams{}
                                         : files::load_params_file(config.params_file);
    service::LiveService live(config, params, [&f] { return read_config(f); });
    live.run();
    return kExitOk;
}

const Registration registration{{
    "serve",
    "run the live service: ingest feed messages, publish probabilities, answer snapshots",
    [](CLI::App& sub) -> std::function<int()> {
        auto f = std::make_shared<ServeFlags>();
        sub.add_option("--config", f->config_file, "JSON configuration file (flags override it)")
            ->check(CLI::ExistingFile);
        for (const service::ConfigKey& key : service::config_keys()) {
            const std::string flag(key.flag);
            const std::string help = service::config_key_help(key);
            if (key.value == service::ConfigValue::flag) {
                sub.add_flag(flag, f->switches[key.name], help);
            } else {
                sub.add_option(flag, f->values[key.name], help);
            }
        }
        return [f] { return run_serve(*f); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
