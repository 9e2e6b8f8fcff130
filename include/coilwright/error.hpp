#pragma once
// Typed errors, caught once in main and mapped to documented exit codes.
#include <cstddef>
#include <stdexcept>
#include <string>

namespace coilwright {

// Where in an input file something was found; line and column count from 1, 0 = unknown.
struct SourceLocation {
  std::string file;
  std::size_t line = 0;
  std::size_t column = 0;
  // "file:line:column" (parts that are unknown are left out).
  [[nodiscard]] std::string str() const;
};

// Bad input from the user: a config, a CSV, a command line. Exit code 2.
class InputError : public std::runtime_error {
 public:
  InputError(SourceLocation where, std::string key, std::string message);
  explicit InputError(std::string message);  // no location (e.g. command-line values)
  [[nodiscard]] const SourceLocation& where() const noexcept { return where_; }
  [[nodiscard]] const std::string& key() const noexcept { return key_; }

 private:
  SourceLocation where_;
  std::string key_;
};

// The computation cannot honour a request (e.g. a point inside a winding). Exit code 2 as well:
// the input asked for something that has no finite answer.
class DomainError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Writing results failed (unwritable folder, full disk). Exit code 3.
class OutputError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// The user stopped a run (Ctrl-C, SIGTERM) after the best results so far were written. Exit code 130.
class Interrupted : public std::runtime_error {
 public:
  Interrupted() : std::runtime_error("stopped by a signal; the best results found so far were written") {}
};

namespace exit_code {
inline constexpr int ok = 0;
inline constexpr int internal = 1;    // a bug: please report
inline constexpr int bad_input = 2;   // InputError, DomainError, bad command line
inline constexpr int output = 3;      // OutputError
inline constexpr int interrupted = 130;  // stopped by Ctrl-C/SIGTERM after writing what was found
}  // namespace exit_code

}  // namespace coilwright
