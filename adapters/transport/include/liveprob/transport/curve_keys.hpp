// CURVE key files. A key pair is two text files written by `liveprob keys`:
//   <name>.public  one line, the 40-character Z85 public key
//   <name>.secret  one line, the 40-character Z85 secret key (mode 0600)
// An allow-list is a text file of Z85 public keys, one per line; blank lines and lines starting
// with '#' are ignored, and anything after the key on a line is a free-form label.
#pragma once

#include <array>
#include <cstdint>
#include <set>
#include <stdexcept>
#include <string>

namespace liveprob::transport {

struct KeyFileError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

inline constexpr std::size_t kZ85KeyLength = 40;  // 32 bytes in Z85 text

struct CurveKeyPair {
    std::string public_z85;
    std::string secret_z85;
};

CurveKeyPair generate_curve_key_pair();
// The public key that belongs to a secret key.
std::string public_key_of(const std::string& secret_z85);

// Writes <directory>/<name>.public and <directory>/<name>.secret; refuses to overwrite.
void write_key_pair(const CurveKeyPair& pair, const std::string& directory,
                    const std::string& name);

// Reads a one-key file (.public or .secret); checks it is 40 valid Z85 characters.
std::string read_key_file(const std::string& path);

// The allowed public keys, as the 32 raw bytes ZAP hands over.
using RawKey = std::array<std::uint8_t, 32>;
std::set<RawKey> read_allow_list(const std::string& path);

// Z85 text → raw bytes; throws KeyFileError naming `what` when it is not a key.
RawKey decode_z85_key(const std::string& z85, const std::string& what);

}  // namespace liveprob::transport
