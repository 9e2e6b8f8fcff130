#pragma once
// Human-readable numbers for terminal output: an SI prefix chosen so 1 <= |mantissa| < 1000.
#include <cmath>
#include <string>
#include <string_view>

#include <fmt/format.h>

namespace coilwright::cli {

inline std::string with_prefix(double value, std::string_view unit, int digits = 6) {
  static constexpr struct { double scale; const char* prefix; } kPrefixes[] = {
      {1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1.0, ""}, {1e-3, "m"}, {1e-6, "u"}, {1e-9, "n"}, {1e-12, "p"}};
  if (value == 0.0 || !std::isfinite(value)) return fmt::format("{:.{}g} {}", value, digits, unit);
  for (const auto& p : kPrefixes)
    if (std::abs(value) >= p.scale * 0.9999999) return fmt::format("{:.{}g} {}{}", value / p.scale, digits, p.prefix, unit);
  return fmt::format("{:.{}g} {}", value, digits, unit);
}

}  // namespace coilwright::cli
