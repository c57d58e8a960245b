// Counts every heap allocation of the allocation tests' program (tests/allocation/): its
// heap_allocation_counter.cpp replaces the global allocation functions for that one program.
// Read `heap_allocations()` before and after the code under test.
#pragma once

#include <atomic>

namespace liveprob::test {
inline std::atomic<long> g_heap_allocations{0};
inline long heap_allocations() noexcept {
    return g_heap_allocations.load(std::memory_order_relaxed);
}
}  // namespace liveprob::test
