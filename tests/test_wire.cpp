// Wire catalogue: ASTM B258 gauges, IEC 60028 copper, IEC 60317 nominal sizes, spec parsing.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "coilwright/error.hpp"
#include "coilwright/wire.hpp"

using namespace coilwright;
using Catch::Matchers::Contains;

namespace {
constexpr double kInch = 0.0254;
}

TEST_CASE("AWG diameters follow the ASTM B258 table", "[wire]") {
  // ASTM B258 table of nominal diameters in inches, tabulated to 0.0001 in (from memory); the
  // formula agrees to half a unit of the last tabulated digit.
  struct Row { int gauge; double inches; };
  const Row table[] = {{-3, 0.4600}, {0, 0.3249}, {10, 0.1019}, {14, 0.0641}, {20, 0.0320},
                       {24, 0.0201}, {30, 0.0100}, {36, 0.0050}, {40, 0.0031}};
  for (const auto& r : table) {
    INFO("AWG " << awg_name(r.gauge));
    CHECK(std::abs(awg_diameter_m(r.gauge) / kInch - r.inches) <= 0.5e-4 + 1e-12);
  }
  // The definition's anchors are exact: 0000 = 0.46 in, 36 = 0.005 in (ASTM B258).
  CHECK(awg_diameter_m(-3) == Approx(0.46 * kInch).epsilon(1e-12));
  CHECK(awg_diameter_m(36) == Approx(0.005 * kInch).epsilon(1e-14));
  CHECK_THROWS_AS(awg_diameter_m(57), InputError);
  CHECK_THROWS_AS(awg_diameter_m(-4), InputError);
}

TEST_CASE("annealed copper resistance per length matches the copper wire tables", "[wire]") {
  // Ohm per 1000 ft at 20 degC, NBS Handbook 100 "Copper Wire Tables" (1966), from memory; the
  // table gives four significant figures, so agreement to 0.05 % is what it can show.
  struct Row { int gauge; double ohm_per_kft; };
  const Row table[] = {{10, 0.9989}, {20, 10.15}, {30, 103.2}};
  for (const auto& r : table) {
    const Wire w = awg_wire(r.gauge);
    INFO("AWG " << r.gauge);
    CHECK(w.resistance_per_m(kReferenceTemperatureK) * 304.8 == Approx(r.ohm_per_kft).epsilon(5e-4));
  }
}

TEST_CASE("copper and aluminium follow their standards", "[wire]") {
  // IEC 60028: 1/58 ohm mm^2/m = 0.017241 ohm mm^2/m at 20 degC; 8.89 g/cm^3; alpha20 = 0.00393 /K.
  const Material cu = copper();
  CHECK(cu.resistivity_ohm_m * 1e6 == Approx(0.017241).margin(0.5e-6));  // 5 figures given
  CHECK(cu.density_kg_m3 == Approx(8890.0).epsilon(1e-12));
  // Temperature correction to 75 degC: factor 1 + 0.00393 x 55 = 1.21615 (IEC 60028 coefficient).
  CHECK(cu.resistivity_at(273.15 + 75.0) / cu.resistivity_ohm_m == Approx(1.21615).epsilon(1e-12));
  CHECK(cu.resistivity_at(kReferenceTemperatureK) / cu.resistivity_ohm_m == Approx(1.0).epsilon(1e-15));
  // IEC 60889 hard-drawn aluminium (from memory): 0.028264 ohm mm^2/m, 0.00403 /K, 2703 kg/m^3.
  const Material al = aluminium();
  CHECK(al.resistivity_ohm_m * 1e6 == Approx(0.028264).epsilon(1e-12));
  CHECK(al.alpha_per_K == Approx(0.00403).epsilon(1e-12));
  CHECK(al.density_kg_m3 == Approx(2703.0).epsilon(1e-12));
}

TEST_CASE("wire specs parse to the catalogue entries", "[wire]") {
  SECTION("AWG forms") {
    const Wire w = parse_wire("AWG 20");
    CHECK(w.form == WireForm::round);
    CHECK(w.bare_diameter_m == Approx(awg_diameter_m(20)).epsilon(1e-15));
    CHECK(w.grade == 2);
    CHECK(w.label == "AWG 20");
    CHECK(parse_wire("20 AWG").bare_diameter_m == Approx(w.bare_diameter_m).epsilon(1e-15));
    CHECK(parse_wire("AWG 4/0").bare_diameter_m == Approx(0.46 * kInch).epsilon(1e-12));
    CHECK(parse_wire("AWG 0000").bare_diameter_m == Approx(0.46 * kInch).epsilon(1e-12));
    CHECK(parse_wire("awg 1/0").bare_diameter_m == Approx(awg_diameter_m(0)).epsilon(1e-15));
    CHECK(parse_wire("AWG 56").bare_diameter_m == Approx(awg_diameter_m(56)).epsilon(1e-15));
  }
  SECTION("metric nominal diameters and grades") {
    const Wire g2 = parse_wire("0.8 mm");
    CHECK(g2.bare_diameter_m == Approx(0.8e-3).epsilon(1e-12));
    CHECK(g2.label == "0.8 mm");
    const Wire g1 = parse_wire("0.8 mm, grade 1");
    const Wire g3 = parse_wire("0.80 mm grade 3");
    CHECK(g1.outer_width_m() < g2.outer_width_m());
    CHECK(g2.outer_width_m() < g3.outer_width_m());
    CHECK(g1.label == "0.8 mm, grade 1");
    // Overall diameter within a few hundredths of a millimetre of the bare size (IEC 60317-0-1
    // increases for 0.8 mm are of order 0.05-0.1 mm, from memory).
    CHECK(g2.outer_width_m() - 0.8e-3 > 0.03e-3);
    CHECK(g2.outer_width_m() - 0.8e-3 < 0.12e-3);
  }
  SECTION("material") {
    const Wire w = parse_wire("AWG 10, aluminium");
    CHECK(w.material.name == "aluminium");
    CHECK(w.label == "AWG 10, aluminium");
    CHECK(parse_wire("1.0 mm copper").material.name == "copper");
  }
  SECTION("rectangular") {
    const Wire w = parse_wire("2.5 x 1.2 mm");
    CHECK(w.form == WireForm::rectangular);
    CHECK(w.bare_width_m == Approx(2.5e-3).epsilon(1e-12));
    CHECK(w.bare_thickness_m == Approx(1.2e-3).epsilon(1e-12));
    CHECK(w.conductor_area_m2() == Approx(3.0e-6).epsilon(1e-12));
  }
  SECTION("rejects what is not a wire") {
    CHECK_THROWS_WITH(parse_wire("0.7 mm"), Contains("0.670 mm or 0.710 mm"));
    CHECK_THROWS_WITH(parse_wire("AWG 57"), Contains("not an AWG gauge"));
    CHECK_THROWS_AS(parse_wire("AWG"), InputError);
    CHECK_THROWS_AS(parse_wire("0.8 A"), InputError);
    CHECK_THROWS_WITH(parse_wire("0.8 mm, grade 4"), Contains("grade"));
    CHECK_THROWS_AS(parse_wire(""), InputError);
  }
}

TEST_CASE("rounded corners reduce a rectangular conductor by (4 - pi) r^2", "[wire]") {
  const Wire w = rectangular_wire(4e-3, 2e-3, 0.5e-3, 0.05e-3);
  CHECK(w.conductor_area_m2() == Approx(8e-6 - (4.0 - M_PI) * 0.25e-6).epsilon(1e-12));
  CHECK(w.outer_width_m() == Approx(4.1e-3).epsilon(1e-12));
  CHECK_NOTHROW(w.validate());
  CHECK_THROWS_AS(rectangular_wire(4e-3, 2e-3, 1.5e-3, 0.0).validate(), InputError);
}
