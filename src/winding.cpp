#include "coilwright/winding.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include <fmt/format.h>

#include "coilwright/error.hpp"

namespace coilwright {

std::string_view to_string(Packing p) noexcept { return p == Packing::layered ? "layered" : "orthocyclic"; }

std::optional<Packing> packing_from_string(std::string_view s) noexcept {
  if (s == "layered") return Packing::layered;
  if (s == "orthocyclic") return Packing::orthocyclic;
  return std::nullopt;
}

namespace {

constexpr double kSlack = 1e-9;  // relative room allowed for rounding of declared dimensions

struct Layout {
  int per_layer = 0;      // first layer
  int per_layer_odd = 0;  // second, fourth, ... layer
  double pitch_along = 0.0, pitch_across = 0.0;
};

Layout layout(const Wire& w, Packing p, double width_m) {
  Layout l;
  l.pitch_along = w.outer_width_m();
  l.pitch_across = w.outer_thickness_m();
  l.per_layer = static_cast<int>(std::floor(width_m / l.pitch_along * (1.0 + kSlack)));
  l.per_layer_odd = l.per_layer;
  if (p == Packing::orthocyclic && w.form == WireForm::round) {
    l.pitch_across = l.pitch_along * std::sqrt(3.0) / 2.0;
    l.per_layer_odd = static_cast<int>(std::floor((width_m - 0.5 * l.pitch_along) / l.pitch_along * (1.0 + kSlack)));
  }
  return l;
}

// Layers needed for n turns and the radial centre offsets of each turn, summed (for the mean turn).
struct Stack {
  int layers = 0;
  double depth_m = 0.0;
  double sum_offset_m = 0.0;  // sum over turns of the turn centre's distance from the former
};

Stack stack(int n, const Layout& l, double outer_thickness) {
  Stack s;
  int left = n;
  while (left > 0) {
    const int here = std::min(left, (s.layers % 2 == 0) ? l.per_layer : std::max(l.per_layer_odd, 1));
    s.sum_offset_m += here * (0.5 * outer_thickness + s.layers * l.pitch_across);
    left -= here;
    ++s.layers;
  }
  s.depth_m = s.layers == 0 ? 0.0 : outer_thickness + (s.layers - 1) * l.pitch_across;
  return s;
}

std::string describe(const Wire& w) {
  if (w.form == WireForm::round) return fmt::format("{} ({:.3g} mm over insulation)", w.label, w.outer_width_m() * 1e3);
  return fmt::format("{} ({:.3g} x {:.3g} mm over insulation)", w.label, w.outer_width_m() * 1e3,
                     w.outer_thickness_m() * 1e3);
}

double polygon_perimeter(const std::vector<Vec3>& v) {
  double p = 0.0;
  for (std::size_t i = 0; i < v.size(); ++i) p += (v[(i + 1) % v.size()] - v[i]).norm();
  return p;
}

}  // namespace

WindingPack wind(const Coil& coil, const Wire& wire, Packing packing) {
  wire.validate();
  WindingPack pk;
  pk.turns = std::max(1, static_cast<int>(std::lround(coil.turns)));
  const int n = pk.turns;
  const double pi = std::numbers::pi;
  const double conductor = n * wire.conductor_area_m2();

  // Declared cross-sections: (width along the layer, depth across layers, former offset).
  double width = 0.0, depth = 0.0;
  bool declared = true;
  bool circular = true;
  bool single_layer = false;
  switch (coil.shape) {
    case Shape::pack:
      width = coil.width_m; depth = coil.outer_radius_m - coil.inner_radius_m; pk.former_m = coil.inner_radius_m;
      break;
    case Shape::solenoid:
      width = coil.length_m;
      if (coil.multilayer()) {
        depth = coil.outer_radius_m - coil.inner_radius_m; pk.former_m = coil.inner_radius_m;
      } else {
        single_layer = true;
        depth = wire.outer_thickness_m();
        pk.former_m = coil.radius_m - 0.5 * wire.outer_thickness_m();
      }
      break;
    case Shape::rectangle:
      circular = false;
      if (coil.thick_rectangle()) { width = coil.thickness_m; depth = coil.depth_m; }
      else declared = false;
      break;
    case Shape::loop:
    case Shape::polygon:
      circular = coil.shape == Shape::loop;
      declared = false;
      break;
  }

  Layout l;
  Stack s;
  if (declared) {
    l = layout(wire, packing, width);
    if (l.per_layer < 1)
      throw InputError(fmt::format("coil '{}': the winding is {:.3g} mm wide, narrower than one turn of {}",
                                   coil.name, width * 1e3, describe(wire)));
    if (single_layer && n > l.per_layer)
      throw InputError(fmt::format(
          "coil '{}': {} turns of {} need {:.3g} mm but the single-layer solenoid is {:.3g} mm long "
          "(room for {} turns); use a multi-layer solenoid (inner_radius, outer_radius) or a thinner wire",
          coil.name, n, describe(wire), n * l.pitch_along * 1e3, width * 1e3, l.per_layer));
    s = stack(n, l, wire.outer_thickness_m());
    if (s.depth_m > depth * (1.0 + kSlack))
      throw InputError(fmt::format(
          "coil '{}': {} turns of {} need {} layers = {:.3g} mm but the pack is {:.3g} mm deep "
          "({} turns per layer on {:.3g} mm)",
          coil.name, n, describe(wire), s.layers, s.depth_m * 1e3, depth * 1e3, l.per_layer, width * 1e3));
    pk.declared_area_m2 = width * depth;
    pk.width_m = std::min(n, l.per_layer) * l.pitch_along;
  } else {
    // A bundle about the filament, as square as the turns allow.
    const int per_layer = std::max(1, static_cast<int>(std::ceil(std::sqrt(static_cast<double>(n)))));
    l = layout(wire, Packing::layered, per_layer * wire.outer_width_m());
    s = stack(n, l, wire.outer_thickness_m());
    pk.width_m = per_layer * l.pitch_along;
    pk.derived = true;
  }
  pk.turns_per_layer = std::min(n, l.per_layer);
  pk.layers = s.layers;
  pk.depth_m = s.depth_m;
  pk.fill_factor = conductor / (declared ? pk.declared_area_m2 : pk.width_m * pk.depth_m);
  const double mean_offset = s.sum_offset_m / n;  // from the inner face of the winding

  switch (coil.shape) {
    case Shape::loop: {
      pk.former_m = coil.radius_m - 0.5 * pk.depth_m;
      pk.mean_turn_length_m = 2.0 * pi * coil.radius_m;
      break;
    }
    case Shape::pack:
    case Shape::solenoid:
      pk.mean_turn_length_m = 2.0 * pi * (pk.former_m + mean_offset);
      break;
    case Shape::rectangle: {
      // Declared sides are those of the cross-section's centre line; turns lie between its
      // inner and outer edges. A filament rectangle's bundle is centred on the filament.
      const double inner_offset = declared ? -0.5 * depth : -0.5 * pk.depth_m;
      pk.mean_turn_length_m = 2.0 * (coil.width_m + coil.height_m) + 8.0 * (inner_offset + mean_offset);
      break;
    }
    case Shape::polygon:
      pk.mean_turn_length_m = polygon_perimeter(coil.vertices_m);
      break;
  }
  if (!(pk.mean_turn_length_m > 0.0))
    throw InputError(fmt::format("coil '{}': the winding does not fit inside the coil (mean turn length {:.3g} m)",
                                 coil.name, pk.mean_turn_length_m));

  // Cooling surface: outer face and both side faces of the wound turns.
  if (circular) {
    const double r_in = pk.former_m, r_out = pk.former_m + pk.depth_m;
    pk.cooling_area_m2 = 2.0 * pi * r_out * pk.width_m + (single_layer ? 0.0 : 2.0 * pi * (r_out * r_out - r_in * r_in));
  } else {
    pk.cooling_area_m2 = pk.mean_turn_length_m * (pk.width_m + 2.0 * pk.depth_m);
  }
  return pk;
}

}  // namespace coilwright
