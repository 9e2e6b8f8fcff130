// The TOML parser's own code, compiled into each fuzz executable so libFuzzer sees its coverage:
// Debian's toml++ is a prebuilt shared library, and the definitions here take precedence over it.
#include <cstdio>
#include <cstdlib>
#include <cstring>

namespace {

// toml++ 3.3.0 (Debian 12) asserts two preconditions that malformed text breaks: a table header
// such as "[[ (a]]" in parse_key() (upstream marzer/tomlplusplus PR #301) and a value missing in
// an array ("[1, 2],}") in parse_value(). Both are TOML_ASSERT_ASSUME, which the library Debian ships
// (gcc, NDEBUG) compiles to nothing; the parser then reports a syntax error and coilwright
// refuses the file with exit code 2 (tests/fuzz/regressions/config keeps both inputs). Every
// other assertion of the parser stays fatal.
void toml_assertion_failed(const char* expr, const char* file, int line) {
  if (std::strstr(expr, "is_bare_key_character(*cp) || is_string_delimiter(*cp)") ||
      std::strstr(expr, "!is_value_terminator(*cp)"))
    return;
  std::fprintf(stderr, "%s:%d: toml++ assertion failed: %s\n", file, line, expr);
  std::abort();
}

}  // namespace

#define TOML_ASSERT(expr) ((expr) ? static_cast<void>(0) : toml_assertion_failed(#expr, __FILE__, __LINE__))
#define TOML_IMPLEMENTATION
#include <toml++/toml.h>
