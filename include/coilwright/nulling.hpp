#pragma once
// Currents that cancel a (fitted) ambient field over the target region.
//
// The coils' field is linear in the currents, so the residual at the sample points is
//   R(I) = ambient + sum over fixed circuits I_c K_c + sum over solved circuits I_c K_c,
// with K_c the field per ampere of circuit c. The solved currents minimise the volume-weighted
// mean of |R|^2 over the region (its RMS) within each circuit's [min, max] (bounded least
// squares, currents.hpp); the worst |R| is then taken over the volume nodes and the dense
// boundary set (each component of R is harmonic, so its largest value lies on the boundary).
#include <cstddef>
#include <string>
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

struct AmbientFit;

struct NullingResult {
  std::vector<double> currents_A;  // every circuit of the model, in its order (fixed ones unchanged)
  std::vector<bool> at_limit;      // a solved circuit held at its min or max
  PointSet points;                 // volume nodes followed by boundary points [m]
  std::vector<double> weights;     // volume fraction of each point (0 for boundary points)
  FieldSet ambient_T;              // the field to cancel at the points
  FieldSet residual_T;             // ambient + coils at the points
  double residual_worst_T = 0.0;   // max |R| over all points
  double residual_rms_T = 0.0;     // sqrt(sum w |R|^2) over the volume
  std::size_t worst_point = 0;     // index into points
  double ambient_worst_T = 0.0;    // max |ambient| (before nulling)
  double ambient_rms_T = 0.0;      // sqrt(sum w |ambient|^2)
  double tolerance_T = 0.0;        // the target's tolerance in tesla (relative ones times ambient_worst_T)
  bool within_tolerance = false;   // residual_worst_T <= tolerance_T
};

// Nulls the field `ambient_T` given at `points` (volume weights `weights`, summing to 1 over
// the volume; 0 marks a point that only counts for the worst case). Tolerance from the model's
// target when it has one. Throws DomainError when a point lies on a winding, InputError when
// the model has no solved circuit.
[[nodiscard]] NullingResult null_field(const Model& model, const PointSet& points, const std::vector<double>& weights,
                                       const FieldSet& ambient_T);

// Nulls a fitted ambient field over the model's target region (sampled by sample_region).
// Throws InputError when the model has no target.
[[nodiscard]] NullingResult null_ambient(const Model& model, const AmbientFit& ambient);

// The model with its circuits' currents replaced (one value per circuit, in order).
[[nodiscard]] Model with_currents(Model model, const std::vector<double>& currents_A);

// How much field each solved circuit can still add at a point on top of its present current,
// within its limits: up = (max - I)|K|, down = (I - min)|K|, along +K and -K respectively.
struct Headroom {
  std::string circuit;
  double current_A = 0.0;
  double min_current_A = 0.0, max_current_A = 0.0;
  Vec3 field_per_ampere_T_per_A = Vec3::Zero();  // K at the point
  double up_T = 0.0;    // extra field along +K
  double down_T = 0.0;  // extra field along -K
};
[[nodiscard]] std::vector<Headroom> headroom(const Model& model, const Vec3& point_m);

}  // namespace coilwright
