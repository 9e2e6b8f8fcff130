#pragma once
// Steady winding temperature from dissipated power and a cooling surface, with the resistance
// rising as the winding warms; insulation thermal classes. Pure: no I/O.
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace coilwright {

// IEC 60085 thermal classes: the highest continuous temperature [degC] the insulation is rated for.
struct ThermalClass {
  int limit_C;         // 105, 120, 130, 155, 180, 200, 220, 250
  std::string_view letter;  // "A", "E", "B", "F", "H", "N", "R", "" (250 has no letter)
  [[nodiscard]] double limit_K() const noexcept { return limit_C + 273.15; }
  [[nodiscard]] std::string name() const;  // "155 (F)"
};
[[nodiscard]] std::span<const ThermalClass> thermal_classes() noexcept;
// "155", "F", "class F", "155 (F)", "class 155" -> the class; nullopt otherwise.
[[nodiscard]] std::optional<ThermalClass> thermal_class_from_string(std::string_view s);

// One winding as the thermal model sees it.
struct ThermalWinding {
  double resistance_20C_ohm = 0.0;
  double alpha_per_K = 0.0;        // at 20 degC
  double conductance_W_per_K = 0.0;  // h x cooling area
};

// Steady state of windings in series. Each winding's mean temperature satisfies
// T = T_amb + I^2 R(T) / (h A), R(T) = R20 (1 + alpha (T - 20 degC)), which under a fixed current is
// linear in T: dT = I^2 R(T_amb) / (hA - I^2 R(T_amb) alpha'), alpha' = alpha / (1 + alpha (T_amb - 20)).
// No steady state (thermal runaway) when the denominator is not positive.
struct CircuitThermal {
  std::vector<double> rise_K;     // per winding, mean over the winding
  double current_A = 0.0;         // steady current
  double voltage_V = 0.0;         // steady voltage
  double cold_voltage_V = 0.0;    // I R at ambient (constant current) / the set voltage (constant voltage)
  double cold_current_A = 0.0;    // the current at switch-on
  bool runaway = false;           // no steady state: the winding heats without bound
  // Constant current: how much the supply voltage must rise, V_hot/V_cold - 1.
  // Constant voltage: how much the current and field fall, 1 - I_hot/I_cold.
  double change = 0.0;
};

// Constant-current drive at I (the design current).
[[nodiscard]] CircuitThermal steady_constant_current(std::span<const ThermalWinding> w, double current_A, double ambient_K);
// Constant-voltage drive set to give `cold_current_A` at ambient temperature; the current falls as
// the windings warm. Each winding's temperature in closed form for a given current; the current
// by bisection (I R_total(I) rises with I), to 1e-13 of the cold current.
[[nodiscard]] CircuitThermal steady_constant_voltage(std::span<const ThermalWinding> w, double cold_current_A,
                                                     double ambient_K);

}  // namespace coilwright
