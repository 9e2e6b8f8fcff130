#pragma once
// A built rig against its model: the measured field map minus the model's, point by point.
//
// With a background (the ambient field with the coils off, as a fitted survey), the background
// is subtracted from the measurement first, so both sides are the coils' field alone; without
// one, the map is taken to hold the coils' field only (e.g. coils-on minus coils-off readings).
#include <cstddef>
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

struct AmbientFit;
struct Survey;

struct MapComparison {
  PointSet points;             // [m]
  FieldSet model_T;            // the coils of the design at their currents
  FieldSet measured_T;         // the map, background subtracted when one is given
  FieldSet difference_T;       // measured - model
  double worst_T = 0.0;        // max |difference|
  std::size_t worst_point = 0;
  double rms_T = 0.0;          // sqrt(mean |difference|^2)
  double relative_rms = 0.0;   // rms_T / sqrt(mean |model|^2)
  double relative_worst = 0.0; // worst_T / max |model|
};

// Throws DomainError when a map point lies on a winding.
[[nodiscard]] MapComparison compare_with_map(const Model& design, const Survey& measured,
                                             const AmbientFit* background = nullptr);

}  // namespace coilwright
