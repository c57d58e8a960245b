// Settings of `liveprob serve`. One JSON file holds them all (every key optional); every key is
// also a command-line flag, and a flag given on the command line overrides the file.
// Keys, defaults and meaning are documented in adapters/service/README.md ("Configuration").
#pragma once

#include <cstdint>
#include <stdexcept>
#include <string>

#include "liveprob/files/journal.hpp"
#include "liveprob/files/one_line.hpp"

namespace liveprob::service {

// A bad configuration: the message names the key and the reason, e.g.
// "service.json: tick_interval_ms: must be between 10 and 3600000, got 0". Always one line:
// control bytes quoted from the file are shown escaped.
struct ConfigError : std::runtime_error {
    explicit ConfigError(const std::string& what) : std::runtime_error(files::one_line(what)) {}
};

// Throws ConfigError naming `key` when `text` is not a journal sync policy (files/journal.hpp).
files::JournalSync parse_journal_sync(const std::string& text, const std::string& key);

struct ServiceConfig {
    // Endpoints default to loopback. A "*" port binds an ephemeral port; the bound endpoints
    // are written to `endpoints_file` when that is set.
    std::string ingest_endpoint = "tcp://127.0.0.1:7430";
    std::string publish_endpoint = "tcp://127.0.0.1:7431";
    std::string snapshot_endpoint = "tcp://127.0.0.1:7432";
    std::string endpoints_file;

    std::uint32_t tick_interval_ms = 1000;      // republish every live match this often
    std::uint32_t counters_interval_ms = 5000;  // counters topic and log line

    std::string journal_path;  // empty: no journal (and no recovery)
    files::JournalSync journal_sync = files::JournalSync::interval;
    std::uint32_t journal_sync_interval_ms = 200;

    // Back-pressure: messages queued per subscriber before ZeroMQ drops for that subscriber,
    // and inbound messages queued before feeds block (PUSH) on the ingest socket.
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

    std::string log_level = "info";  // trace, debug, info, warn, error, off

    bool curve_enabled() const noexcept { return !curve_secret_key_file.empty(); }
};

// Reads a configuration file over the defaults. Unknown keys are errors (a typo must not be
// silently ignored).
ServiceConfig load_service_config(const std::string& path);
ServiceConfig parse_service_config(const std::string& json_text, const std::string& origin);

// Cross-checks that no single key can: e.g. an allow-list without a server key.
void validate_service_config(const ServiceConfig& config);

}  // namespace liveprob::service
