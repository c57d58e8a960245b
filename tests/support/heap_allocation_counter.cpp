// Replaces the global allocation functions of the allocation tests' program so that
// heap_allocation_counter.hpp can count them. Linked into that program only (tests/CMakeLists.txt):
// the other test programs keep the runtime's own, which the address sanitizer checks.
// Every replaceable form (plain, array, nothrow, sized) is one malloc/free pair: replacing only
// the plain form leaves the nothrow one to the runtime, and the address sanitizer then sees
// memory from its own `new` released by our `free` and rightly aborts.
#include "heap_allocation_counter.hpp"

#include <cstdlib>
#include <new>

// GCC sees malloc/free inside the replaced operators as a mismatch; they are the pair here.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmismatched-new-delete"
void* operator new(std::size_t size, const std::nothrow_t&) noexcept {
    liveprob::test::g_heap_allocations.fetch_add(1, std::memory_order_relaxed);
    return std::malloc(size == 0 ? 1 : size);
}
void* operator new(std::size_t size) {
    if (void* p = operator new(size, std::nothrow)) return p;
    throw std::bad_alloc();
}
void* operator new[](std::size_t size) { return operator new(size); }
void* operator new[](std::size_t size, const std::nothrow_t& tag) noexcept {
    return operator new(size, tag);
}
void operator delete(void* p) noexcept { std::free(p); }
void operator delete[](void* p) noexcept { std::free(p); }
void operator delete(void* p, std::size_t) noexcept { std::free(p); }
void operator delete[](void* p, std::size_t) noexcept { std::free(p); }
void operator delete(void* p, const std::nothrow_t&) noexcept { std::free(p); }
void operator delete[](void* p, const std::nothrow_t&) noexcept { std::free(p); }
#pragma GCC diagnostic pop
