#include "coilwright/supply.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "coilwright/electrical.hpp"
#include "coilwright/error.hpp"
#include "coilwright/model.hpp"
#include "coilwright/thermal.hpp"

namespace coilwright {

SupplyCheck check_supplies(const Model& model, std::span<const double> currents_A, const HardwareOptions& options) {
  SupplyCheck out;
  for (std::size_t ci = 0; ci < model.circuits.size(); ++ci) {
    const Circuit& circuit = model.circuits[ci];
    if (!circuit.supply) continue;
    const double current = std::abs(ci < currents_A.size() ? currents_A[ci] : circuit.current_A);
    auto check = [&](std::string_view limit, double needed, double allowed, std::string_view unit) {
      const double excess = needed / allowed - 1.0;
      out.worst_excess = std::max(out.worst_excess, excess);
      if (excess > 0.0)
        out.violations.push_back({ci, std::string(limit), needed, allowed,
                                  fmt::format("circuit '{}': needs {:.4g} {}, the supply gives {:.4g} {} ({:.1f} % over)",
                                              circuit.name, needed, unit, allowed, unit, 100.0 * excess)});
    };
    const Supply& s = *circuit.supply;
    if (s.max_current_A) check("current", current, *s.max_current_A, "A");
    if (!s.max_voltage_V && !s.max_power_W) continue;

    // Series windings of the circuit.
    std::vector<ThermalWinding> tw;
    bool all_wired = true;
    try {
      for (const Coil& c : model.coils) {
        if (c.circuit != circuit.name) continue;
        if (!c.wire) { all_wired = false; break; }
        const WindingPack pk = wind(c, *c.wire, options.packing);
        const ConductorFigures cf = conductor_figures(pk, *c.wire, options.lead_allowance_m);
        for (std::size_t k = 0; k < windings(c).size(); ++k)
          tw.push_back({cf.resistance_20C_ohm, cf.alpha_per_K, options.heat_transfer_W_m2K * pk.cooling_area_m2});
      }
    } catch (const InputError& e) {
      out.worst_excess = std::max(out.worst_excess, 1.0);
      out.violations.push_back({ci, "winding", 0.0, 0.0, e.what()});
      continue;
    }
    if (!all_wired) {
      out.unchecked.push_back(fmt::format("circuit '{}': voltage and power need a wire on every coil", circuit.name));
      continue;
    }
    double r_hot = 0.0;
    if (options.operating_temperature_K) {
      for (const auto& w : tw) r_hot += w.resistance_20C_ohm * (1.0 + w.alpha_per_K * (*options.operating_temperature_K - kReferenceTemperatureK));
    } else {
      const CircuitThermal th = steady_constant_current(tw, current, options.ambient_temperature_K);
      r_hot = th.runaway ? std::numeric_limits<double>::infinity() : (current > 0.0 ? th.voltage_V / current : 0.0);
      if (current == 0.0)
        for (const auto& w : tw) r_hot += w.resistance_20C_ohm * (1.0 + w.alpha_per_K * (options.ambient_temperature_K - kReferenceTemperatureK));
    }
    if (s.max_voltage_V) check("voltage", current * r_hot, *s.max_voltage_V, "V");
    if (s.max_power_W) check("power", current * current * r_hot, *s.max_power_W, "W");
  }
  return out;
}

}  // namespace coilwright
