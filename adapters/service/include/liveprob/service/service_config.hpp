// Settings of `liveprob serve`. One JSON file holds them all (every key optional); every key is
// also a command-line flag, and a flag given on the command line overrides the file.
// config_keys() is the one table of keys: name, flag, allowed values, meaning and member. The
// file's reader, serve's flags and the table in adapters/service/README.md all come from it
// (a unit test checks the README against config_key_table_markdown()).
#pragma once

#include <cstdint>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "liveprob/files/journal.hpp"
#include "liveprob/files/one_line.hpp"

namespace liveprob::service {

// A bad configuration: the message names the key (or flag) and the reason, e.g.
// "service.json: tick_interval_ms: must be between 10 and 3600000, got 0". Always one line:
// control bytes quoted from the file are shown escaped.
struct ConfigError : std::runtime_error {
    explicit ConfigError(const std::string& what) : std::runtime_error(files::one_line(what)) {}
};

struct ServiceConfig {
    // Endpoints default to loopback. A "*" port binds an ephemeral port; the bound endpoints
    // are written to `endpoints_file` when that is set.
    std::string ingest_endpoint = "tcp://127.0.0.1:7430";
    std::string publish_endpoint = "tcp://127.0.0.1:7431";
    std::string snapshot_endpoint = "tcp://127.0.0.1:7432";
    std::string endpoints_file;

    std::uint32_t tick_interval_ms = 1000;      // republish every live match this often
    std::uint32_t counters_interval_ms = 5000;  // counters topic and log line

    // Bounded memory (match_registry.hpp, RegistryLimits); 0 turns a bound off.
    std::uint32_t retention_s = 600;   // finished matches leave memory this long after the end
    std::uint32_t waiting_ttl_s = 60;  // held messages of a match without setup expire
    std::uint32_t match_message_cap = 50000;  // messages one match accepts
    // A feed gone silent (service_core.hpp): marked stale while play should run, then no longer
    // ticked. A feed that confirms its clock every few minutes of play stays well inside both.
    std::uint32_t feed_stale_s = 600;
    std::uint32_t feed_dormant_s = 3600;
    // The timer re-prices from an interpolant in the clock between messages (every output within
    // 1e-12 of the exact solve, about a twentieth of its cost; core/match.hpp). Off: every tick
    // is the exact solve, the same bits on every processor and after a restart.
    bool clock_interpolation = false;

    std::string journal_path;  // a folder of segments; empty: no journal (and no recovery)
    files::JournalSync journal_sync = files::JournalSync::interval;
    std::uint32_t journal_sync_interval_ms = 200;
    std::uint32_t journal_segment_kib = 64 * 1024;  // segments rotate at this size
    // Retired matches' records are compacted out of the journal this often (their final
    // updates are kept in the folder's final-states file); 0: never.
    std::uint32_t journal_compact_s = 600;

    // Back-pressure: messages queued per subscriber before ZeroMQ drops for that subscriber,
    // and inbound messages queued before feeds block on the ingest socket.
    std::int32_t publish_high_water_mark = 20000;
    std::int32_t ingest_high_water_mark = 100000;

    std::string params_file;  // model parameters; empty: the built-in defaults

    // Scale-out: this process owns the match ids of shard "K/N" (protocol/sharding.hpp) and
    // counts and drops the others.
    std::string shard = "0/1";

    // CURVE: the server's secret key file (written by `liveprob keys`) switches CURVE on for
    // ingest; the allow-list names the feeds' public keys. `curve_publish` also encrypts the
    // publish and snapshot sockets (any subscriber key is accepted there).
    std::string curve_secret_key_file;
    std::string curve_allowed_keys_file;
    bool curve_publish = false;

    std::string log_level = "info";   // trace, debug, info, warn, error, off
    std::string log_format = "text";  // text or json (JSON lines; monitoring/log_format.hpp)

    // Health and metrics over HTTP ("127.0.0.1:9464"; port 0: any free port); empty: off.
    std::string health_address;

    // Cluster mode (adapters/cluster): with servers set, serve is an engine of a NATS JetStream
    // cluster instead of the ZeroMQ service.
    std::string cluster_servers;
    std::uint32_t cluster_partitions = 16;
    std::uint32_t cluster_replicas = 3;
    std::uint32_t cluster_lease_ms = 5000;
    // Entries of the latest-state and retired-match buckets age out this long after their last
    // write (s); 0: kept for ever.
    std::uint32_t cluster_keep_s = 604'800;
    std::string cluster_engine_name;  // empty: host name and process id

    bool curve_enabled() const noexcept { return !curve_secret_key_file.empty(); }
};

// What a key holds, and so how its value is read and checked.
enum class ConfigValue : std::uint8_t {
    text,      // any string
    endpoint,  // a ZeroMQ endpoint, "transport://address"
    whole,     // a whole number in [lowest, highest]
    flag,      // true or false (on the command line: the flag alone)
    choice,    // one of `choices`
    shard,     // "K/N" (protocol/sharding.hpp)
    address,   // "host:port" for an HTTP listener (monitoring/health_listener.hpp)
    servers,   // nats://host:port URLs, comma-separated
    name,      // letters, digits, - and _ (a key in a key-value bucket)
};

struct ConfigKey {
    using Member = std::variant<std::string ServiceConfig::*, std::uint32_t ServiceConfig::*,
                                std::int32_t ServiceConfig::*, bool ServiceConfig::*,
                                files::JournalSync ServiceConfig::*>;
    std::string_view name;  // the JSON key
    std::string_view flag;  // serve's flag
    ConfigValue value;
    Member member;
    std::string_view meaning;  // the flag's help and the README's meaning column
    std::uint64_t lowest = 0;  // whole numbers
    std::uint64_t highest = 0;
    std::span<const std::string_view> choices =
        {};                       // choice; an enum member's i-th name is value i
    std::string_view unset = {};  // how the README shows an empty default ("none", "built-in")
};

// Every key, in the order the README lists them.
std::span<const ConfigKey> config_keys();

// Sets `key` in `config` from text (a command-line value; "true"/"false" for a flag), checked
// exactly as the file's value is. Throws ConfigError "<where>: <reason>".
void set_config_value(ServiceConfig& config, const ConfigKey& key, std::string_view text,
                      std::string_view where);

// Reads a configuration file over the defaults. Unknown keys are errors (a typo must not be
// silently ignored).
ServiceConfig load_service_config(const std::string& path);
ServiceConfig parse_service_config(const std::string& json_text, const std::string& origin);

// Cross-checks that no single key can: e.g. an allow-list without a server key.
void validate_service_config(const ServiceConfig& config);

// The README's table of keys (Markdown, one row per key), made from config_keys().
std::string config_key_table_markdown();
// A key's flag help: its meaning, what it allows and its default.
std::string config_key_help(const ConfigKey& key);

}  // namespace liveprob::service
