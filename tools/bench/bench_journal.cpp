// The journal's costs: appending a record (marker, length, CRC-32C, one write(2)) against
// appending the bare size-prefixed frame the journal wrote before it had checksums (the same
// write(2) per message), both to a file in the same folder with no fsync (sync policy `none`, so
// the figure is the format's and the system call's, not the disk's); CRC-32C alone on a goal
// message; and recovery: replaying a journal of 200,000 records against walking the same
// messages as bare frames.
// Run: liveprob_bench_journal --benchmark_repetitions=10 --benchmark_report_aggregates_only=true
// (LIVEPROB_BENCH_DIR sets the folder, default /tmp).
#include <benchmark/benchmark.h>

#include <fcntl.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

#include "liveprob/files/journal.hpp"
#include "liveprob/protocol/crc32c.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace {

using namespace liveprob;
namespace fs = std::filesystem;

constexpr int kRecoveryRecords = 200'000;

std::vector<std::uint8_t> goal_bytes() {
    core::InboundMessage m;
    m.header = {7, 12, 1'790'000'000'000'000, {core::Period::second_half, 4'032'000}};
    m.body = core::Goal{core::Side::home, true, false};
    return protocol::encode_feed_message(m);
}

fs::path scratch(const std::string& name) {
    const char* base = std::getenv("LIVEPROB_BENCH_DIR");
    const fs::path dir = fs::path(base ? base : "/tmp") / ("liveprob-bench-journal-" + name);
    fs::remove_all(dir);
    fs::create_directories(dir);
    return dir;
}

void append_bare_frame(benchmark::State& state) {
    const auto payload = goal_bytes();
    const auto dir = scratch("bare");
    const int fd = ::open((dir / "frames.lpf").c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
    std::vector<std::uint8_t> buffer;
    for (auto _ : state) {
        buffer.clear();
        protocol::append_frame(buffer, payload);
        if (::write(fd, buffer.data(), buffer.size()) < 0) state.SkipWithError("write failed");
    }
    ::close(fd);
    fs::remove_all(dir);
    state.SetItemsProcessed(state.iterations());
}

void append_journal_record(benchmark::State& state) {
    const auto payload = goal_bytes();
    const auto dir = scratch("records");
    {
        files::Journal journal(dir / "j", files::JournalSync::none, std::chrono::milliseconds(200));
        journal.replay([](std::span<const std::uint8_t>) {});
        for (auto _ : state) journal.append(payload);
    }
    fs::remove_all(dir);
    state.SetItemsProcessed(state.iterations());
}

void crc32c_goal(benchmark::State& state) {
    const auto payload = goal_bytes();
    for (auto _ : state) benchmark::DoNotOptimize(protocol::crc32c(payload));
    state.SetBytesProcessed(state.iterations() * static_cast<std::int64_t>(payload.size()));
}

void recover_bare_frames(benchmark::State& state) {
    const auto payload = goal_bytes();
    const auto dir = scratch("recover-bare");
    std::vector<std::uint8_t> stream;
    for (int i = 0; i < kRecoveryRecords; ++i) protocol::append_frame(stream, payload);
    protocol::write_file_atomically(dir / "frames.lpf", stream);
    for (auto _ : state) {
        const auto bytes = protocol::read_whole_file_bytes(dir / "frames.lpf");
        protocol::FrameCursor cursor(bytes);
        std::size_t n = 0;
        while (const auto f = cursor.next()) n += f->payload.size();
        benchmark::DoNotOptimize(n);
    }
    fs::remove_all(dir);
    state.SetItemsProcessed(state.iterations() * kRecoveryRecords);
}

void recover_journal(benchmark::State& state) {
    const auto payload = goal_bytes();
    const auto dir = scratch("recover-journal");
    {
        files::Journal journal(dir / "j", files::JournalSync::none, std::chrono::milliseconds(200));
        journal.replay([](std::span<const std::uint8_t>) {});
        for (int i = 0; i < kRecoveryRecords; ++i) journal.append(payload);
    }
    for (auto _ : state) {
        files::Journal journal(dir / "j", files::JournalSync::none, std::chrono::milliseconds(200));
        std::size_t n = 0;
        journal.replay([&](std::span<const std::uint8_t> r) { n += r.size(); });
        benchmark::DoNotOptimize(n);
    }
    fs::remove_all(dir);
    state.SetItemsProcessed(state.iterations() * kRecoveryRecords);
}

}  // namespace

BENCHMARK(append_bare_frame);
BENCHMARK(append_journal_record);
BENCHMARK(crc32c_goal);
BENCHMARK(recover_bare_frames)->Unit(benchmark::kMillisecond);
BENCHMARK(recover_journal)->Unit(benchmark::kMillisecond);
BENCHMARK_MAIN();
