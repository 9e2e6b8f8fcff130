// Heat: steady temperature with resistance rising as the winding warms; insulation classes;
// electrical figures and supply limits.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "coilwright/electrical.hpp"
#include "coilwright/model.hpp"
#include "coilwright/supply.hpp"
#include "coilwright/thermal.hpp"

using namespace coilwright;
using Catch::Matchers::Contains;

namespace {
constexpr double kT20 = 293.15;
double r_at(const ThermalWinding& w, double T) { return w.resistance_20C_ohm * (1 + w.alpha_per_K * (T - kT20)); }
}  // namespace

TEST_CASE("constant current: the steady rise balances I^2 R(T) against h A dT", "[thermal]") {
  const std::vector<ThermalWinding> w{{2.0, 0.00393, 0.5}, {1.0, 0.00393, 0.2}};
  for (double ambient : {kT20, 273.15 + 35.0}) {
    const CircuitThermal t = steady_constant_current(w, 0.6, ambient);
    REQUIRE_FALSE(t.runaway);
    for (std::size_t k = 0; k < w.size(); ++k) {
      // Energy balance at the steady temperature (definition of the model), to rounding.
      CHECK(w[k].conductance_W_per_K * t.rise_K[k] == Approx(0.36 * r_at(w[k], ambient + t.rise_K[k])).epsilon(1e-12));
    }
    CHECK(t.voltage_V == Approx(0.6 * (r_at(w[0], ambient + t.rise_K[0]) + r_at(w[1], ambient + t.rise_K[1]))).epsilon(1e-12));
    CHECK(t.change > 0.0);  // the supply voltage must rise as the windings warm
  }
  // Hand value: R20 = 1 ohm, hA = 0.5 W/K, 1 A at 20 degC: dT = 1/(0.5 - 0.00393) = 2.015843 K.
  const std::vector<ThermalWinding> one{{1.0, 0.00393, 0.5}};
  CHECK(steady_constant_current(one, 1.0, kT20).rise_K[0] == Approx(1.0 / (0.5 - 0.00393)).epsilon(1e-13));
}

TEST_CASE("constant current beyond the cooling gives thermal runaway", "[thermal]") {
  // hA = 0.003 W/K < I^2 R alpha = 1 x 1 x 0.00393: no steady state.
  const std::vector<ThermalWinding> w{{1.0, 0.00393, 0.003}};
  const CircuitThermal t = steady_constant_current(w, 1.0, kT20);
  CHECK(t.runaway);
  CHECK(std::isinf(t.rise_K[0]));
}

TEST_CASE("constant voltage: the current and field fall as the winding warms", "[thermal]") {
  const std::vector<ThermalWinding> w{{2.0, 0.00393, 0.05}, {2.0, 0.00393, 0.08}};
  const double ambient = 273.15 + 25.0;
  const CircuitThermal t = steady_constant_voltage(w, 1.5, ambient);
  const double v = 1.5 * (r_at(w[0], ambient) + r_at(w[1], ambient));
  CHECK(t.voltage_V == Approx(v).epsilon(1e-14));
  CHECK(t.current_A < 1.5);
  CHECK(t.current_A * (r_at(w[0], ambient + t.rise_K[0]) + r_at(w[1], ambient + t.rise_K[1])) == Approx(v).epsilon(1e-11));
  for (std::size_t k = 0; k < w.size(); ++k)
    CHECK(w[k].conductance_W_per_K * t.rise_K[k] ==
          Approx(t.current_A * t.current_A * r_at(w[k], ambient + t.rise_K[k])).epsilon(1e-10));
  CHECK(t.change == Approx(1.0 - t.current_A / 1.5).epsilon(1e-14));
  // Even where constant current would run away, constant voltage settles.
  const std::vector<ThermalWinding> weak{{1.0, 0.00393, 0.003}};
  const CircuitThermal s = steady_constant_voltage(weak, 1.0, kT20);
  CHECK(std::isfinite(s.rise_K[0]));
  CHECK(s.current_A < 1.0);
}

TEST_CASE("IEC 60085 thermal classes parse by number and letter", "[thermal]") {
  CHECK(thermal_class_from_string("F")->limit_C == 155);
  CHECK(thermal_class_from_string("class B")->limit_C == 130);
  CHECK(thermal_class_from_string("155 (F)")->limit_C == 155);
  CHECK(thermal_class_from_string("180")->letter == "H");
  CHECK(thermal_class_from_string("250")->limit_C == 250);
  CHECK(thermal_class_from_string("105")->name() == "105 (A)");
  CHECK_FALSE(thermal_class_from_string("X").has_value());
  CHECK_FALSE(thermal_class_from_string("150").has_value());
  CHECK(thermal_classes().size() == 8);
}

TEST_CASE("wire length, resistance and mass of a winding", "[thermal]") {
  Coil c;
  c.name = "p";
  c.shape = Shape::pack;
  c.inner_radius_m = 0.05;
  c.outer_radius_m = 0.06;
  c.width_m = 0.02;
  c.turns = 100;
  const Wire w = awg_wire(20);
  const WindingPack p = wind(c, w);
  const ConductorFigures f = conductor_figures(p, w, 0.5);
  CHECK(f.wire_length_m == Approx(100 * p.mean_turn_length_m + 0.5).epsilon(1e-14));
  CHECK(f.resistance_20C_ohm == Approx(f.wire_length_m / 58e6 / w.conductor_area_m2()).epsilon(1e-14));
  CHECK(f.mass_kg == Approx(8890.0 * w.conductor_area_m2() * f.wire_length_m).epsilon(1e-14));
  // IEC 60028 correction to 75 degC.
  CHECK(f.resistance_at(273.15 + 75) == Approx(f.resistance_20C_ohm * 1.21615).epsilon(1e-12));
  const DriveFigures d = drive_figures(f, 2.0, kT20);
  CHECK(d.power_W == Approx(4.0 * f.resistance_20C_ohm).epsilon(1e-14));
  CHECK(d.current_density_A_m2 == Approx(2.0 / w.conductor_area_m2()).epsilon(1e-14));
}

TEST_CASE("supply checks name the broken limit and by how much", "[thermal][supply]") {
  Model m;
  Circuit main{"main", 6.0};
  main.supply = Supply{5.0, 10.0, std::nullopt};
  m.circuits = {main};
  Coil c;
  c.name = "p";
  c.circuit = "main";
  c.shape = Shape::pack;
  c.inner_radius_m = 0.05;
  c.outer_radius_m = 0.06;
  c.width_m = 0.02;
  c.turns = 100;
  c.wire = awg_wire(20);
  m.coils = {c};
  HardwareOptions o;
  const std::vector<double> I{6.0};
  const SupplyCheck s = check_supplies(m, I, o);
  REQUIRE_FALSE(s.ok());
  CHECK(s.violations[0].limit == "current");
  CHECK_THAT(s.violations[0].message, Contains("needs 6 A, the supply gives 5 A (20.0 % over)"));
  CHECK(s.worst_excess >= 0.2 - 1e-12);
  // At 1 A everything holds and the worst excess is the (negative) margin.
  const std::vector<double> small{1.0};
  const SupplyCheck ok = check_supplies(m, small, o);
  CHECK(ok.ok());
  CHECK(ok.worst_excess < 0.0);
  // Without a wire, voltage cannot be checked and says so.
  m.coils[0].wire.reset();
  CHECK_FALSE(check_supplies(m, small, o).unchecked.empty());
  // Turns that do not fit are a violation, not an exception, so a search can step away.
  m.coils[0].wire = awg_wire(20);
  m.coils[0].turns = 5000;
  const SupplyCheck bad = check_supplies(m, small, o);
  REQUIRE_FALSE(bad.ok());
  CHECK(bad.violations[0].limit == "winding");
}

TEST_CASE("the default hardware options are valid", "[thermal]") {
  HardwareOptions o;
  CHECK_NOTHROW(o.validate());
  o.insulation_class_C = 150;
  CHECK_THROWS_WITH(o.validate(), Contains("hardware.insulation_class = 150"));
}
