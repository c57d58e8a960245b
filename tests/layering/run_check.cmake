# cmake -DTREE=<fixture tree> -DEXPECT=pass|fail [-DEXPECT_LINES=a;b] -DCHECK=<CheckLayers.cmake> -P run_check.cmake
# Runs the layering check on a fixture tree and checks its verdict and, for a failure, that
# every expected line is named in its report.
execute_process(COMMAND ${CMAKE_COMMAND} -DSOURCE_DIR=${TREE} -P ${CHECK}
                RESULT_VARIABLE result OUTPUT_VARIABLE out ERROR_VARIABLE err)
set(report "${out}${err}")
if(EXPECT STREQUAL "pass" AND NOT result EQUAL 0)
  message(FATAL_ERROR "the check refused a tree the table allows:\n${report}")
endif()
if(EXPECT STREQUAL "fail")
  if(result EQUAL 0)
    message(FATAL_ERROR "the check passed a tree with forbidden includes")
  endif()
  foreach(line IN LISTS EXPECT_LINES)
    string(FIND "${report}" "${line}" at)
    if(at EQUAL -1)
      message(FATAL_ERROR "the check's report does not name '${line}':\n${report}")
    endif()
  endforeach()
endif()
