#include "coilwright/thermal.hpp"

#include <array>
#include <cctype>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "coilwright/wire.hpp"

namespace coilwright {

namespace {
constexpr std::array<ThermalClass, 8> kClasses{{
    {105, "A"}, {120, "E"}, {130, "B"}, {155, "F"}, {180, "H"}, {200, "N"}, {220, "R"}, {250, ""}}};

double resistance_at(const ThermalWinding& w, double T) {
  return w.resistance_20C_ohm * (1.0 + w.alpha_per_K * (T - kReferenceTemperatureK));
}

// Rise of one winding at current I; negative when there is no steady state.
double rise_at_current(const ThermalWinding& w, double I, double ambient_K) {
  const double r_amb = resistance_at(w, ambient_K);
  const double alpha_amb = w.alpha_per_K / (1.0 + w.alpha_per_K * (ambient_K - kReferenceTemperatureK));
  const double p = I * I * r_amb;
  const double denom = w.conductance_W_per_K - p * alpha_amb;
  return denom > 0.0 ? p / denom : -1.0;
}
}  // namespace

std::string ThermalClass::name() const {
  return letter.empty() ? std::to_string(limit_C) : fmt::format("{} ({})", limit_C, letter);
}

std::span<const ThermalClass> thermal_classes() noexcept { return kClasses; }

std::optional<ThermalClass> thermal_class_from_string(std::string_view s) {
  std::string t;
  for (char c : s)
    if (!std::isspace(static_cast<unsigned char>(c)) && c != '(' && c != ')') t += static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  if (t.starts_with("CLASS")) t = t.substr(5);
  for (const auto& c : kClasses) {
    const std::string num = std::to_string(c.limit_C);
    if (t == num || (!c.letter.empty() && (t == c.letter || t == num + std::string(c.letter)))) return c;
  }
  return std::nullopt;
}

CircuitThermal steady_constant_current(std::span<const ThermalWinding> w, double current_A, double ambient_K) {
  CircuitThermal t;
  t.current_A = t.cold_current_A = current_A;
  for (const auto& x : w) {
    const double rise = rise_at_current(x, current_A, ambient_K);
    if (rise < 0.0) t.runaway = true;
    t.rise_K.push_back(rise < 0.0 ? std::numeric_limits<double>::infinity() : rise);
    t.cold_voltage_V += current_A * resistance_at(x, ambient_K);
    t.voltage_V += current_A * resistance_at(x, ambient_K + t.rise_K.back());
  }
  t.change = t.cold_voltage_V != 0.0 ? t.voltage_V / t.cold_voltage_V - 1.0 : 0.0;
  return t;
}

CircuitThermal steady_constant_voltage(std::span<const ThermalWinding> w, double cold_current_A, double ambient_K) {
  double r_cold = 0.0;
  for (const auto& x : w) r_cold += resistance_at(x, ambient_K);
  const double v = cold_current_A * r_cold;
  CircuitThermal t;
  // I R_total(I) - V rises with I (R_total rises with I), is -V at I = 0 and >= 0 at the cold
  // current: bisection between them, to 1e-13 of the cold current.
  auto evaluate = [&](double current) {
    double r_hot = 0.0;
    t.rise_K.clear();
    for (const auto& x : w) {
      const double rise = rise_at_current(x, current, ambient_K);
      t.rise_K.push_back(rise < 0.0 ? std::numeric_limits<double>::infinity() : rise);
      r_hot += resistance_at(x, ambient_K + t.rise_K.back());
    }
    return std::abs(current) * r_hot - std::abs(v);
  };
  double lo = 0.0, hi = std::abs(cold_current_A);
  for (int it = 0; it < 200 && hi - lo > 1e-13 * std::abs(cold_current_A); ++it) {
    const double mid = 0.5 * (lo + hi);
    (evaluate(mid) < 0.0 ? lo : hi) = mid;
  }
  const double current = std::copysign(0.5 * (lo + hi), cold_current_A);
  evaluate(current);
  // Under constant voltage the power falls as R rises, so a steady state always exists.
  t.runaway = false;
  t.current_A = current;
  t.cold_current_A = cold_current_A;
  t.voltage_V = t.cold_voltage_V = v;
  t.change = cold_current_A != 0.0 ? 1.0 - current / cold_current_A : 0.0;
  return t;
}

}  // namespace coilwright
