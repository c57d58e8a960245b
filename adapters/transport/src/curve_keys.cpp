#include "liveprob/transport/curve_keys.hpp"

#include <fmt/format.h>
#include <zmq.h>

#include <sys/stat.h>
#include <filesystem>
#include <fstream>
#include <sstream>

namespace liveprob::transport {

namespace {

std::string trim(const std::string& s) {
    const auto begin = s.find_first_not_of(" \t\r\n");
    if (begin == std::string::npos) return "";
    const auto end = s.find_last_not_of(" \t\r\n");
    return s.substr(begin, end - begin + 1);
}

void write_new_file(const std::filesystem::path& path, const std::string& text, mode_t mode) {
    if (std::filesystem::exists(path)) {
        throw KeyFileError(fmt::format(
            "{}: already exists (remove it first; keys are never overwritten)", path.string()));
    }
    {
        std::ofstream out(path, std::ios::binary);
        if (!out) throw KeyFileError(fmt::format("{}: cannot create", path.string()));
        out << text << '\n';
        if (!out) throw KeyFileError(fmt::format("{}: write failed", path.string()));
    }
    if (::chmod(path.c_str(), mode) != 0) {
        throw KeyFileError(fmt::format("{}: cannot set permissions", path.string()));
    }
}

}  // namespace

CurveKeyPair generate_curve_key_pair() {
    std::array<char, kZ85KeyLength + 1> pub{};
    std::array<char, kZ85KeyLength + 1> sec{};
    if (zmq_curve_keypair(pub.data(), sec.data()) != 0) {
        throw KeyFileError("this ZeroMQ library was built without CURVE support");
    }
    return {std::string(pub.data(), kZ85KeyLength), std::string(sec.data(), kZ85KeyLength)};
}

std::string public_key_of(const std::string& secret_z85) {
    decode_z85_key(secret_z85, "secret key");
    std::array<char, kZ85KeyLength + 1> pub{};
    if (zmq_curve_public(pub.data(), secret_z85.c_str()) != 0) {
        throw KeyFileError("cannot derive the public key (ZeroMQ without CURVE support?)");
    }
    return std::string(pub.data(), kZ85KeyLength);
}

void write_key_pair(const CurveKeyPair& pair, const std::string& directory,
                    const std::string& name) {
    const std::filesystem::path dir(directory);
    if (!std::filesystem::is_directory(dir))
        throw KeyFileError(fmt::format("{}: not a directory", directory));
    // The secret first, so a refusal to overwrite never leaves a public key without its secret.
    write_new_file(dir / (name + ".secret"), pair.secret_z85, S_IRUSR | S_IWUSR);
    write_new_file(dir / (name + ".public"), pair.public_z85,
                   S_IRUSR | S_IWUSR | S_IRGRP | S_IROTH);
}

RawKey decode_z85_key(const std::string& z85, const std::string& what) {
    if (z85.size() != kZ85KeyLength) {
        throw KeyFileError(
            fmt::format("{}: must be {} Z85 characters, got {}", what, kZ85KeyLength, z85.size()));
    }
    RawKey raw{};
    if (zmq_z85_decode(raw.data(), z85.c_str()) == nullptr) {
        throw KeyFileError(fmt::format("{}: not valid Z85 text", what));
    }
    return raw;
}

std::string read_key_file(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw KeyFileError(fmt::format("{}: cannot open the key file", path));
    std::string line;
    std::getline(in, line);
    const std::string key = trim(line);
    decode_z85_key(key, path);
    return key;
}

std::set<RawKey> read_allow_list(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw KeyFileError(fmt::format("{}: cannot open the allow-list", path));
    std::set<RawKey> keys;
    std::string line;
    int number = 0;
    while (std::getline(in, line)) {
        ++number;
        const std::string text = trim(line);
        if (text.empty() || text.front() == '#') continue;
        const std::string key = text.substr(0, text.find_first_of(" \t"));
        keys.insert(decode_z85_key(key, fmt::format("{} line {}", path, number)));
    }
    return keys;
}

}  // namespace liveprob::transport
