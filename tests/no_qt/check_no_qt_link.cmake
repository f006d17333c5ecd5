# SPDX-License-Identifier: MIT
# cmake -DITEMS="a|b|c" -P check_no_qt_link.cmake : fails if any link item is a Qt target or library.
string(REPLACE "|" ";" items "${ITEMS}")
list(LENGTH items n)
set(bad "")
foreach(i IN LISTS items)
  if(i MATCHES "(^|[/:])(Qt[0-9]*|lib[Qq]t[0-9]*)" OR i MATCHES "[Qq]t[56]?::")
    list(APPEND bad "${i}")
  endif()
endforeach()
if(bad)
  message(FATAL_ERROR "Qt in the link interface of the core libraries: ${bad}")
endif()
message(STATUS "${n} link items, none of them Qt: ${items}")
