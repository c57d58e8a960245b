// `liveprob serve`: the live service. Settings come from --config (JSON) and flags; a flag
// given on the command line overrides the file. The flags are the configuration's key table
// (service/service_config.hpp), one flag per key. See adapters/service/README.md. With
// --cluster, serve is an engine of a NATS JetStream cluster instead (adapters/cluster/README.md).
#include <signal.h>
#include <spdlog/spdlog.h>

#include <map>
#include <optional>

#include "command_registry.hpp"
#include "liveprob/cluster/cluster_engine.hpp"
#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/monitoring/log_format.hpp"
#include "liveprob/service/live_service.hpp"
#include "liveprob/service/service_config.hpp"
#include "liveprob/service/service_core.hpp"

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

// The cluster engine a stop signal asks to stop (its stop() only sets a flag).
cluster::ClusterEngine* g_cluster_engine = nullptr;
void on_cluster_stop_signal(int) {
    if (g_cluster_engine) g_cluster_engine->stop();
}

int run_cluster_engine(const service::ServiceConfig& config, const core::ModelParams& params) {
    cluster::ClusterEngineOptions options;
    options.servers = cluster::split_servers(config.cluster_servers);
    options.layout.partitions = config.cluster_partitions;
    options.layout.replicas = config.cluster_replicas;
    options.layout.keep_s = config.cluster_keep_s;
    options.engine_name = config.cluster_engine_name.empty() ? cluster::default_engine_name()
                                                             : config.cluster_engine_name;
    options.lease_time = std::chrono::milliseconds(config.cluster_lease_ms);
    options.tick_interval = std::chrono::milliseconds(config.tick_interval_ms);
    options.counters_interval = std::chrono::milliseconds(config.counters_interval_ms);
    options.core = service::core_settings(config);
    cluster::ClusterEngine engine(options, params);
    g_cluster_engine = &engine;
    struct sigaction action {};
    action.sa_handler = on_cluster_stop_signal;
    sigemptyset(&action.sa_mask);
    for (const int sig : {SIGTERM, SIGINT, SIGQUIT}) ::sigaction(sig, &action, nullptr);
    ::signal(SIGHUP, SIG_IGN);  // no reload in cluster mode: restart the engine instead
    engine.run();
    g_cluster_engine = nullptr;
    return kExitOk;
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
    if (!config.cluster_servers.empty()) return run_cluster_engine(config, params);
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
