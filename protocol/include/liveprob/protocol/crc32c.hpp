// CRC-32C (Castagnoli polynomial 0x1EDC6F41, reflected, initial and final value 0xFFFFFFFF):
// the checksum of every journal record. Computed by Boost.CRC; this header keeps Boost out of
// the callers. Check value of the nine bytes "123456789": 0xE3069283.
#pragma once

#include <cstdint>
#include <span>

namespace liveprob::protocol {

std::uint32_t crc32c(std::span<const std::uint8_t> bytes) noexcept;

// The CRC of `first` followed by `second`, without copying them together.
std::uint32_t crc32c(std::span<const std::uint8_t> first,
                     std::span<const std::uint8_t> second) noexcept;

}  // namespace liveprob::protocol
