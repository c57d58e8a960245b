# LIVEPROB_SANITIZE applies to everything built here, so that instrumented and plain code are
# never mixed in one binary.
if(LIVEPROB_SANITIZE)
  string(REPLACE "," ";" _san_list "${LIVEPROB_SANITIZE}")
  set(_san_flags "-fsanitize=${LIVEPROB_SANITIZE}" -fno-omit-frame-pointer -fno-sanitize-recover=all)
  add_compile_options(${_san_flags})
  add_link_options("-fsanitize=${LIVEPROB_SANITIZE}")
  # GCC's flow analysis sees through the sanitizers' instrumentation and reports
  # -Wmaybe-uninitialized where the plain build does not (in libstdc++'s <regex> and <functional>,
  # for one); the release build keeps the warning as an error.
  if(CMAKE_CXX_COMPILER_ID STREQUAL "GNU")
    add_compile_options(-Wno-maybe-uninitialized)
    # GCC warns that the thread sanitizer does not model std::atomic_thread_fence, which
    # Boost.Asio's handler completion uses (std_fenced_block). The warning is about possible
    # false reports, not a bug of ours; the handlers also pass through the scheduler's mutex,
    # which the sanitizer does see. Any report it makes still fails the stage.
    if("thread" IN_LIST _san_list)
      add_compile_options(-Wno-tsan)
    endif()
  endif()
  message(STATUS "liveprob: building with sanitizers ${LIVEPROB_SANITIZE}")
endif()

# Fuzz builds instrument every library for coverage; only the fuzz binaries link libFuzzer.
if(LIVEPROB_FUZZ)
  add_compile_options(-fsanitize=fuzzer-no-link)
endif()
