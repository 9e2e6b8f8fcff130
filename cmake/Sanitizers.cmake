# Sanitizer and fuzzing builds (see DEVELOPERS.md, "Robustness"). Included before any target is
# defined, so the flags reach every target, the library as well as the tests.
set(COILWRIGHT_SANITIZE "" CACHE STRING
  "Sanitizers for every target, e.g. \"address,undefined\" or \"thread\" (empty: none)")
option(COILWRIGHT_FUZZ "Build the libFuzzer targets in tests/fuzz (clang only; ASan and UBSan on)" OFF)

if(COILWRIGHT_FUZZ)
  if(NOT CMAKE_CXX_COMPILER_ID STREQUAL "Clang")
    message(FATAL_ERROR "COILWRIGHT_FUZZ needs clang (libFuzzer), e.g. -DCMAKE_CXX_COMPILER=clang++; "
                        "found ${CMAKE_CXX_COMPILER_ID}")
  endif()
  if(COILWRIGHT_SANITIZE AND NOT COILWRIGHT_SANITIZE STREQUAL "address,undefined")
    message(FATAL_ERROR "COILWRIGHT_FUZZ builds with address,undefined; leave COILWRIGHT_SANITIZE empty "
                        "(found \"${COILWRIGHT_SANITIZE}\")")
  endif()
  set(COILWRIGHT_SANITIZE "address,undefined")
  # Coverage for the fuzzer in every object; only the fuzz executables link libFuzzer's main.
  add_compile_options(-fsanitize=fuzzer-no-link)
endif()

if(COILWRIGHT_SANITIZE)
  add_compile_options(-fsanitize=${COILWRIGHT_SANITIZE} -fno-omit-frame-pointer)
  add_link_options(-fsanitize=${COILWRIGHT_SANITIZE})
  if(COILWRIGHT_SANITIZE MATCHES "undefined")
    # Stop at the first report, so a test or fuzzer fails instead of printing and going on.
    add_compile_options(-fno-sanitize-recover=undefined)
  endif()
  # Bounds checks in the standard containers cost little next to a sanitizer. Tests that bound
  # memory use skip the bound (sanitizers keep freed memory in quarantine).
  add_compile_definitions(_GLIBCXX_ASSERTIONS COILWRIGHT_SANITIZED=1)
endif()
