#pragma once
// How a wire fills a coil's former: turns per layer, layers, pack size, fill factor, mean turn
// length and the cooling surface. Pure: no I/O.
#include <optional>
#include <string_view>

#include "coilwright/coil.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

enum class Packing {
  layered,     // each turn sits on the turn below it: layer pitch = wire outer thickness
  orthocyclic  // round wire in the grooves of the layer below: layer pitch = d sqrt(3)/2, every
               // other layer holds one turn less when the former width leaves no half-turn spare
};
[[nodiscard]] std::string_view to_string(Packing p) noexcept;
[[nodiscard]] std::optional<Packing> packing_from_string(std::string_view s) noexcept;

// The winding of one physical winding (one half of a pair). Lengths in metres.
struct WindingPack {
  int turns = 0;                 // whole turns actually wound (the coil's turns rounded)
  int turns_per_layer = 0;       // in the first layer
  int layers = 0;
  double width_m = 0.0;          // extent of the wound turns along the layer (axial for circular coils)
  double depth_m = 0.0;          // radial build of the wound layers
  double former_m = 0.0;         // circular coils: radius of the former (the winding's inner radius);
                                 // rectangles: the inner rectangle's half-perimeter offset (0)
  double declared_area_m2 = 0.0; // cross-section of the declared pack (0 when derived)
  double fill_factor = 0.0;      // conductor area of all turns / pack cross-section (declared or wound)
  double mean_turn_length_m = 0.0;
  double cooling_area_m2 = 0.0;  // outer face + both side faces; the face on the former is taken as insulated
  bool derived = false;          // pack size derived from the turns (filament coils)
};

// Winds `wire` on the former of `coil`. For coils with a declared cross-section (pack, solenoid,
// thick rectangle) the turns are checked against it and InputError names the coil, the turns, the
// wire and the room missing; for filament coils (loop, thin rectangle, polygon) a square-ish bundle
// centred on the filament is derived.
[[nodiscard]] WindingPack wind(const Coil& coil, const Wire& wire, Packing packing = Packing::layered);

}  // namespace coilwright
