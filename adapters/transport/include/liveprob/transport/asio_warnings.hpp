// Include first in every adapters source that uses Boost.Asio. GCC 12's -Wnull-dereference
// reports Asio 1.74's scheduler internals (thread_info casts inlined from scheduler.ipp), a
// false positive in code we do not own; every other warning stays an error.
#pragma once
#pragma GCC diagnostic ignored "-Wnull-dereference"
