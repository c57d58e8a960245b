#include "championship_format.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <stdexcept>

namespace liveprob::datasets::detail {

using simdjson::dom::array;
using simdjson::dom::element;

std::vector<element> championship_matches(element root, const std::string& path) {
    std::vector<element> out;
    array list;
    if (root.get_array().get(list) == simdjson::SUCCESS ||
        root["matches"].get_array().get(list) == simdjson::SUCCESS) {
        for (element m : list) out.push_back(m);
        return out;
    }
    array rounds;
    if (root["rounds"].get_array().get(rounds) != simdjson::SUCCESS)
        throw std::runtime_error(
            fmt::format("{}: neither a \"rounds\" nor a \"matches\" array", path));
    for (element round : rounds) {
        array matches;
        if (round["matches"].get_array().get(matches) != simdjson::SUCCESS) continue;
        for (element m : matches) out.push_back(m);
    }
    return out;
}

bool looks_like_championship(element root) {
    return root.is_array() || root["rounds"].error() == simdjson::SUCCESS;
}

std::optional<std::string_view> side_name(element side) {
    std::string_view name;
    if (side.get_string().get(name) == simdjson::SUCCESS ||
        side["name"].get_string().get(name) == simdjson::SUCCESS) {
        return name;
    }
    return std::nullopt;
}

std::optional<std::array<int, 2>> score_pair(element score, const char* key) {
    array pair;
    if (score[key].get_array().get(pair) != simdjson::SUCCESS || pair.size() != 2)
        return std::nullopt;
    std::int64_t h = -1, a = -1;
    if (pair.at(0).get_int64().get(h) != simdjson::SUCCESS ||
        pair.at(1).get_int64().get(a) != simdjson::SUCCESS || h < 0 || a < 0 || h > 99 || a > 99) {
        return std::nullopt;
    }
    return std::array<int, 2>{static_cast<int>(h), static_cast<int>(a)};
}

namespace {

std::optional<int> whole(std::string_view s) {
    int v = 0;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc() || end != s.data() + s.size()) return std::nullopt;
    return v;
}

}  // namespace

std::optional<int> clock_time(std::string_view text) {
    if (text.size() != 5 || text[2] != ':') return std::nullopt;
    auto digit = [&](std::size_t i) {
        return text[i] >= '0' && text[i] <= '9' ? text[i] - '0' : -100;
    };
    const int h = digit(0) * 10 + digit(1), m = digit(3) * 10 + digit(4);
    if (h < 0 || h > 23 || m < 0 || m > 59) return std::nullopt;
    return h * 60 + m;
}

std::optional<GoalMinute> goal_minute(element goal) {
    GoalMinute g;
    std::int64_t number = 0;
    std::string_view text;
    if (goal["minute"].get_int64().get(number) == simdjson::SUCCESS) {
        g.minute = static_cast<int>(std::clamp<std::int64_t>(number, -1, 1000));
    } else if (goal["minute"].get_string().get(text) == simdjson::SUCCESS) {
        // "90+4": minute 90, four minutes into stoppage.
        const auto plus = text.find('+');
        const auto minute = whole(text.substr(0, plus));
        if (!minute) return std::nullopt;
        g.minute = *minute;
        if (plus != std::string_view::npos) {
            const auto added = whole(text.substr(plus + 1));
            if (!added) return std::nullopt;
            g.stoppage = *added;
        }
    } else {
        return std::nullopt;
    }
    if (goal["offset"].error() == simdjson::SUCCESS) {
        std::int64_t offset = 0;
        if (goal["offset"].get_int64().get(offset) != simdjson::SUCCESS) return std::nullopt;
        g.stoppage = static_cast<int>(std::clamp<std::int64_t>(offset, -1, 1000));
    }
    if (g.minute < 1 || g.minute > 130 || g.stoppage < 0 || g.stoppage > 30) return std::nullopt;
    return g;
}

}  // namespace liveprob::datasets::detail
