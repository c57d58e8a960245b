#include "liveprob/service/service_config.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <limits>
#include <string_view>

#include "liveprob/protocol/sharding.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::service {

files::JournalSync parse_journal_sync(const std::string& text, const std::string& key) {
    if (text == "none") return files::JournalSync::none;
    if (text == "interval") return files::JournalSync::interval;
    if (text == "every_message") return files::JournalSync::every_message;
    throw ConfigError(fmt::format("{}: must be one of none, interval, every_message, got \"{}\"",
                                  key, text));
}

namespace {

using simdjson::dom::element;
using simdjson::dom::element_type;

// Reads one key's value with its type and range checked; every error names origin and key.
class KeyReader {
public:
    KeyReader(std::string origin, std::string key, element value)
        : origin_(std::move(origin)), key_(std::move(key)), value_(value) {}

    std::string text() const {
        std::string_view v;
        if (value_.get_string().get(v) != simdjson::SUCCESS) fail("must be a string");
        return std::string(v);
    }
    bool flag() const {
        bool v = false;
        if (value_.get_bool().get(v) != simdjson::SUCCESS) fail("must be true or false");
        return v;
    }
    std::uint64_t whole(std::uint64_t lowest, std::uint64_t highest) const {
        std::uint64_t v = 0;
        if (value_.get_uint64().get(v) != simdjson::SUCCESS) fail("must be a whole number");
        if (v < lowest || v > highest) {
            fail(fmt::format("must be between {} and {}, got {}", lowest, highest, v));
        }
        return v;
    }
    [[noreturn]] void fail(const std::string& reason) const {
        throw ConfigError(fmt::format("{}: {}: {}", origin_, key_, reason));
    }

private:
    std::string origin_;
    std::string key_;
    element value_;
};

std::string endpoint(const KeyReader& r) {
    std::string e = r.text();
    if (e.find("://") == std::string::npos) r.fail("must be an endpoint such as tcp://127.0.0.1:7430");
    return e;
}

std::uint32_t milliseconds(const KeyReader& r, std::uint64_t lowest) {
    return static_cast<std::uint32_t>(r.whole(lowest, 3'600'000));
}

std::int32_t high_water_mark(const KeyReader& r) {
    return static_cast<std::int32_t>(r.whole(1, 10'000'000));
}

void apply_key(ServiceConfig& c, std::string_view key, const KeyReader& r) {
    if (key == "ingest_endpoint") c.ingest_endpoint = endpoint(r);
    else if (key == "publish_endpoint") c.publish_endpoint = endpoint(r);
    else if (key == "snapshot_endpoint") c.snapshot_endpoint = endpoint(r);
    else if (key == "endpoints_file") c.endpoints_file = r.text();
    else if (key == "tick_interval_ms") c.tick_interval_ms = milliseconds(r, 10);
    else if (key == "counters_interval_ms") c.counters_interval_ms = milliseconds(r, 100);
    else if (key == "journal_path") c.journal_path = r.text();
    else if (key == "journal_sync") {
        try {
            c.journal_sync = parse_journal_sync(r.text(), "journal_sync");
        } catch (const ConfigError& e) {
            r.fail(std::string(e.what()).substr(std::string("journal_sync: ").size()));
        }
    } else if (key == "journal_sync_interval_ms") c.journal_sync_interval_ms = milliseconds(r, 1);
    else if (key == "publish_high_water_mark") c.publish_high_water_mark = high_water_mark(r);
    else if (key == "ingest_high_water_mark") c.ingest_high_water_mark = high_water_mark(r);
    else if (key == "params_file") c.params_file = r.text();
    else if (key == "shard") {
        c.shard = r.text();
        try {
            protocol::parse_shard_spec(c.shard);
        } catch (const std::invalid_argument& e) {
            r.fail(e.what());
        }
    }
    else if (key == "curve_secret_key_file") c.curve_secret_key_file = r.text();
    else if (key == "curve_allowed_keys_file") c.curve_allowed_keys_file = r.text();
    else if (key == "curve_publish") c.curve_publish = r.flag();
    else if (key == "log_level") {
        c.log_level = r.text();
        static constexpr std::string_view kLevels[] = {"trace", "debug", "info", "warn", "error", "off"};
        bool known = false;
        for (auto level : kLevels) known = known || level == c.log_level;
        if (!known) r.fail("must be one of trace, debug, info, warn, error, off");
    } else {
        r.fail("unknown key");
    }
}

}  // namespace

ServiceConfig parse_service_config(const std::string& json_text, const std::string& origin) {
    simdjson::dom::parser parser;
    element doc;
    if (auto error = parser.parse(json_text).get(doc); error != simdjson::SUCCESS) {
        throw ConfigError(fmt::format("{}: not valid JSON: {}", origin, simdjson::error_message(error)));
    }
    simdjson::dom::object object;
    if (doc.get_object().get(object) != simdjson::SUCCESS) {
        throw ConfigError(fmt::format("{}: must hold one JSON object", origin));
    }
    ServiceConfig config;
    for (auto field : object) {
        const std::string key(field.key);
        apply_key(config, field.key, KeyReader(origin, key, field.value));
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
        throw ConfigError("curve_allowed_keys_file: needs curve_secret_key_file (the server key) too");
    }
    if (c.curve_enabled() && c.curve_allowed_keys_file.empty()) {
        throw ConfigError("curve_allowed_keys_file: required when CURVE is on (no feed could connect)");
    }
    if (c.curve_publish && !c.curve_enabled()) {
        throw ConfigError("curve_publish: needs curve_secret_key_file (the server key) too");
    }
    // Two sockets cannot bind one fixed endpoint ("*" ports are distinct by construction).
    const auto clash = [](const std::string& a, const std::string& b) {
        return a == b && a.find('*') == std::string::npos;
    };
    if (clash(c.ingest_endpoint, c.publish_endpoint) || clash(c.ingest_endpoint, c.snapshot_endpoint) ||
        clash(c.publish_endpoint, c.snapshot_endpoint)) {
        throw ConfigError("snapshot_endpoint: ingest, publish and snapshot need three different endpoints");
    }
}

}  // namespace liveprob::service
