#include "liveprob/monitoring/log_format.hpp"

#include <fmt/format.h>
#include <spdlog/pattern_formatter.h>
#include <spdlog/spdlog.h>

#include <memory>
#include <stdexcept>
#include <string>

#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::monitoring {

namespace {

// %* in the pattern: the message as a JSON string (the project's one JSON escaping).
class JsonMessage : public spdlog::custom_flag_formatter {
public:
    void format(const spdlog::details::log_msg& msg, const std::tm&,
                spdlog::memory_buf_t& dest) override {
        const std::string quoted =
            protocol::json_string(std::string_view(msg.payload.data(), msg.payload.size()));
        dest.append(quoted.data(), quoted.data() + quoted.size());
    }
    std::unique_ptr<custom_flag_formatter> clone() const override {
        return std::make_unique<JsonMessage>();
    }
};

}  // namespace

void use_log_format(std::string_view format) {
    if (format == "text") {
        spdlog::set_pattern("%+");
        return;
    }
    if (format != "json") {
        throw std::invalid_argument(
            fmt::format("log format must be text or json, got \"{}\"", format));
    }
    auto formatter = std::make_unique<spdlog::pattern_formatter>(spdlog::pattern_time_type::utc);
    formatter->add_flag<JsonMessage>('*').set_pattern(
        R"({"time":"%Y-%m-%dT%H:%M:%S.%fZ","level":"%l","message":%*})");
    spdlog::set_formatter(std::move(formatter));
}

}  // namespace liveprob::monitoring
