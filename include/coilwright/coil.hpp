#pragma once
// Coil shapes as plain data. A coil with a `separation` is a mirrored pair; `windings()` expands
// it into the physical windings the field kernels see.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

enum class Shape {
  loop,       // circular filament: radius
  pack,       // circular coil with rectangular cross-section: inner_radius, outer_radius, width (axial)
  solenoid,   // single layer: radius, length; multi-layer: inner_radius, outer_radius, length
  rectangle,  // width x height, sides along width_axis and axis x width_axis; optional cross-section
  polygon     // closed filament through `vertices` (relative to centre), current in listed order
};
[[nodiscard]] std::string_view to_string(Shape s) noexcept;
[[nodiscard]] std::optional<Shape> shape_from_string(std::string_view s) noexcept;

// One declared coil (or mirrored pair). Lengths in metres; axis and width_axis are unit vectors.
// The current circulates right-handed about `axis`.
struct Coil {
  std::string name;
  Shape shape = Shape::loop;
  std::string circuit;            // name of the circuit that drives it
  Vec3 centre_m = Vec3::Zero();   // centre of the coil (of the pair's midpoint for a pair)
  Vec3 axis = Vec3::UnitZ();      // unit
  Vec3 width_axis = Vec3::UnitX();  // rectangle: unit, orthogonal to axis
  double turns = 1.0;             // may be fractional while searching; written rounded
  double radius_m = 0.0;          // loop; single-layer solenoid
  double inner_radius_m = 0.0;    // pack; multi-layer solenoid
  double outer_radius_m = 0.0;    // pack; multi-layer solenoid
  double width_m = 0.0;           // pack: axial width; rectangle: side along width_axis
  double height_m = 0.0;          // rectangle: side along axis x width_axis
  double length_m = 0.0;          // solenoid: axial length
  double depth_m = 0.0;           // rectangle cross-section, in the coil plane (0 = filament)
  double thickness_m = 0.0;       // rectangle cross-section, along the axis (0 = filament)
  std::vector<Vec3> vertices_m;   // polygon, relative to centre_m
  std::optional<double> separation_m;  // pair: centres at centre_m +- separation/2 * axis
  bool opposed = false;           // pair: second winding carries reversed current
  std::optional<Wire> wire;       // the wire it is wound with; absent = ampere-turns only (no R, L, heat)
  std::vector<Wire> wire_options; // wire = ["AWG 18", "AWG 20", ...]: the search chooses one (CoilKey::wire)
  int wire_choice = 0;            // index into wire_options of `wire`

  [[nodiscard]] bool is_pair() const noexcept { return separation_m.has_value(); }
  [[nodiscard]] bool multilayer() const noexcept { return shape == Shape::solenoid && outer_radius_m > 0.0; }
  [[nodiscard]] bool thick_rectangle() const noexcept { return depth_m > 0.0 || thickness_m > 0.0; }
};

// A single physical winding: a coil placed at one position, with the sign of its current
// (-1 for the reversed half of an opposed pair).
struct Winding {
  const Coil* coil;
  Vec3 centre_m;
  double sign;  // +1 or -1
};

// The one or two physical windings of a declared coil.
[[nodiscard]] std::vector<Winding> windings(const Coil& c);

}  // namespace coilwright
