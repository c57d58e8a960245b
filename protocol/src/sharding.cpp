#include "liveprob/protocol/sharding.hpp"

#include <charconv>

namespace liveprob::protocol {

ShardSpec parse_shard_spec(const std::string& text) {
    const auto slash = text.find('/');
    auto bad = [&](const std::string& why) {
        return std::invalid_argument("shard '" + text + "': " + why + " (expected K/N, e.g. 0/3)");
    };
    if (slash == std::string::npos) throw bad("no '/'");
    ShardSpec spec;
    const char* begin = text.data();
    const char* mid = begin + slash;
    const char* end = begin + text.size();
    auto r1 = std::from_chars(begin, mid, spec.index);
    auto r2 = std::from_chars(mid + 1, end, spec.count);
    if (r1.ec != std::errc{} || r1.ptr != mid || r2.ec != std::errc{} || r2.ptr != end)
        throw bad("not two whole numbers");
    if (spec.count == 0 || spec.count > 1024) throw bad("N must be 1..1024");
    if (spec.index >= spec.count) throw bad("K must be below N");
    return spec;
}

}  // namespace liveprob::protocol
