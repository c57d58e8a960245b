# Warnings on, and errors, for the project's own targets only (never for dependencies).
# -Wnull-dereference is left out: GCC 12 reports false positives from inlined Eigen code at -O3.
function(liveprob_warnings target)
  target_compile_options(${target} PRIVATE
    -Wall -Wextra -Wpedantic -Wshadow -Wconversion -Wsign-conversion -Wnon-virtual-dtor
    -Wold-style-cast -Woverloaded-virtual -Wdouble-promotion -Wformat=2
    -Wimplicit-fallthrough)
  if(LIVEPROB_WERROR)
    target_compile_options(${target} PRIVATE -Werror)
  endif()
endfunction()
