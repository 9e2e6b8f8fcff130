# Warnings for our own targets only, through one interface target.
add_library(coilwright_warnings INTERFACE)
target_compile_options(coilwright_warnings INTERFACE -Wall -Wextra -Wpedantic -Wshadow
  # GCC 12 reports std::string concatenation inside libstdc++ as overlapping memcpy at -O3
  # (a false positive: GCC bug 105651), so -Wrestrict is off rather than rewriting every '+'.
  # Clang has no such option (the sanitizer, fuzzing and TSan builds use clang).
  $<$<CXX_COMPILER_ID:GNU>:-Wno-restrict>)
if(COILWRIGHT_WERROR)
  target_compile_options(coilwright_warnings INTERFACE -Werror)
endif()
