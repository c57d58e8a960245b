// Reading and writing the model parameter file (layout documented in params_file.hpp).
#include "liveprob/files/params_file.hpp"
#include "liveprob/protocol/json_writer.hpp"
#include "liveprob/protocol/whole_file.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include "liveprob/core/validate.hpp"

#include <cmath>
#include <limits>
#include <string_view>
#include <vector>

namespace liveprob::files {
namespace {

constexpr std::string_view kKind = "liveprob-model-params";
constexpr int kVersion = 1;

// One number in the file: its section ("" for the top level), its key and where it lives in
// ModelParams. The range each must lie in is the engine's (core::validate_params), checked once
// the whole file is read, so a file this accepts the engine accepts.
struct NumberField {
    std::string_view section;
    std::string_view key;
    double& (*ref)(core::ModelParams&);
};

// Whole numbers are read within this before the engine's own limits apply.
constexpr int kWholeNumberBound = 1'000'000;

// clang-format off (it cannot tell the braces of a macro body)
#define LIVEPROB_FIELD(section, member)                                            \
    NumberField {                                                                  \
        section, #member, [](core::ModelParams& p) -> double& { return p.member; } \
    }
// clang-format on

// The file's keys are the member names of ModelParams, so the two cannot drift apart.
const std::vector<NumberField>& number_fields() {
    static const std::vector<NumberField> fields = {
        LIVEPROB_FIELD("timing", timing.first_half_start),
        LIVEPROB_FIELD("timing", timing.first_half_end),
        LIVEPROB_FIELD("timing", timing.second_half_start),
        LIVEPROB_FIELD("timing", timing.second_half_end),
        LIVEPROB_FIELD("timing", timing.stoppage_factor),
        LIVEPROB_FIELD("timing", timing.expected_stoppage_first),
        LIVEPROB_FIELD("timing", timing.expected_stoppage_second),
        LIVEPROB_FIELD("timing", timing.extra_time_factor),
        LIVEPROB_FIELD("timing", timing.expected_stoppage_extra),
        LIVEPROB_FIELD("score_state", score_state.leading),
        LIVEPROB_FIELD("score_state", score_state.level),
        LIVEPROB_FIELD("score_state", score_state.trailing),
        LIVEPROB_FIELD("red_cards", red_cards.own_per_card),
        LIVEPROB_FIELD("red_cards", red_cards.opponent_per_card),
        LIVEPROB_FIELD("shootout", shootout.conversion),
        LIVEPROB_FIELD("shootout", shootout.first_kicker_edge),
        LIVEPROB_FIELD("", xg_weight),
    };
    return fields;
}
#undef LIVEPROB_FIELD

// "timing.first_half_start" -> "first_half_start": the key inside its section.
std::string_view short_key(const NumberField& f) {
    const auto dot = f.key.find('.');
    return dot == std::string_view::npos ? f.key : f.key.substr(dot + 1);
}

double& number_in(core::ModelParams& p, const NumberField& f) { return f.ref(p); }

std::string dotted(std::string_view section, std::string_view key) {
    return section.empty() ? std::string(key) : fmt::format("{}.{}", section, key);
}

class Reader {
public:
    explicit Reader(std::string origin) : origin_(std::move(origin)) {}

    [[noreturn]] void fail(const std::string& key, const std::string& reason) const {
        throw ParamsFileError(fmt::format("{}: key '{}': {}", origin_, key, reason));
    }

    double number(simdjson::dom::element v, const std::string& key) const {
        double x = 0.0;
        if (v.get_double().get(x) != simdjson::SUCCESS) fail(key, "expected a number");
        if (!std::isfinite(x)) fail(key, fmt::format("must be finite, got {}", x));
        return x;
    }

    int integer(simdjson::dom::element v, const std::string& key, int lo = -kWholeNumberBound,
                int hi = kWholeNumberBound) const {
        int64_t x = 0;
        if (v.get_int64().get(x) != simdjson::SUCCESS) fail(key, "expected a whole number");
        if (x < lo || x > hi)
            fail(key, fmt::format("{} is outside the allowed range [{}, {}]", x, lo, hi));
        return static_cast<int>(x);
    }

    simdjson::dom::object object(simdjson::dom::element v, const std::string& key) const {
        simdjson::dom::object o;
        if (v.get_object().get(o) != simdjson::SUCCESS) fail(key, "expected an object");
        return o;
    }

    void section(core::ModelParams& p, std::string_view name, simdjson::dom::element v) const {
        for (auto [raw_key, value] : object(v, std::string(name))) {
            const std::string key = dotted(name, raw_key);
            if (name == "red_cards" && raw_key == "max_cards") {
                p.red_cards.max_cards = integer(value, key);
                continue;
            }
            const NumberField* field = find(name, raw_key);
            if (!field) fail(key, "unknown key");
            number_in(p, *field) = number(value, key);
        }
    }

    void notes(simdjson::dom::element v, bool strings) const {
        const std::string name = strings ? "notes" : "standard_errors";
        for (auto [raw_key, value] : object(v, name)) {
            const std::string key = dotted(name, raw_key);
            if (strings) {
                std::string_view s;
                if (value.get_string().get(s) != simdjson::SUCCESS) fail(key, "expected a string");
            } else {
                if (number(value, key) < 0.0) fail(key, "a standard error must not be negative");
            }
        }
    }

    static const NumberField* find(std::string_view section, std::string_view key) {
        for (const auto& f : number_fields())
            if (f.section == section && short_key(f) == key) return &f;
        return nullptr;
    }

private:
    std::string origin_;
};

}  // namespace

core::ModelParams parse_params_json(const std::string& text, const std::string& origin) {
    Reader reader(origin);
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    if (auto error = parser.parse(text).get(root); error != simdjson::SUCCESS)
        throw ParamsFileError(
            fmt::format("{}: not valid JSON: {}", origin, simdjson::error_message(error)));

    core::ModelParams p;
    bool saw_kind = false;
    for (auto [raw_key, value] : reader.object(root, "(top level)")) {
        const std::string key(raw_key);
        if (key == "kind") {
            std::string_view s;
            if (value.get_string().get(s) != simdjson::SUCCESS || s != kKind)
                reader.fail(key, fmt::format("expected \"{}\"", kKind));
            saw_kind = true;
        } else if (key == "version") {
            if (reader.integer(value, key, 0, 1000) != kVersion)
                reader.fail(key, fmt::format("this program reads version {}", kVersion));
        } else if (key == "timing" || key == "score_state" || key == "red_cards" ||
                   key == "shootout") {
            reader.section(p, key, value);
        } else if (key == "kappa") {
            std::string_view s;
            if (value.get_string().get(s) == simdjson::SUCCESS) {
                if (s != "infinity") reader.fail(key, "expected a positive number or \"infinity\"");
                p.kappa = std::numeric_limits<double>::infinity();
            } else {
                p.kappa = reader.number(value, key);
            }
        } else if (key == "quadrature_nodes") {
            p.quadrature_nodes = reader.integer(value, key);
        } else if (key == "notes" || key == "standard_errors") {
            reader.notes(value, key == "notes");
        } else if (const NumberField* f = Reader::find("", raw_key)) {
            number_in(p, *f) = reader.number(value, key);
        } else {
            reader.fail(key, "unknown key");
        }
    }
    if (!saw_kind) reader.fail("kind", fmt::format("missing; expected \"{}\"", kKind));
    if (const auto problem = core::validate_params(p)) reader.fail(problem->field, problem->reason);
    return p;
}

core::ModelParams load_params_file(const std::string& path) {
    std::string text;
    try {
        text = protocol::read_whole_file(path, "the parameter file");
    } catch (const std::runtime_error& e) {
        throw ParamsFileError(e.what());
    }
    return parse_params_json(text, path);
}

std::string params_to_json(const core::ModelParams& params, const ParamsFileNotes& notes) {
    core::ModelParams copy = params;
    std::string out;
    protocol::JsonWriter json(out, protocol::JsonLayout::indented);
    json.begin_object().member("kind", kKind).member("version", kVersion);
    std::string_view open_section;
    for (const auto& f : number_fields()) {
        if (f.section != open_section) {
            if (!open_section.empty()) json.end_object();
            if (!f.section.empty()) json.key(f.section).begin_object();
            open_section = f.section;
        }
        json.member(short_key(f), number_in(copy, f));
        if (f.section == "red_cards" && short_key(f) == "opponent_per_card") {
            json.member("max_cards", params.red_cards.max_cards);
        }
    }
    if (!open_section.empty()) json.end_object();
    if (std::isinf(params.kappa)) json.member("kappa", "infinity");
    else json.member("kappa", params.kappa);
    json.member("quadrature_nodes", params.quadrature_nodes);
    auto map_section = [&](std::string_view name, const auto& entries) {
        if (entries.empty()) return;
        json.key(name).begin_object();
        for (const auto& [k, v] : entries) json.member(k, v);
        json.end_object();
    };
    map_section("notes", notes.sources);
    map_section("standard_errors", notes.standard_errors);
    json.end_object();
    out.push_back('\n');
    return out;
}

void save_params_file(const core::ModelParams& params, const std::string& path,
                      const ParamsFileNotes& notes) {
    try {
        protocol::write_file_atomically(path, params_to_json(params, notes), "the parameter file");
    } catch (const std::runtime_error& e) {
        throw ParamsFileError(e.what());
    }
}

}  // namespace liveprob::files
