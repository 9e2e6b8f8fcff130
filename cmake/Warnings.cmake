# Warnings for our own targets only, through one interface target.
add_library(coilwright_warnings INTERFACE)
target_compile_options(coilwright_warnings INTERFACE -Wall -Wextra -Wpedantic -Wshadow)
if(COILWRIGHT_WERROR)
  target_compile_options(coilwright_warnings INTERFACE -Werror)
endif()
