#include "coilwright/hardware_options.hpp"

#include <cmath>

#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/thermal.hpp"

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

}  // namespace coilwright
