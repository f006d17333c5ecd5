# SPDX-License-Identifier: MIT
# cmake -DBINARIES="a|b" -P check_no_qt_ldd.cmake : fails if ldd lists a Qt library for a binary.
string(REPLACE "|" ";" bins "${BINARIES}")
foreach(b IN LISTS bins)
  execute_process(COMMAND ldd "${b}" OUTPUT_VARIABLE out RESULT_VARIABLE rc)
  if(NOT rc EQUAL 0)
    message(FATAL_ERROR "ldd ${b} failed")
  endif()
  if(out MATCHES "libQt[0-9]")
    message(FATAL_ERROR "${b} loads Qt:\n${out}")
  endif()
  message(STATUS "${b}: no Qt library")
endforeach()
