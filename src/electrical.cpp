#include "coilwright/electrical.hpp"

#include <cmath>

namespace coilwright {

ConductorFigures conductor_figures(const WindingPack& pack, const Wire& wire, double lead_allowance_m) {
  ConductorFigures c;
  c.wire_length_m = pack.turns * pack.mean_turn_length_m + lead_allowance_m;
  c.conductor_area_m2 = wire.conductor_area_m2();
  c.resistance_20C_ohm = wire.resistance_per_m(kReferenceTemperatureK) * c.wire_length_m;
  c.mass_kg = wire.mass_per_m() * c.wire_length_m;
  c.alpha_per_K = wire.material.alpha_per_K;
  return c;
}

DriveFigures drive_figures(const ConductorFigures& c, double current_A, double temperature_K) {
  DriveFigures d;
  const double r = c.resistance_at(temperature_K);
  d.current_A = current_A;
  d.voltage_V = current_A * r;
  d.power_W = current_A * current_A * r;
  d.current_density_A_m2 = std::abs(current_A) / c.conductor_area_m2;
  return d;
}

}  // namespace coilwright
