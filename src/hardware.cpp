#include "coilwright/hardware.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include <fmt/format.h>

#include "coilwright/constants.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

bool HardwareReport::has_warnings() const noexcept {
  return std::any_of(cautions.begin(), cautions.end(), [](const Caution& c) { return c.level == Caution::Level::warning; });
}

namespace {

std::string axis_text(const Vec3& a) { return fmt::format("({:.3g}, {:.3g}, {:.3g})", a.x(), a.y(), a.z()); }

std::string polarity_text(const Coil& c, double sign) {
  // The current circulates right-handed about the axis (reversed for the opposed half).
  return fmt::format("{} seen from the +axis side {} (looking back towards the centre); current enters the start lead",
                     sign > 0 ? "counter-clockwise" : "clockwise", axis_text(c.axis));
}

// Largest distance of any conductor from `centre`, generously.
double extent_from(const Model& m, const Vec3& centre) {
  double e = 0.0;
  for (const Coil& c : m.coils)
    for (const Winding& w : windings(c)) {
      double size = std::max({c.radius_m, c.outer_radius_m, 0.5 * std::hypot(c.width_m + c.depth_m, c.height_m + c.depth_m)});
      for (const Vec3& v : c.vertices_m) size = std::max(size, v.norm());
      const double half_axial = 0.5 * std::max({c.width_m, c.length_m, c.thickness_m});
      e = std::max(e, (w.centre_m - centre).norm() + std::hypot(size, half_axial));
    }
  return e;
}

// Distance from `centre` beyond which |B| stays below `threshold` along 26 directions (faces,
// edges and corners of a cube), searched outward from the coils' extent by doubling, then bisection.
std::optional<double> exposure_distance(const Model& m, const Vec3& centre, double threshold) {
  const double r0 = 1.05 * extent_from(m, centre);
  if (!(r0 > 0.0)) return std::nullopt;
  std::vector<Vec3> dirs;
  for (int i = -1; i <= 1; ++i)
    for (int j = -1; j <= 1; ++j)
      for (int k = -1; k <= 1; ++k)
        if (i || j || k) dirs.push_back(Vec3(i, j, k).normalized());
  auto magnitude = [&](const Vec3& p) {
    PointSet ps;
    ps.push_back(p);
    const FieldSet f = field_of_model(m, ps);
    return f[0].norm();
  };
  double worst = 0.0;
  for (const Vec3& d : dirs) {
    double lo = r0;
    if (magnitude(centre + lo * d) < threshold) continue;  // below the line already at the coils' edge
    double hi = 2.0 * lo;
    int guard = 0;
    while (magnitude(centre + hi * d) >= threshold && guard++ < 60) { lo = hi; hi *= 2.0; }
    for (int it = 0; it < 40 && hi - lo > 1e-3 * hi; ++it) {
      const double mid = 0.5 * (lo + hi);
      (magnitude(centre + mid * d) >= threshold ? lo : hi) = mid;
    }
    worst = std::max(worst, hi);
  }
  return worst > 0.0 ? std::optional<double>(worst) : std::optional<double>(r0);
}

std::string si(double v, std::string_view unit) {
  const double a = std::abs(v);
  if (a >= 1e3 && a < 1e6) return fmt::format("{:.3g} k{}", v / 1e3, unit);
  if (a >= 1e6) return fmt::format("{:.3g} M{}", v / 1e6, unit);
  if (a < 1e-6 && a > 0) return fmt::format("{:.3g} n{}", v * 1e9, unit);
  if (a < 1e-3 && a > 0) return fmt::format("{:.3g} u{}", v * 1e6, unit);
  if (a < 1 && a > 0) return fmt::format("{:.3g} m{}", v * 1e3, unit);
  return fmt::format("{:.3g} {}", v, unit);
}

}  // namespace

HardwareReport hardware_report(const Model& model) { return hardware_report(model, model.hardware); }

HardwareReport hardware_report(const Model& model, const HardwareOptions& options) {
  options.validate();
  HardwareReport r;
  r.options = options;
  const std::size_t nc = model.circuits.size();
  std::vector<double> currents(nc);
  for (std::size_t i = 0; i < nc; ++i) currents[i] = model.circuits[i].current_A;

  // ---- per winding: wire, pack, conductor, self-inductance ----
  std::vector<std::optional<double>> selfs;
  for (std::size_t ci = 0; ci < model.coils.size(); ++ci) {
    const Coil& c = model.coils[ci];
    const auto ws = windings(c);
    // Field constant of the whole coil at its centre (pair: the midpoint), per ampere.
    PointSet centre;
    centre.push_back(c.centre_m);
    FieldSet b(1);
    add_coil_field(c, 1.0, view(centre), view(b));
    for (std::size_t k = 0; k < ws.size(); ++k) {
      CoilHardware h;
      h.name = c.name;
      h.winding = static_cast<int>(k) + 1;
      h.coil = ci;
      h.circuit = model.circuit_index(c.circuit);
      h.sign = ws[k].sign;
      h.centre_m = ws[k].centre_m;
      h.wire = c.wire;
      h.polarity = polarity_text(c, ws[k].sign);
      if (std::isfinite(b[0].norm())) h.field_constant_T_per_A = b[0];
      if (c.wire) {
        try {
          h.pack = wind(c, *c.wire, options.packing);
          h.conductor = conductor_figures(*h.pack, *c.wire, options.lead_allowance_m);
          h.self_inductance_H = self_inductance(ws[k], c.wire, h.pack->width_m, h.pack->depth_m);
          h.radial = radial_load(ws[k], c.wire, model.circuits[h.circuit].current_A, h.pack->width_m, h.pack->depth_m);
        } catch (const InputError& e) {
          h.error = e.what();
          h.pack.reset();
          h.conductor.reset();
          h.self_inductance_H.reset();
          r.cautions.push_back({Caution::Level::warning, e.what()});
        }
      }
      selfs.push_back(h.self_inductance_H);
      r.coils.push_back(std::move(h));
    }
  }

  // ---- inductance, forces ----
  r.inductance = circuit_inductance(model, selfs);
  r.stored_energy_J = stored_energy(r.inductance, currents);
  const auto forces = forces_on_windings(model, currents);
  for (std::size_t i = 0; i < r.coils.size(); ++i) r.coils[i].force = forces[i];

  // ---- per circuit: resistance, heat, drive ----
  const double ambient = options.ambient_temperature_K;
  for (std::size_t ci = 0; ci < nc; ++ci) {
    const Circuit& circ = model.circuits[ci];
    CircuitHardware h;
    h.name = circ.name;
    h.current_A = circ.current_A;
    h.supply = circ.supply;
    std::vector<ThermalWinding> tw;
    std::vector<std::size_t> idx;
    bool wired = true;
    for (std::size_t i = 0; i < r.coils.size(); ++i) {
      if (r.coils[i].circuit != ci) continue;
      if (!r.coils[i].conductor) { wired = false; continue; }
      tw.push_back({r.coils[i].conductor->resistance_20C_ohm, r.coils[i].conductor->alpha_per_K,
                    options.heat_transfer_W_m2K * r.coils[i].pack->cooling_area_m2});
      idx.push_back(i);
    }
    const auto Lc = r.inductance.self(ci);
    if (Lc) h.inductance_H = *Lc;
    if (r.inductance.known[ci]) {
      double share = 0.0;
      bool ok = true;
      for (std::size_t j = 0; j < nc; ++j) {
        if (currents[j] == 0.0) continue;
        if (!r.inductance.known[j]) ok = false;
        share += r.inductance.henry(static_cast<Eigen::Index>(ci), static_cast<Eigen::Index>(j)) * currents[j];
      }
      if (ok) h.stored_energy_J = 0.5 * currents[ci] * share;
      if (Lc) h.switch_off_voltage_1ms_V = std::abs(*Lc * circ.current_A) / 1e-3;
    }
    if (wired && !tw.empty()) {
      double r20 = 0.0;
      for (const auto& w : tw) r20 += w.resistance_20C_ohm;
      h.resistance_20C_ohm = r20;
      h.constant_current = steady_constant_current(tw, circ.current_A, ambient);
      h.constant_voltage = steady_constant_voltage(tw, circ.current_A, ambient);
      for (std::size_t k = 0; k < idx.size(); ++k) {
        CoilHardware& ch = r.coils[idx[k]];
        const double rise = h.constant_current->rise_K[k];
        if (std::isfinite(rise)) ch.temperature_rise_K = rise;
        const double t_hot = options.operating_temperature_K.value_or(ambient + rise);
        if (std::isfinite(t_hot)) ch.drive = drive_figures(*ch.conductor, circ.current_A, t_hot);
      }
      double r_hot = 0.0;
      for (std::size_t k = 0; k < idx.size(); ++k) {
        const double t_hot = options.operating_temperature_K.value_or(ambient + h.constant_current->rise_K[k]);
        r_hot += r.coils[idx[k]].conductor->resistance_at(t_hot);
      }
      if (std::isfinite(r_hot)) {
        h.resistance_hot_ohm = r_hot;
        h.voltage_V = circ.current_A * r_hot;
        h.power_W = circ.current_A * circ.current_A * r_hot;
        if (h.inductance_H && r_hot > 0.0) h.time_constant_s = *h.inductance_H / r_hot;
        if (h.inductance_H && options.frequency_Hz) h.ac = ac_drive(*h.inductance_H, r_hot, std::abs(circ.current_A), *options.frequency_Hz);
        if (h.inductance_H && options.ramp_rate_A_per_s)
          h.ramp_voltage_V = ramp_voltage(*h.inductance_H, r_hot, std::abs(circ.current_A), *options.ramp_rate_A_per_s);
      }
    }
    r.circuits.push_back(std::move(h));
  }
  r.supplies = check_supplies(model, currents, options);

  // ---- bill of materials ----
  std::map<std::string, BillLine> bill;
  for (const auto& c : r.coils) {
    if (!c.conductor) continue;
    BillLine& b = bill[c.wire->label];
    b.wire = c.wire->label;
    b.length_m += c.conductor->wire_length_m;
    b.mass_kg += c.conductor->mass_kg;
  }
  for (auto& [k, b] : bill) {
    b.order_length_m = b.length_m * (1.0 + options.spare_fraction);
    b.order_mass_kg = b.mass_kg * (1.0 + options.spare_fraction);
    r.bill.push_back(b);
  }

  // ---- cautions ----
  const auto cls = std::find_if(thermal_classes().begin(), thermal_classes().end(),
                                [&](const ThermalClass& t) { return t.limit_C == options.insulation_class_C; });
  for (const auto& c : r.coils) {
    if (!c.wire || c.error) continue;
    if (!c.temperature_rise_K) {
      r.cautions.push_back({Caution::Level::warning,
                            fmt::format("coil '{}' (winding {}): no steady temperature at {:.3g} A: the resistance rises faster "
                                        "than the cooling can carry the heat away (thermal runaway); lower the current or cool it",
                                        c.name, c.winding, model.circuits[c.circuit].current_A)});
      continue;
    }
    const double t_c = ambient - 273.15 + *c.temperature_rise_K;
    if (cls != thermal_classes().end() && t_c > cls->limit_C)
      r.cautions.push_back({Caution::Level::warning,
                            fmt::format("coil '{}' (winding {}): the winding would reach {:.0f} degC on average, above the "
                                        "{} degC limit of insulation class {} (IEC 60085); the hot spot inside the pack is "
                                        "hotter still", c.name, c.winding, t_c, cls->limit_C, cls->name())});
    else if (cls != thermal_classes().end() && t_c > cls->limit_C - 20.0)
      r.cautions.push_back({Caution::Level::note,
                            fmt::format("coil '{}' (winding {}): {:.0f} degC on average is within 20 K of the {} degC class "
                                        "limit; the hot spot inside the pack runs hotter than the average", c.name,
                                        c.winding, t_c, cls->limit_C)});
    else if (t_c > 60.0)
      r.cautions.push_back({Caution::Level::note,
                            fmt::format("coil '{}' (winding {}): its surface will be hot to the touch ({:.0f} degC on average)",
                                        c.name, c.winding, t_c)});
  }
  for (const auto& c : r.circuits) {
    if (!c.stored_energy_J || !c.switch_off_voltage_1ms_V || c.current_A == 0.0) continue;
    r.cautions.push_back(
        {*c.switch_off_voltage_1ms_V > 50.0 ? Caution::Level::warning : Caution::Level::note,
         fmt::format("circuit '{}' stores {}; breaking {:.3g} A within 1 ms would induce about {} across the opening "
                     "contact. Give the current a freewheel path (a diode, or a diode and resistor, across the coils) "
                     "or ramp it down under control before switching off{}",
                     c.name, si(*c.stored_energy_J, "J"), std::abs(c.current_A), si(*c.switch_off_voltage_1ms_V, "V"),
                     c.time_constant_s ? fmt::format("; with a plain diode it decays with L/R = {}", si(*c.time_constant_s, "s")) : "")});
  }
  for (const auto& v : r.supplies.violations) r.cautions.push_back({Caution::Level::warning, v.message});
  for (const auto& u : r.supplies.unchecked) r.cautions.push_back({Caution::Level::note, u});

  r.exposure_centre_m = model.target ? model.target->centre_m : Vec3::Zero();
  if (!model.target && !model.coils.empty()) {
    for (const Coil& c : model.coils) r.exposure_centre_m += c.centre_m;
    r.exposure_centre_m /= static_cast<double>(model.coils.size());
  }
  bool any_current = false;
  for (double i : currents) any_current = any_current || i != 0.0;
  if (any_current) {
    r.exposure_distance_m = exposure_distance(model, r.exposure_centre_m, options.exposure_threshold_T);
    if (r.exposure_distance_m)
      r.cautions.push_back(
          {Caution::Level::note,
           fmt::format("strong field: |B| exceeds {} out to about {:.2g} m from {} m. Keep people with pacemakers or other "
                       "implanted medical devices outside that distance (0.5 mT: ICNIRP 2009 static-field guidelines "
                       "and the 0.5 mT line of IEC 60601-2-33, from memory), and keep ferromagnetic tools and objects "
                       "away from the coils while they carry current",
                       si(options.exposure_threshold_T, "T"), *r.exposure_distance_m, axis_text(r.exposure_centre_m))});
  }
  r.cautions.push_back({Caution::Level::note,
                        "these figures support design only: wiring, protection, earthing and installation must follow "
                        "local electrical codes and be done or checked by a licensed electrician"});
  return r;
}

}  // namespace coilwright
