#pragma once
// Wire length, resistance, mass and the drive figures of one winding. Pure: no I/O.
#include "coilwright/winding.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

struct ConductorFigures {
  double wire_length_m = 0.0;        // turns x mean turn length + lead allowance
  double resistance_20C_ohm = 0.0;   // DC, at 20 degC
  double mass_kg = 0.0;              // conductor only (the enamel adds a few per cent)
  double conductor_area_m2 = 0.0;    // of one wire
  double alpha_per_K = 0.0;          // temperature coefficient at 20 degC
  // DC resistance at an absolute temperature [K]: R20 (1 + alpha20 (T - 20 degC)) (IEC 60028).
  [[nodiscard]] double resistance_at(double temperature_K) const noexcept {
    return resistance_20C_ohm * (1.0 + alpha_per_K * (temperature_K - kReferenceTemperatureK));
  }
};

[[nodiscard]] ConductorFigures conductor_figures(const WindingPack& pack, const Wire& wire, double lead_allowance_m);

struct DriveFigures {
  double current_A = 0.0;
  double voltage_V = 0.0;             // I R(T)
  double power_W = 0.0;               // I^2 R(T)
  double current_density_A_m2 = 0.0;  // I / conductor area
};
[[nodiscard]] DriveFigures drive_figures(const ConductorFigures& c, double current_A, double temperature_K);

}  // namespace coilwright
