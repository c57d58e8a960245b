# LIVEPROB_SANITIZE applies to everything built here, so that instrumented and plain code are
# never mixed in one binary.
if(LIVEPROB_SANITIZE)
  string(REPLACE "," ";" _san_list "${LIVEPROB_SANITIZE}")
  set(_san_flags "-fsanitize=${LIVEPROB_SANITIZE}" -fno-omit-frame-pointer -fno-sanitize-recover=all)
  add_compile_options(${_san_flags})
  add_link_options("-fsanitize=${LIVEPROB_SANITIZE}")
  message(STATUS "liveprob: building with sanitizers ${LIVEPROB_SANITIZE}")
endif()

# Fuzz builds instrument every library for coverage; only the fuzz binaries link libFuzzer.
if(LIVEPROB_FUZZ)
  add_compile_options(-fsanitize=fuzzer-no-link)
endif()
