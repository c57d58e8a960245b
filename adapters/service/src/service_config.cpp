#include "liveprob/service/service_config.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <array>
#include <cctype>
#include <charconv>

#include "liveprob/monitoring/health_listener.hpp"
#include "liveprob/monitoring/log_format.hpp"
#include "liveprob/protocol/sharding.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::service {

namespace {

using S = ServiceConfig;

constexpr std::uint64_t kMaxMilliseconds = 3'600'000;
constexpr std::uint64_t kMaxHighWaterMark = 10'000'000;
constexpr std::array<std::string_view, 6> kLogLevels = {"trace", "debug", "info",
                                                        "warn",  "error", "off"};

// The one table of keys.
const std::array<ConfigKey, 33> kKeys = {{
    {"ingest_endpoint", "--ingest", ConfigValue::endpoint, &S::ingest_endpoint,
     "ROUTER socket feeds send to (DEALER; acknowledged)"},
    {"publish_endpoint", "--publish", ConfigValue::endpoint, &S::publish_endpoint,
     "PUB socket subscribers connect to"},
    {"snapshot_endpoint", "--snapshot", ConfigValue::endpoint, &S::snapshot_endpoint,
     "ROUTER socket answering late joiners"},
    {"endpoints_file",
     "--endpoints-file",
     ConfigValue::text,
     &S::endpoints_file,
     "where to write the bound endpoints (`ingest=...` lines); use with `*` ports",
     0,
     0,
     {},
     "none"},
    {"tick_interval_ms", "--tick-ms", ConfigValue::whole, &S::tick_interval_ms,
     "republish every live match this often (ms)", 10, kMaxMilliseconds},
    {"counters_interval_ms", "--counters-ms", ConfigValue::whole, &S::counters_interval_ms,
     "counters topic and log line interval (ms)", 100, kMaxMilliseconds},
    {"retention_s", "--retention-s", ConfigValue::whole, &S::retention_s,
     "a finished or abandoned match leaves memory this long after its final update (s); 0: "
     "never",
     0, 365u * 24 * 3600},
    {"waiting_ttl_s", "--waiting-ttl-s", ConfigValue::whole, &S::waiting_ttl_s,
     "messages of a match whose setup has not come are dropped after this (s); 0: never", 0,
     24u * 3600},
    {"match_message_cap", "--match-message-cap", ConfigValue::whole, &S::match_message_cap,
     "messages one match accepts; later ones are refused and counted; 0: no cap", 0, 100'000'000},
    {"feed_stale_s", "--feed-stale-s", ConfigValue::whole, &S::feed_stale_s,
     "a match in play whose feed has sent nothing for this long is marked stale in its updates "
     "(`feed_stale`) until its next message (s); 0: never",
     0, 24u * 3600},
    {"feed_dormant_s", "--feed-dormant-s", ConfigValue::whole, &S::feed_dormant_s,
     "a live match whose feed has sent nothing for this long is no longer ticked until its next "
     "message (`ticks.stopped_silent`) (s); 0: never",
     0, 7u * 24 * 3600},
    {"clock_interpolation", "--clock-interpolation", ConfigValue::flag, &S::clock_interpolation,
     "between messages, the timer re-prices from an interpolant in the clock (within 1e-12 of "
     "the exact solve, about a twentieth of its cost; 29 KB per live match)"},
    {"journal_path",
     "--journal",
     ConfigValue::text,
     &S::journal_path,
     "journal folder (segment files), replayed at start and appended while running; none: "
     "no recovery",
     0,
     0,
     {},
     "none"},
    {"journal_sync", "--journal-sync", ConfigValue::choice, &S::journal_sync,
     "`none` (the OS flushes), `interval`, `every_message` (fsync before applying)", 0, 0,
     files::kJournalSyncNames},
    {"journal_sync_interval_ms", "--journal-sync-ms", ConfigValue::whole,
     &S::journal_sync_interval_ms, "fsync interval for `interval` (ms)", 1, kMaxMilliseconds},
    {"journal_segment_kib", "--journal-segment-kib", ConfigValue::whole, &S::journal_segment_kib,
     "a journal segment is closed and the next begun at this size (KiB)", 4, 4u << 20},
    {"journal_compact_s", "--journal-compact-s", ConfigValue::whole, &S::journal_compact_s,
     "this often, the journal's records of matches retired since are dropped (their final "
     "updates stay in the folder's `final-states.lpj`) (s); 0: never",
     0, 7u * 24 * 3600},
    {"publish_high_water_mark", "--publish-hwm", ConfigValue::whole, &S::publish_high_water_mark,
     "messages queued per subscriber before dropping", 1, kMaxHighWaterMark},
    {"ingest_high_water_mark", "--ingest-hwm", ConfigValue::whole, &S::ingest_high_water_mark,
     "inbound messages queued before feeds wait", 1, kMaxHighWaterMark},
    {"params_file",
     "--params",
     ConfigValue::text,
     &S::params_file,
     "model parameter file (adapters/files/params_file.hpp)",
     0,
     0,
     {},
     "built-in"},
    {"shard", "--shard", ConfigValue::shard, &S::shard,
     "own the match ids of shard K of N (protocol/sharding.hpp); others are counted "
     "(`ingest.not_our_shard`) and dropped"},
    {"curve_secret_key_file",
     "--server-secret-key",
     ConfigValue::text,
     &S::curve_secret_key_file,
     "the service's `.secret` file; turns CURVE on for ingest",
     0,
     0,
     {},
     "none"},
    {"curve_allowed_keys_file",
     "--allowed-feed-keys",
     ConfigValue::text,
     &S::curve_allowed_keys_file,
     "feed public keys allowed in, one per line (`#` comments)",
     0,
     0,
     {},
     "none"},
    {"curve_publish", "--encrypt-publish", ConfigValue::flag, &S::curve_publish,
     "CURVE on the publish and snapshot sockets too (any client key)"},
    {"log_level", "--log-level", ConfigValue::choice, &S::log_level, "how much to log", 0, 0,
     kLogLevels},
    {"log_format", "--log-format", ConfigValue::choice, &S::log_format,
     "log lines as text or as JSON objects", 0, 0, monitoring::kLogFormats},
    {"health_address",
     "--health-address",
     ConfigValue::address,
     &S::health_address,
     "host:port for HTTP /health/live, /health/ready and /metrics (port 0: any free port)",
     0,
     0,
     {},
     "off"},
    {"cluster_servers",
     "--cluster",
     ConfigValue::servers,
     &S::cluster_servers,
     "cluster mode: `nats://host:port` URLs of a NATS JetStream cluster, comma-separated; the "
     "feed stream replaces the ingest, journal and shard keys (docs/cluster.md)",
     0,
     0,
     {},
     "none"},
    {"cluster_partitions", "--cluster-partitions", ConfigValue::whole, &S::cluster_partitions,
     "cluster mode: partitions of match ids (the same for every engine and feed)", 1, 1024},
    {"cluster_replicas", "--cluster-replicas", ConfigValue::whole, &S::cluster_replicas,
     "cluster mode: copies of the feed stream and buckets when this engine makes them", 1, 5},
    {"cluster_lease_ms", "--cluster-lease-ms", ConfigValue::whole, &S::cluster_lease_ms,
     "cluster mode: a partition's lease expires this long after its engine last renewed it (ms)",
     500, 600'000},
    {"cluster_keep_s", "--cluster-keep-s", ConfigValue::whole, &S::cluster_keep_s,
     "cluster mode: a match's latest state, and a retired match's final state, age out of their "
     "buckets this long after their last write, when this engine makes the buckets (s); 0: never",
     0, 31'536'000},
    {"cluster_engine_name",
     "--cluster-engine-name",
     ConfigValue::name,
     &S::cluster_engine_name,
     "cluster mode: this engine's name among the engines (letters, digits, - and _)",
     0,
     0,
     {},
     "host-pid"},
}};

std::string choice_list(const ConfigKey& key) {
    return fmt::format("{}", fmt::join(key.choices, ", "));
}

// Stores a checked value in the key's member.
class Setter {
public:
    Setter(ServiceConfig& config, const ConfigKey& key, std::string_view where)
        : config_(config), key_(key), where_(where) {}

    [[noreturn]] void fail(const std::string& reason) const {
        throw ConfigError(fmt::format("{}: {}", where_, reason));
    }

    void text(std::string_view value) const {
        switch (key_.value) {
            case ConfigValue::endpoint:
                if (value.find("://") == std::string_view::npos) {
                    fail("must be an endpoint such as tcp://127.0.0.1:7430");
                }
                break;
            case ConfigValue::shard: try { protocol::parse_shard_spec(std::string(value));
                } catch (const std::invalid_argument& e) {
                    fail(e.what());
                }
                break;
            case ConfigValue::choice: choice(value); return;
            case ConfigValue::address: try { monitoring::parse_listen_address(std::string(value));
                } catch (const std::runtime_error& e) {
                    fail(e.what());
                }
                break;
            case ConfigValue::servers: servers(value); break;
            case ConfigValue::name:
                for (const char ch : value) {
                    if (!std::isalnum(static_cast<unsigned char>(ch)) && ch != '-' && ch != '_')
                        fail("letters, digits, - and _ only");
                }
                break;
            case ConfigValue::text: break;
            default: fail("must not be a string");
        }
        config_.*std::get<std::string ServiceConfig::*>(key_.member) = std::string(value);
    }

    void servers(std::string_view list) const {
        if (list.empty()) return;  // none: not in cluster mode
        while (true) {
            const auto comma = list.find(',');
            const std::string_view url = list.substr(0, comma);
            if (!url.starts_with("nats://") || url.size() == 7)
                fail(
                    fmt::format("must be nats://host:port URLs, comma-separated, got \"{}\"", url));
            if (comma == std::string_view::npos) break;
            list.remove_prefix(comma + 1);
        }
    }

    void whole(std::uint64_t value) const {
        if (value < key_.lowest || value > key_.highest) {
            fail(
                fmt::format("must be between {} and {}, got {}", key_.lowest, key_.highest, value));
        }
        std::visit(
            [&](auto member) {
                using T = std::remove_reference_t<decltype(config_.*member)>;
                if constexpr (std::is_integral_v<T> && !std::is_same_v<T, bool>) {
                    config_.*member = static_cast<T>(value);
                }
            },
            key_.member);
    }

    void flag(bool value) const { config_.*std::get<bool ServiceConfig::*>(key_.member) = value; }

private:
    void choice(std::string_view value) const {
        std::size_t index = 0;
        while (index < key_.choices.size() && key_.choices[index] != value) ++index;
        if (index == key_.choices.size()) {
            fail(fmt::format("must be one of {}, got \"{}\"", choice_list(key_), value));
        }
        if (const auto* text = std::get_if<std::string ServiceConfig::*>(&key_.member)) {
            config_.** text = std::string(value);
        } else {
            config_.*std::get<files::JournalSync ServiceConfig::*>(key_.member) =
                static_cast<files::JournalSync>(index);
        }
    }

    ServiceConfig& config_;
    const ConfigKey& key_;
    std::string_view where_;
};

const ConfigKey* find_key(std::string_view name) {
    for (const ConfigKey& key : kKeys) {
        if (key.name == name) return &key;
    }
    return nullptr;
}

// The README's "default" cell: the value a default ServiceConfig holds.
std::string default_text(const ConfigKey& key) {
    const ServiceConfig defaults;
    return std::visit(
        [&](auto member) -> std::string {
            const auto& value = defaults.*member;
            using T = std::remove_cvref_t<decltype(value)>;
            if constexpr (std::is_same_v<T, std::string>) {
                return value.empty() ? std::string(key.unset) : fmt::format("`{}`", value);
            } else if constexpr (std::is_same_v<T, bool>) {
                return value ? "true" : "false";
            } else if constexpr (std::is_same_v<T, files::JournalSync>) {
                return fmt::format("`{}`", files::journal_sync_name(value));
            } else {
                return fmt::format("{}", value);
            }
        },
        key.member);
}

std::string allowed_text(const ConfigKey& key) {
    switch (key.value) {
        case ConfigValue::text: return "a path";
        case ConfigValue::endpoint: return "an endpoint";
        case ConfigValue::whole: return fmt::format("{} .. {}", key.lowest, key.highest);
        case ConfigValue::flag: return "true, false";
        case ConfigValue::choice: return choice_list(key);
        case ConfigValue::shard: return "K/N, K < N";
        case ConfigValue::address: return "host:port";
        case ConfigValue::servers: return "nats:// URLs";
        case ConfigValue::name: return "a name";
    }
    return "";
}

}  // namespace

std::span<const ConfigKey> config_keys() { return kKeys; }

void set_config_value(ServiceConfig& config, const ConfigKey& key, std::string_view text,
                      std::string_view where) {
    const Setter setter(config, key, where);
    if (key.value == ConfigValue::whole) {
        std::uint64_t value = 0;
        const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
        if (ec != std::errc() || end != text.data() + text.size())
            setter.fail("must be a whole number");
        setter.whole(value);
    } else if (key.value == ConfigValue::flag) {
        if (text != "true" && text != "false") setter.fail("must be true or false");
        setter.flag(text == "true");
    } else {
        setter.text(text);
    }
}

ServiceConfig parse_service_config(const std::string& json_text, const std::string& origin) {
    simdjson::dom::parser parser;
    simdjson::dom::element doc;
    if (auto error = parser.parse(json_text).get(doc); error != simdjson::SUCCESS) {
        throw ConfigError(
            fmt::format("{}: not valid JSON: {}", origin, simdjson::error_message(error)));
    }
    simdjson::dom::object object;
    if (doc.get_object().get(object) != simdjson::SUCCESS) {
        throw ConfigError(fmt::format("{}: must hold one JSON object", origin));
    }
    ServiceConfig config;
    for (auto field : object) {
        const std::string where = fmt::format("{}: {}", origin, field.key);
        const ConfigKey* key = find_key(field.key);
        if (key == nullptr) throw ConfigError(where + ": unknown key");
        const Setter setter(config, *key, where);
        switch (key->value) {
            case ConfigValue::whole: {
                std::uint64_t value = 0;
                if (field.value.get_uint64().get(value) != simdjson::SUCCESS)
                    setter.fail("must be a whole number");
                setter.whole(value);
                break;
            }
            case ConfigValue::flag: {
                bool value = false;
                if (field.value.get_bool().get(value) != simdjson::SUCCESS)
                    setter.fail("must be true or false");
                setter.flag(value);
                break;
            }
            default: {
                std::string_view value;
                if (field.value.get_string().get(value) != simdjson::SUCCESS)
                    setter.fail("must be a string");
                setter.text(value);
            }
        }
    }
    return config;
}

ServiceConfig load_service_config(const std::string& path) {
    std::string text;
    try {
        text = protocol::read_whole_file(path, "the configuration file");
    } catch (const std::runtime_error& e) {
        throw ConfigError(e.what());
    }
    return parse_service_config(text, path);
}

void validate_service_config(const ServiceConfig& c) {
    if (!c.curve_allowed_keys_file.empty() && !c.curve_enabled()) {
        throw ConfigError(
            "curve_allowed_keys_file: needs curve_secret_key_file (the server key) too");
    }
    if (c.curve_enabled() && c.curve_allowed_keys_file.empty()) {
        throw ConfigError(
            "curve_allowed_keys_file: required when CURVE is on (no feed could connect)");
    }
    if (c.curve_publish && !c.curve_enabled()) {
        throw ConfigError("curve_publish: needs curve_secret_key_file (the server key) too");
    }
    if (c.feed_stale_s != 0 && c.feed_dormant_s != 0 && c.feed_dormant_s <= c.feed_stale_s) {
        throw ConfigError(fmt::format(
            "feed_dormant_s: must be more than feed_stale_s ({}), got {} (a match is marked stale "
            "before its ticks stop)",
            c.feed_stale_s, c.feed_dormant_s));
    }
    if (!c.cluster_servers.empty() && !c.journal_path.empty())
        throw ConfigError("journal_path: not in cluster mode (the feed stream is the journal)");
    if (!c.cluster_servers.empty() && protocol::parse_shard_spec(c.shard).count > 1)
        throw ConfigError("shard: not in cluster mode (engines share the partitions by lease)");
    // Two sockets cannot bind one fixed endpoint ("*" ports are distinct by construction).
    const auto clash = [](const std::string& a, const std::string& b) {
        return a == b && a.find('*') == std::string::npos;
    };
    if (clash(c.ingest_endpoint, c.publish_endpoint) ||
        clash(c.ingest_endpoint, c.snapshot_endpoint) ||
        clash(c.publish_endpoint, c.snapshot_endpoint)) {
        throw ConfigError(
            "snapshot_endpoint: ingest, publish and snapshot need three different endpoints");
    }
}

std::string config_key_help(const ConfigKey& key) {
    return fmt::format("{} ({}; default {})", key.meaning, allowed_text(key), default_text(key));
}

std::string config_key_table_markdown() {
    std::string out = "| key | flag | default | allowed | meaning |\n|---|---|---|---|---|\n";
    for (const ConfigKey& key : kKeys) {
        out += fmt::format("| `{}` | `{}` | {} | {} | {} |\n", key.name, key.flag,
                           default_text(key), allowed_text(key), key.meaning);
    }
    return out;
}

}  // namespace liveprob::service
