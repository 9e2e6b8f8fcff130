#pragma once
// Physical quantities written as "<number> <unit>" strings ("250 mm", "12.5 A", "200 uT", "0.1 %").
#include <string>
#include <stdexcept>
#include <string_view>

namespace coilwright {

// The largest length any input may give [m]: 1000 km is far beyond any coil system, and squares
// and products of lengths in the field kernels stay finite far beyond it (1e305 m, a finite
// double, made every field NaN).
inline constexpr double kMaxLengthM = 1e6;

// The kinds of quantity a config may ask for. A unit of the wrong kind is an error.
enum class Dimension {
  length,        // m
  current,       // A
  flux_density,  // T (also G)
  gradient,      // T/m (also G/cm)
  angle,         // rad (also deg)
  voltage,       // V
  power,         // W
  resistance,    // ohm
  inductance,    // H
  temperature,   // K or degC, as an absolute temperature in kelvin
  temperature_difference,  // K (also degC as a difference)
  frequency,     // Hz
  time,          // s
  ratio,         // dimensionless: "%", "ppm", "ppb" or a bare number
  heat_transfer  // W/(m^2 K)
};

// The SI unit symbol for a dimension ("m", "T/m", ...), used in messages and headers.
[[nodiscard]] std::string_view si_unit(Dimension d) noexcept;
// A human name for a dimension ("length", "magnetic flux density", ...).
[[nodiscard]] std::string_view dimension_name(Dimension d) noexcept;
// The units accepted for a dimension, for error messages ("m, mm, cm, um, km, in, ft").
[[nodiscard]] std::string accepted_units(Dimension d);

// Parse "<number> <unit>" into SI. Throws UnitParseError on a malformed number, a missing or
// unknown unit, a unit of another dimension, or a non-finite value. A bare number is accepted
// only for Dimension::ratio.
[[nodiscard]] double parse_quantity(std::string_view text, Dimension expected);

class UnitParseError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

}  // namespace coilwright
