#include "liveprob/protocol/crc32c.hpp"

#include <boost/crc.hpp>

namespace liveprob::protocol {

namespace {

// CRC-32C in Boost.CRC's terms: width 32, polynomial, initial remainder, final XOR, reflected
// input, reflected remainder.
using Crc32c = boost::crc_optimal<32, 0x1EDC6F41, 0xFFFFFFFF, 0xFFFFFFFF, true, true>;

}  // namespace

std::uint32_t crc32c(std::span<const std::uint8_t> bytes) noexcept {
    Crc32c crc;
    crc.process_bytes(bytes.data(), bytes.size());
    return crc.checksum();
}

std::uint32_t crc32c(std::span<const std::uint8_t> first,
                     std::span<const std::uint8_t> second) noexcept {
    Crc32c crc;
    crc.process_bytes(first.data(), first.size());
    crc.process_bytes(second.data(), second.size());
    return crc.checksum();
}

}  // namespace liveprob::protocol
