#include <cmath>
#include <string>

#include <fmt/format.h>

#include "coilwright/hardware.hpp"

namespace coilwright {

namespace {

std::string or_dash(const std::optional<double>& v, std::string_view fmt_spec, double scale = 1.0) {
  if (!v || !std::isfinite(*v)) return "-";
  return fmt::format(fmt::runtime(fmt_spec), *v * scale);
}

}  // namespace

std::string format_winding_schedule(const HardwareReport& r) {
  std::string s;
  auto line = [&](std::string_view t) { s += t; s += '\n'; };
  const auto& o = r.options;
  line("WINDING SCHEDULE");
  line(fmt::format("(wire lengths include {:.2g} m of leads per winding; resistances of copper/aluminium to IEC 60028 / "
                   "IEC 60889; {} packing)", o.lead_allowance_m, to_string(o.packing)));
  line("");
  for (const auto& c : r.coils) {
    line(fmt::format("Coil '{}'{}", c.name, c.winding > 1 || c.sign < 0 ? fmt::format(", winding {}", c.winding) : ""));
    line(fmt::format("  centre            ({:.4g}, {:.4g}, {:.4g}) m", c.centre_m.x(), c.centre_m.y(), c.centre_m.z()));
    line(fmt::format("  connection        {}{}", c.polarity, c.sign < 0 ? " (reversed half of an opposed pair)" : ""));
    line(fmt::format("  field constant    {:.4g} uT/A at the coil's centre (whole coil)", c.field_constant_T_per_A.norm() * 1e6));
    if (!c.wire) { line("  wire              none given: no winding, resistance, inductance or heat figures"); line(""); continue; }
    line(fmt::format("  wire              {} (bare {:.3f} mm, {:.3f} mm over insulation), {}", c.wire->label,
                     (c.wire->form == WireForm::round ? c.wire->bare_diameter_m : c.wire->bare_width_m) * 1e3,
                     c.wire->outer_width_m() * 1e3, c.wire->material.name));
    if (c.error) { line(fmt::format("  DOES NOT FIT      {}", *c.error)); line(""); continue; }
    const auto& p = *c.pack;
    line(fmt::format("  former            {}", p.former_m > 0 ? fmt::format("radius {:.2f} mm", p.former_m * 1e3) : "-"));
    line(fmt::format("  turns             {} = {} layers x up to {} turns per layer", p.turns, p.layers, p.turns_per_layer));
    line(fmt::format("  wound pack        {:.2f} mm along x {:.2f} mm deep, fill factor {:.2f}{}", p.width_m * 1e3,
                     p.depth_m * 1e3, p.fill_factor, p.derived ? " (bundle size derived from the turns)" : ""));
    line(fmt::format("  wire length       {:.2f} m (mean turn {:.1f} mm)", c.conductor->wire_length_m, p.mean_turn_length_m * 1e3));
    line(fmt::format("  resistance        {:.4g} ohm at 20 degC", c.conductor->resistance_20C_ohm));
    line(fmt::format("  self-inductance   {} mH", or_dash(c.self_inductance_H, "{:.4g}", 1e3)));
    line(fmt::format("  temperature rise  {} K (steady, constant current)", or_dash(c.temperature_rise_K, "{:.1f}")));
    line(fmt::format("  force on it       ({:.3g}, {:.3g}, {:.3g}) N from the other windings", c.force.force_N.x(),
                     c.force.force_N.y(), c.force.force_N.z()));
    if (c.radial)
      line(fmt::format("  radial load       {:.3g} N outward, hoop tension {:.3g} N, {:.3g} MPa in the conductor",
                       c.radial->radial_force_N, c.radial->hoop_tension_N, c.radial->hoop_stress_Pa * 1e-6));
    line("");
  }
  line("CIRCUITS");
  for (const auto& c : r.circuits) {
    line(fmt::format("Circuit '{}': {:.4g} A", c.name, c.current_A));
    line(fmt::format("  resistance        {} ohm at 20 degC, {} ohm hot", or_dash(c.resistance_20C_ohm, "{:.4g}"),
                     or_dash(c.resistance_hot_ohm, "{:.4g}")));
    line(fmt::format("  supply setting    {} V, {} W (hot)", or_dash(c.voltage_V, "{:.4g}"), or_dash(c.power_W, "{:.4g}")));
    if (c.constant_current && c.constant_voltage)
      line(fmt::format("  warming           constant current: voltage rises {:.1f} %; constant voltage: field falls {:.1f} %",
                       100 * c.constant_current->change, 100 * c.constant_voltage->change));
    line(fmt::format("  inductance        {} mH, L/R = {} ms, stored energy {} J", or_dash(c.inductance_H, "{:.4g}", 1e3),
                     or_dash(c.time_constant_s, "{:.3g}", 1e3), or_dash(c.stored_energy_J, "{:.3g}")));
    if (c.ac)
      line(fmt::format("  at {:.4g} Hz       X = {:.4g} ohm, |Z| = {:.4g} ohm, drive {:.4g} V; series {:.4g} uF resonates "
                       "(capacitor sees {:.4g} V)", o.frequency_Hz.value_or(0.0), c.ac->reactance_ohm, c.ac->impedance_ohm,
                       c.ac->voltage_V, c.ac->resonance_capacitance_F * 1e6, c.ac->capacitor_voltage_V));
    if (c.ramp_voltage_V) line(fmt::format("  ramp              {:.4g} V to ramp at {:.4g} A/s", *c.ramp_voltage_V, o.ramp_rate_A_per_s.value_or(0.0)));
    if (c.supply) {
      std::string lim;
      if (c.supply->max_current_A) lim += fmt::format(" {:.4g} A", *c.supply->max_current_A);
      if (c.supply->max_voltage_V) lim += fmt::format(" {:.4g} V", *c.supply->max_voltage_V);
      if (c.supply->max_power_W) lim += fmt::format(" {:.4g} W", *c.supply->max_power_W);
      line(fmt::format("  supply limits    {}", lim));
    }
    line(fmt::format("  acceptance        expect R = {} ohm at 20 degC (correct by 1 + alpha (T - 20 degC) for the room; "
                     "about +-3 % from wire tolerance) and L = {} mH (about +-5 %)",
                     or_dash(c.resistance_20C_ohm, "{:.4g}"), or_dash(c.inductance_H, "{:.4g}", 1e3)));
  }
  line("");
  line(fmt::format("BILL OF MATERIALS (spare allowance {:.0f} %)", 100 * o.spare_fraction));
  for (const auto& b : r.bill)
    line(fmt::format("  {:<24} {:9.1f} m  {:8.3f} kg   order {:9.1f} m  {:8.3f} kg", b.wire, b.length_m, b.mass_kg,
                     b.order_length_m, b.order_mass_kg));
  if (r.bill.empty()) line("  (no wire given)");
  line("");
  line("CAUTIONS");
  for (const auto& c : r.cautions) line(fmt::format("  {} {}", c.level == Caution::Level::warning ? "WARNING:" : "-", c.text));
  return s;
}

}  // namespace coilwright
