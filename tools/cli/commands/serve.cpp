// `liveprob serve`: the live service. Settings come from --config (JSON) and flags; a flag
// given on the command line overrides the file. See adapters/README.md.
#include <spdlog/spdlog.h>

#include <optional>

#include "command_registry.hpp"
#include "liveprob/service/live_service.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/service/service_config.hpp"
#include "liveprob/protocol/sharding.hpp"

namespace liveprob::cli {
namespace {

struct ServeFlags {
    std::string config_file;
    std::optional<std::string> ingest, publish, snapshot, endpoints_file, journal, journal_sync, params,
        secret_key, allowed_keys, log_level, shard;
    std::optional<std::uint32_t> tick_ms, counters_ms, journal_sync_ms;
    std::optional<std::int32_t> publish_hwm, ingest_hwm;
    std::optional<bool> encrypt_publish;
};

template <class T>
void override_with(T& setting, const std::optional<T>& flag) {
    if (flag) setting = *flag;
}

int run_serve(const ServeFlags& f) {
    service::ServiceConfig config;
    if (!f.config_file.empty()) config = service::load_service_config(f.config_file);
    override_with(config.ingest_endpoint, f.ingest);
    override_with(config.publish_endpoint, f.publish);
    override_with(config.snapshot_endpoint, f.snapshot);
    override_with(config.endpoints_file, f.endpoints_file);
    override_with(config.tick_interval_ms, f.tick_ms);
    override_with(config.counters_interval_ms, f.counters_ms);
    override_with(config.journal_path, f.journal);
    if (f.journal_sync) config.journal_sync = service::parse_journal_sync(*f.journal_sync, "--journal-sync");
    override_with(config.journal_sync_interval_ms, f.journal_sync_ms);
    override_with(config.publish_high_water_mark, f.publish_hwm);
    override_with(config.ingest_high_water_mark, f.ingest_hwm);
    override_with(config.params_file, f.params);
    override_with(config.shard, f.shard);
    override_with(config.curve_secret_key_file, f.secret_key);
    override_with(config.curve_allowed_keys_file, f.allowed_keys);
    override_with(config.curve_publish, f.encrypt_publish);
    override_with(config.log_level, f.log_level);
    try {
        service::validate_service_config(config);
        protocol::parse_shard_spec(config.shard);
    } catch (const std::invalid_argument& e) {
        throw UsageError(std::string("--shard: ") + e.what());
    } catch (const service::ConfigError& e) {
        throw UsageError(e.what());
    }
    spdlog::set_level(spdlog::level::from_str(config.log_level));
    const core::ModelParams params = config.params_file.empty() ? core::ModelParams{} : files::load_params_file(config.params_file);
    service::LiveService service(config, params);
    service.run();
    return kExitOk;
}

const Registration registration{{
    "serve",
    "run the live service: ingest feed messages, publish probabilities, answer snapshots",
    [](CLI::App& sub) -> std::function<int()> {
        auto f = std::make_shared<ServeFlags>();
        sub.add_option("--config", f->config_file, "JSON configuration file (flags override it)")
            ->check(CLI::ExistingFile);
        sub.add_option("--ingest", f->ingest, "ingest endpoint (PULL), e.g. tcp://127.0.0.1:7430");
        sub.add_option("--publish", f->publish, "publish endpoint (PUB)");
        sub.add_option("--snapshot", f->snapshot, "snapshot endpoint (ROUTER)");
        sub.add_option("--endpoints-file", f->endpoints_file, "write the bound endpoints here (for '*' ports)");
        sub.add_option("--tick-ms", f->tick_ms, "republish every live match this often")->check(CLI::Range(10, 3600000));
        sub.add_option("--counters-ms", f->counters_ms, "counters topic and log interval")
            ->check(CLI::Range(100, 3600000));
        sub.add_option("--journal", f->journal, "journal file (replayed at start, appended while running)");
        sub.add_option("--journal-sync", f->journal_sync, "none | interval | every_message");
        sub.add_option("--journal-sync-ms", f->journal_sync_ms, "fsync interval for --journal-sync interval")
            ->check(CLI::Range(1, 3600000));
        sub.add_option("--publish-hwm", f->publish_hwm, "messages queued per subscriber before dropping")
            ->check(CLI::Range(1, 10000000));
        sub.add_option("--ingest-hwm", f->ingest_hwm, "inbound messages queued")->check(CLI::Range(1, 10000000));
        sub.add_option("--params", f->params, "model parameter file");
        sub.add_option("--shard", f->shard, "own only the match ids of shard K/N (default 0/1: all)");
        sub.add_option("--server-secret-key", f->secret_key, "CURVE: the server's .secret file (turns CURVE on)");
        sub.add_option("--allowed-feed-keys", f->allowed_keys, "CURVE: file of feed public keys allowed in");
        sub.add_flag("--encrypt-publish{true}", f->encrypt_publish, "CURVE on the publish and snapshot sockets too");
        sub.add_option("--log-level", f->log_level, "trace, debug, info, warn, error, off");
        return [f] { return run_serve(*f); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
