// Writes the committed seed corpus of the feed-decoding fuzz target: one encoded FlatBuffers
// message per sample of every inbound kind. Re-run after a schema change:
//   build/release/tests/fuzz/fuzz_write_seeds tests/fuzz/corpus/feed_decode
#include <cstdio>
#include <filesystem>
#include <fstream>

#include "liveprob/protocol/feed_codec.hpp"
#include "sample_messages.hpp"

int main(int argc, char** argv) {
    if (argc != 2) {
        std::fprintf(stderr, "usage: fuzz_write_seeds DIR\n");
        return 2;
    }
    const std::filesystem::path dir(argv[1]);
    std::filesystem::create_directories(dir);
    int n = 0;
    for (const auto& message : liveprob::test::sample_messages()) {
        const auto bytes = liveprob::protocol::encode_feed_message(message);
        char name[64];
        std::snprintf(name, sizeof name, "seed-%02d-%s", n++, liveprob::kind_name(message.body));
        std::ofstream(dir / name, std::ios::binary)
            .write(reinterpret_cast<const char*>(bytes.data()), static_cast<std::streamsize>(bytes.size()));
    }
    std::printf("wrote %d seeds to %s\n", n, dir.c_str());
    return 0;
}
