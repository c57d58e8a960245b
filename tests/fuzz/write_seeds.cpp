// Writes the committed seed corpora of the decoding fuzz targets from the sample of every
// inbound kind: encoded FlatBuffers messages (feed_decode/) and JSON lines (json_feed/).
// Re-run after a schema change:
//   build/release/tests/fuzz/fuzz_write_seeds tests/fuzz/corpus
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "sample_messages.hpp"

namespace {
void write_file(const std::filesystem::path& path, const void* data, std::size_t size) {
    std::ofstream(path, std::ios::binary)
        .write(static_cast<const char*>(data), static_cast<std::streamsize>(size));
}
}  // namespace

int main(int argc, char** argv) {
    if (argc != 2) {
        std::fprintf(stderr, "usage: fuzz_write_seeds CORPUS-DIR\n");
        return 2;
    }
    const std::filesystem::path root(argv[1]);
    std::filesystem::create_directories(root / "feed_decode");
    std::filesystem::create_directories(root / "json_feed");
    int n = 0;
    for (const auto& message : liveprob::test::sample_messages()) {
        char name[64];
        std::snprintf(name, sizeof name, "seed-%02d-%s", n++,
                      liveprob::core::kind_name(message.body));
        const auto bytes = liveprob::protocol::encode_feed_message(message);
        write_file(root / "feed_decode" / name, bytes.data(), bytes.size());
        const std::string line = liveprob::protocol::to_json_line(message);
        write_file(root / "json_feed" / name, line.data(), line.size());
    }
    std::printf("wrote %d seeds per target under %s\n", n, root.c_str());
    return 0;
}
