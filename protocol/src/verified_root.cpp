#include "verified_root.hpp"

#include <cstring>
#include <vector>

#include <fmt/format.h>

namespace liveprob::protocol::detail {

namespace {

// "LPF1" as it stands, or with bytes outside printable ASCII shown as \xNN.
std::string printable_identifier(std::span<const std::uint8_t> four) {
    std::string out;
    for (std::uint8_t c : four) {
        if (c >= 0x20 && c < 0x7f) {
            out.push_back(static_cast<char>(c));
        } else {
            out += fmt::format("\\x{:02x}", c);
        }
    }
    return out;
}

}  // namespace

std::string error_detail(DecodeError error, const std::string& text) {
    return fmt::format("{}: {}", decode_error_name(error), text);
}

std::string schema_version_detail(std::uint16_t major) {
    return error_detail(
        DecodeError::wrong_schema_version,
        fmt::format("schema major version {}, this build reads {}", major, kSchemaMajor));
}

DecodeError check_envelope(std::span<const std::uint8_t>& bytes, const EnvelopeLimits& limits,
                           std::string& detail) {
    if (bytes.size() > limits.max_bytes) {
        detail = error_detail(DecodeError::oversize,
                              fmt::format("{} bytes, limit {}", bytes.size(), limits.max_bytes));
        return DecodeError::oversize;
    }
    constexpr std::size_t kHeaderBytes =
        sizeof(flatbuffers::uoffset_t) + flatbuffers::kFileIdentifierLength;
    if (bytes.size() < kHeaderBytes) {
        detail = error_detail(
            DecodeError::too_small,
            fmt::format("{} bytes, a buffer needs at least {}", bytes.size(), kHeaderBytes));
        return DecodeError::too_small;
    }
    const auto id =
        bytes.subspan(sizeof(flatbuffers::uoffset_t), flatbuffers::kFileIdentifierLength);
    if (std::memcmp(id.data(), limits.identifier, id.size()) != 0) {
        detail = error_detail(
            DecodeError::wrong_identifier,
            fmt::format("expected '{}', got '{}'", limits.identifier, printable_identifier(id)));
        return DecodeError::wrong_identifier;
    }
    constexpr std::uintptr_t kAlign = alignof(std::uint64_t);
    if (reinterpret_cast<std::uintptr_t>(bytes.data()) % kAlign != 0) {
        thread_local std::vector<std::uint64_t> aligned;  // grows to the largest frame, then stays
        aligned.resize((bytes.size() + sizeof(std::uint64_t) - 1) / sizeof(std::uint64_t));
        std::memcpy(aligned.data(), bytes.data(), bytes.size());
        bytes = {reinterpret_cast<const std::uint8_t*>(aligned.data()), bytes.size()};
    }
    return DecodeError::none;
}

}  // namespace liveprob::protocol::detail
