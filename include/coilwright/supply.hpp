#pragma once
// Checks of circuits against their supplies' limits, cheap enough to run inside the search.
#include <cstddef>
#include <span>
#include <string>
#include <vector>

#include "coilwright/hardware_options.hpp"

namespace coilwright {

struct Model;

struct SupplyViolation {
  std::size_t circuit = 0;
  std::string limit;        // "current", "voltage", "power" or "winding" (the turns do not fit)
  double needed = 0.0;      // [A], [V] or [W]
  double allowed = 0.0;
  std::string message;      // "circuit 'main': needs 31.2 V, the supply gives 30 V (4.0 % over)"
};

struct SupplyCheck {
  std::vector<SupplyViolation> violations;
  // Largest needed/allowed - 1 over every checked limit: <= 0 when all hold (its magnitude the
  // smallest margin), > 0 by how much the worst limit is broken. Suitable as a search constraint.
  double worst_excess = -1.0;
  std::vector<std::string> unchecked;  // limits that could not be checked (e.g. voltage without a wire)
  [[nodiscard]] bool ok() const noexcept { return violations.empty(); }
};

// Each circuit's current (one per circuit, model order) against its supply. Voltage and power use
// the resistance at the predicted steady winding temperature under that current (or at
// options.operating_temperature_K when set); they need every coil of the circuit to have a wire.
[[nodiscard]] SupplyCheck check_supplies(const Model& model, std::span<const double> currents_A,
                                         const HardwareOptions& options);

}  // namespace coilwright
