// Unit strings: "<number> <unit>" into SI.
// Conversion factors: SI prefixes and the gauss, inch, minute, degree and degree Celsius are
// exact by definition (BIPM, The International System of Units, 9th ed., 2019, tables 7 and 8;
// the inch as 25.4 mm by the international yard and pound agreement of 1959).
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <numbers>
#include <string>

#include "coilwright/units.hpp"

using coilwright::Dimension;
using coilwright::parse_quantity;
using coilwright::UnitParseError;

namespace {
// Conversions round once (a multiplication or division by an exact power of ten), so the value
// is the correctly rounded one: allow one unit in the last place, floor 1e-300 near zero.
constexpr double kRel = 2.3e-16;
bool close(double got, double want) { return std::abs(got - want) <= kRel * std::abs(want) + 1e-300; }
}  // namespace

TEST_CASE("units: the rule is <number> <unit>, converted to SI", "[units]") {
  struct Case {
    const char* text;
    Dimension dim;
    double si;
  };
  const Case cases[] = {
      {"250 mm", Dimension::length, 0.25},
      {"0.25 m", Dimension::length, 0.25},
      {"250mm", Dimension::length, 0.25},  // the space is optional
      {"  250   mm ", Dimension::length, 0.25},
      {"+3 cm", Dimension::length, 0.03},
      {"-5 um", Dimension::length, -5e-6},
      {"5 \xC2\xB5m", Dimension::length, 5e-6},  // micro sign
      {"5 \xCE\xBCm", Dimension::length, 5e-6},  // Greek mu
      {"1 in", Dimension::length, 0.0254},
      {"2 km", Dimension::length, 2000.0},
      {"1.5e-3 m", Dimension::length, 1.5e-3},
      {"12.5 A", Dimension::current, 12.5},
      {"3 mA", Dimension::current, 3e-3},
      {"200 uT", Dimension::flux_density, 200e-6},
      {"2 G", Dimension::flux_density, 2e-4},  // gauss = 1e-4 T
      {"50 nT", Dimension::flux_density, 50e-9},
      {"10 mT/m", Dimension::gradient, 10e-3},
      {"1 G/cm", Dimension::gradient, 1e-2},
      {"0.5 deg", Dimension::angle, 0.5 * std::numbers::pi / 180.0},
      {"20 degC", Dimension::temperature, 293.15},
      {"20 \xC2\xB0" "C", Dimension::temperature, 293.15},
      {"300 K", Dimension::temperature, 300.0},
      {"5 degC", Dimension::temperature_difference, 5.0},
      {"30 V", Dimension::voltage, 30.0},
      {"100 W", Dimension::power, 100.0},
      {"2 ohm", Dimension::resistance, 2.0},
      {"2 \xCE\xA9", Dimension::resistance, 2.0},  // Greek capital omega
      {"3 k\xE2\x84\xA6", Dimension::resistance, 3000.0},  // ohm sign
      {"1 mH", Dimension::inductance, 1e-3},
      {"50 Hz", Dimension::frequency, 50.0},
      {"2 s", Dimension::time, 2.0},
      {"10 min", Dimension::time, 600.0},
      {"0.1 %", Dimension::ratio, 1e-3},
      {"100 ppm", Dimension::ratio, 1e-4},
      {"0.25", Dimension::ratio, 0.25},  // a bare number is a ratio
      {"5 W/(m^2 K)", Dimension::heat_transfer, 5.0},
      {"5 W/m2K", Dimension::heat_transfer, 5.0},
      {"5 W/(m^2*K)", Dimension::heat_transfer, 5.0},
  };
  for (const auto& c : cases) {
    INFO(c.text);
    CHECK(close(parse_quantity(c.text, c.dim), c.si));
  }
}

TEST_CASE("units: SI values written with 17 digits read back bit for bit", "[units]") {
  for (double v : {0.1, 1.0 / 3.0, 6.02214076e23, 1e-300, -2.718281828459045}) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.17g m", v);
    CHECK(parse_quantity(buf, Dimension::length) == v);
  }
}

TEST_CASE("units: inputs that must fail, with messages naming what was found and accepted", "[units]") {
  const auto message = [](const char* text, Dimension d) {
    try {
      (void)parse_quantity(text, d);
    } catch (const UnitParseError& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  };
  // A bare number is only a ratio.
  CHECK_THAT(message("250", Dimension::length), Catch::Contains("has no unit") && Catch::Contains("mm"));
  // A unit of the wrong kind names both kinds and the accepted units.
  const std::string wrong = message("5 A", Dimension::length);
  CHECK_THAT(wrong, Catch::Contains("current") && Catch::Contains("length") && Catch::Contains("accepted units: m, mm"));
  CHECK_THAT(message("5 xyz", Dimension::length), Catch::Contains("unknown unit \"xyz\""));
  CHECK_THAT(message("nan m", Dimension::length), Catch::Contains("not a finite number"));
  CHECK_THAT(message("inf m", Dimension::length), Catch::Contains("not a finite number"));
  CHECK_THAT(message("1e999 m", Dimension::length), Catch::Contains("out of the range"));
  CHECK_THAT(message("", Dimension::length), Catch::Contains("empty value"));
  CHECK_THAT(message("mm", Dimension::length), Catch::Contains("does not start with a number"));
  CHECK_THAT(message("1,5 mm", Dimension::length), Catch::Contains("unknown unit"));
  CHECK_THAT(message("+-5 mm", Dimension::length), Catch::Contains("does not start with a number"));
  CHECK_THAT(message("5 MM", Dimension::length), Catch::Contains("unknown unit"));  // units are case-sensitive
  CHECK_THAT(message("20 degC", Dimension::length), Catch::Contains("temperature"));
  CHECK_THAT(message("1 T/m", Dimension::flux_density), Catch::Contains("field gradient"));
}

TEST_CASE("units: every dimension has a name, an SI unit and accepted units", "[units]") {
  for (int d = 0; d <= static_cast<int>(Dimension::heat_transfer); ++d) {
    const auto dim = static_cast<Dimension>(d);
    CHECK_FALSE(coilwright::dimension_name(dim).empty());
    CHECK_FALSE(coilwright::si_unit(dim).empty());
    CHECK_FALSE(coilwright::accepted_units(dim).empty());
  }
}
