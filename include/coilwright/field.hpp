#pragma once
// The magnetic flux density of coils at points: the public face of the field kernels.
#include <span>
#include <vector>

#include "coilwright/coil.hpp"
#include "coilwright/geometry.hpp"

namespace coilwright {

struct Model;

// Adds to `out` the field [T] of every turn of `coil` (both windings of a pair) carrying
// `current_A` at the points in `pts`. Pure: no I/O, no allocation per point; the points
// must be clear of the winding (see check_clear_of_windings) for the value to be finite.
void add_coil_field(const Coil& coil, double current_A, PointsView pts, FieldView out);

// The field of all coils of the model with its circuits' currents, in parallel over points.
[[nodiscard]] FieldSet field_of_model(const Model& model, const PointSet& pts);

// The field per ampere [T/A] of one circuit (every coil it drives), in parallel over points.
[[nodiscard]] FieldSet field_per_ampere(const Model& model, std::size_t circuit, const PointSet& pts);

// Throws DomainError naming the point and the coil when a point lies on a filament (within
// 1e-9 of the coil's size) or inside a winding pack, where the field of the filament model is
// infinite or the filled-pack model is not used.
void check_clear_of_windings(std::span<const Coil> coils, const PointSet& pts);

}  // namespace coilwright
