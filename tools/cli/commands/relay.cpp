// `liveprob relay`: one endpoint for subscribers in front of several engine shards.
#include <memory>

#include "command_registry.hpp"
#include "liveprob/service/relay.hpp"

namespace {

const liveprob::cli::Registration registration{
    {"relay", "forward every shard's updates (and route snapshot requests) through one endpoint",
     [](CLI::App& app) {
         auto config = std::make_shared<liveprob::service::RelayConfig>();
         auto timeout_ms = std::make_shared<int>(1000);
         app.add_option("--shard-publish", config->shard_publish,
                        "publish endpoints of the shards, in shard order (0/N first)")
             ->required()
             ->delimiter(',');
         app.add_option("--shard-snapshot", config->shard_snapshot,
                        "snapshot endpoints of the shards, same order (omit to route no snapshots)")
             ->delimiter(',');
         app.add_option("--publish", config->publish_endpoint, "where subscribers connect")
             ->capture_default_str();
         app.add_option("--snapshot", config->snapshot_endpoint, "where late joiners ask for state")
             ->capture_default_str();
         app.add_option("--endpoints-file", config->endpoints_file,
                        "write the bound endpoints here (for ephemeral ports: tcp://127.0.0.1:*)");
         app.add_option("--high-water-mark", config->high_water_mark,
                        "messages queued per subscriber before ZeroMQ drops for it")
             ->capture_default_str()
             ->check(CLI::Range(1, 10'000'000));
         app.add_option("--shard-timeout-ms", *timeout_ms,
                        "how long to wait for a shard's snapshot reply")
             ->capture_default_str()
             ->check(CLI::Range(10, 60'000));
         return [config, timeout_ms] {
             config->shard_timeout = std::chrono::milliseconds(*timeout_ms);
             liveprob::service::run_relay(*config);
             return liveprob::cli::kExitOk;
         };
     }}};

}  // namespace
