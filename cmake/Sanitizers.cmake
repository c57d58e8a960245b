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

# Sanitizer builds optimise only the libraries whose code the tests run hard (pricing, fits,
# decoders, scoring, imports): there -O1 keeps the tests quick. Everything else (sockets,
# service, gateway, the program's command line; test code is -O0 in every build) is compiled at
# -O0, where the instrumented template-heavy code (Asio, Beast, CLI11, spdlog) compiles several
# times faster: the cold sanitizer builds are most of CI's time.
set(LIVEPROB_SANITIZER_OPTIMISED_JOBS core fit protocol scoring backtest datasets)
function(liveprob_sanitizer_optimisation target job)
  if(LIVEPROB_SANITIZE AND NOT job IN_LIST LIVEPROB_SANITIZER_OPTIMISED_JOBS)
    target_compile_options(${target} PRIVATE -O0)
  endif()
endfunction()

# Fuzz builds (LIVEPROB_FUZZ, the asan preset) instrument for coverage the libraries the fuzz
# targets exercise (tests/fuzz/: the feed and JSON decoders, the event fold, the configuration
# and parameter files); only the fuzz binaries link libFuzzer.
set(LIVEPROB_FUZZED_JOBS core protocol files service)
function(liveprob_fuzz_coverage target job)
  if(LIVEPROB_FUZZ AND job IN_LIST LIVEPROB_FUZZED_JOBS)
    target_compile_options(${target} PRIVATE -fsanitize=fuzzer-no-link)
  endif()
endfunction()
