#include "coilwright/error.hpp"

#include <fmt/format.h>

namespace coilwright {

std::string SourceLocation::str() const {
  if (line == 0) return file;
  if (column == 0) return fmt::format("{}:{}", file, line);
  return fmt::format("{}:{}:{}", file, line, column);
}

namespace {
std::string compose(const SourceLocation& where, const std::string& key, const std::string& message) {
  const std::string at = where.str();
  if (at.empty() && key.empty()) return message;
  if (at.empty()) return fmt::format("key '{}': {}", key, message);
  if (key.empty()) return fmt::format("{}: {}", at, message);
  return fmt::format("{}: key '{}': {}", at, key, message);
}
}  // namespace

InputError::InputError(SourceLocation where, std::string key, std::string message)
    : std::runtime_error(compose(where, key, message)), where_(std::move(where)), key_(std::move(key)) {}

InputError::InputError(std::string message) : std::runtime_error(std::move(message)) {}

}  // namespace coilwright
