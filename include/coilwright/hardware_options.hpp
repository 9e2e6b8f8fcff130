#pragma once
// The settings of the hardware figures ([hardware] in a config) and a circuit's supply limits.
// Plain data, so the model can hold them.
#include <optional>
#include <string>

#include "coilwright/winding.hpp"

namespace coilwright {

// A circuit's power supply: any limit may be absent.
struct Supply {
  std::optional<double> max_current_A;  // [A], magnitude
  std::optional<double> max_voltage_V;  // [V], at the predicted steady winding temperature
  std::optional<double> max_power_W;    // [W], likewise
};

struct HardwareOptions {
  double ambient_temperature_K = 293.15;          // air around the windings (20 degC)
  std::optional<double> operating_temperature_K;  // winding temperature for the hot figures; absent = predicted
  double heat_transfer_W_m2K = 10.0;              // natural convection from a coil in still air (common practice: 5-15)
  int insulation_class_C = 155;                   // IEC 60085 class of the insulation: 105, 120, 130, 155, 180, 200, 220, 250
  double lead_allowance_m = 0.5;                  // wire added to each winding for its two leads
  double spare_fraction = 0.10;                   // extra wire in the bill of materials (0.10 = 10 %)
  Packing packing = Packing::layered;             // how round wire sits on the layer below
  std::optional<double> frequency_Hz;             // AC drive: reactance, impedance, resonance capacitor
  std::optional<double> ramp_rate_A_per_s;        // current ramp: voltage L dI/dt + I R
  double exposure_threshold_T = 0.5e-3;           // stray-field line for implant warnings (0.5 mT)
  // Throws InputError naming the field, its value and the rule broken.
  void validate() const;
};

// TOML for the design file, reading back to the same values: the inline table of a circuit's
// `supply = { ... }` and the body of the [hardware] table (key = value lines).
[[nodiscard]] std::string supply_toml(const Supply& s);
[[nodiscard]] std::string hardware_toml(const HardwareOptions& o);
// "10 A/s" (a current per second; also A/ms, kA/s) -> A/s; throws UnitParseError.
[[nodiscard]] double parse_ramp_rate(std::string_view text);

}  // namespace coilwright
