#include "coilwright/hardware_options.hpp"

#include <cctype>
#include <cmath>
#include <string>

#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/thermal.hpp"
#include "coilwright/units.hpp"

namespace coilwright {

void HardwareOptions::validate() const {
  auto fail = [](std::string_view field, double v, std::string_view rule) {
    throw InputError(fmt::format("hardware.{} = {}: {}", field, v, rule));
  };
  if (!(ambient_temperature_K > 0.0 && ambient_temperature_K < 1000.0))
    fail("ambient_temperature", ambient_temperature_K, "must lie between 0 K and 1000 K");
  if (operating_temperature_K && !(*operating_temperature_K > 0.0 && *operating_temperature_K < 1000.0))
    fail("operating_temperature", *operating_temperature_K, "must lie between 0 K and 1000 K");
  if (!(heat_transfer_W_m2K > 0.0 && std::isfinite(heat_transfer_W_m2K)))
    fail("heat_transfer", heat_transfer_W_m2K, "must be positive (natural convection in air: about 5-15 W/(m^2 K))");
  bool known = false;
  for (const auto& c : thermal_classes()) known = known || c.limit_C == insulation_class_C;
  if (!known)
    fail("insulation_class", insulation_class_C, "must be an IEC 60085 class: 105, 120, 130, 155, 180, 200, 220 or 250");
  if (!(lead_allowance_m >= 0.0 && std::isfinite(lead_allowance_m))) fail("lead_allowance", lead_allowance_m, "must be zero or positive");
  if (!(spare_fraction >= 0.0 && spare_fraction <= 10.0)) fail("spare", spare_fraction, "must lie between 0 and 1000 %");
  if (frequency_Hz && !(*frequency_Hz > 0.0 && std::isfinite(*frequency_Hz))) fail("frequency", *frequency_Hz, "must be positive");
  if (ramp_rate_A_per_s && !(*ramp_rate_A_per_s > 0.0 && std::isfinite(*ramp_rate_A_per_s)))
    fail("ramp_rate", *ramp_rate_A_per_s, "must be positive");
  if (!(exposure_threshold_T > 0.0)) fail("exposure_threshold", exposure_threshold_T, "must be positive");
}

std::string supply_toml(const Supply& s) {
  std::string out;
  auto add = [&](std::string_view key, const std::optional<double>& v, std::string_view unit) {
    if (!v) return;
    out += fmt::format("{}{} = \"{:.17g} {}\"", out.empty() ? "" : ", ", key, *v, unit);
  };
  add("max_current", s.max_current_A, "A");
  add("max_voltage", s.max_voltage_V, "V");
  add("max_power", s.max_power_W, "W");
  return "{ " + out + " }";
}

std::string hardware_toml(const HardwareOptions& o) {
  std::string out;
  auto line = [&](std::string_view key, const std::string& value) { out += fmt::format("{} = {}\n", key, value); };
  auto q = [](double v, std::string_view unit) { return fmt::format("\"{:.17g} {}\"", v, unit); };
  line("ambient_temperature", q(o.ambient_temperature_K, "K"));
  if (o.operating_temperature_K) line("operating_temperature", q(*o.operating_temperature_K, "K"));
  line("heat_transfer", q(o.heat_transfer_W_m2K, "W/(m^2 K)"));
  line("insulation_class", fmt::format("\"{}\"", o.insulation_class_C));
  line("lead_allowance", q(o.lead_allowance_m, "m"));
  line("spare", fmt::format("\"{:.17g}\"", o.spare_fraction));
  line("packing", fmt::format("\"{}\"", to_string(o.packing)));
  if (o.frequency_Hz) line("frequency", q(*o.frequency_Hz, "Hz"));
  if (o.ramp_rate_A_per_s) line("ramp_rate", q(*o.ramp_rate_A_per_s, "A/s"));
  line("exposure_threshold", q(o.exposure_threshold_T, "T"));
  return out;
}

double parse_ramp_rate(std::string_view text) {
  std::string t(text);
  while (!t.empty() && std::isspace(static_cast<unsigned char>(t.back()))) t.pop_back();
  double per = 0.0;
  if (t.ends_with("/ms")) per = 1e3;
  else if (t.ends_with("/s")) per = 1.0;
  else throw UnitParseError(fmt::format("\"{}\": a ramp rate is a current per time, e.g. \"10 A/s\" or \"0.5 A/ms\"", text));
  const double amps = parse_quantity(std::string_view(t).substr(0, t.size() - (per == 1.0 ? 2 : 3)), Dimension::current);
  return amps * per;
}

}  // namespace coilwright
