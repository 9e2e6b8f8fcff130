#pragma once
// What a practitioner asks of a field in a target region, measured against the goal.
#include <optional>
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

// The goal as a function of position: the wanted total field and the deviation from it.
// uniform:  ΔB = B - B_goal (a vector), relative to |B_goal|;
// gradient: Δ = B·a - (B_goal·a + G s), s = (r - c)·a, relative to |G|·(region half-extent along a);
// null:     ΔB = B (coils plus ambient), relative to |B_ambient(c)|.
// Every component of ΔB is harmonic in the current-free region, so |ΔB| is subharmonic: its
// maximum over a region lies on the region's boundary.
struct GoalSpec {
  Goal goal = Goal::uniform;
  Vec3 centre_m = Vec3::Zero();
  Vec3 axis = Vec3::UnitZ();
  Vec3 field_T = Vec3::Zero();
  double gradient_T_per_m = 0.0;
  std::optional<AmbientField> ambient;
  double reference_T = 1.0;  // the scale of relative figures
  double tolerance_T = 0.0;  // the tolerance as an absolute deviation

  // Throws InputError, located at `where` (the target's goal key), when the goal has no scale.
  static GoalSpec from(const Target& target, const SourceLocation& where = {});
  [[nodiscard]] Vec3 ambient_at(const Vec3& p) const { return ambient ? ambient->at(p, centre_m) : Vec3::Zero(); }
  [[nodiscard]] double deviation_T(const Vec3& p, const Vec3& total_field) const;
};

// The half-extent of a region along its axis (for gradient scales and plots).
[[nodiscard]] double half_extent_along_axis(const Target& target);

struct Metrics {
  double worst_relative_deviation = 0.0;  // max |ΔB| / reference over the region
  double worst_absolute_deviation_T = 0.0;
  double rms_relative_deviation = 0.0;    // volume-weighted
  double peak_to_peak_T = 0.0;            // max - min of B along the goal direction (uniform, gradient) or of |B| (null)
  double peak_to_peak_relative = 0.0;     // the same over the reference
  std::optional<double> direction_error_rad;  // uniform goal: largest angle between B and the goal
  double fraction_within_tolerance = 0.0; // volume fraction
  // Good-field volume: within tolerance of the design's own centre field (and central gradient).
  double good_field_radius_m = 0.0;       // largest sphere about the centre within tolerance
  double good_field_cylinder_radius_m = 0.0;  // largest cylinder (target aspect ratio) within tolerance
  double good_field_cylinder_length_m = 0.0;
  Vec3 centre_field_T = Vec3::Zero();     // total field at the centre
  double reference_T = 0.0;
  double tolerance_T = 0.0;
  double ampere_turns = 0.0;              // sum of |N I| over all windings
  // On-axis expansion, normalised: ε_n = b_n d^n / b_ref with d the distance to the nearest
  // conductor and b_ref = b_0 (uniform, null) or b_1 d (gradient).
  std::vector<double> zonal;
  double zonal_scale_m = 0.0;
  std::optional<int> order;               // first non-vanishing error term (coils on the target axis)
  bool meets_tolerance() const { return worst_absolute_deviation_T <= tolerance_T; }
};

// Terms below this normalised size count as vanished when reporting a design's order.
inline constexpr double kVanishingTerm = 1e-8;
inline constexpr int kZonalDegree = 12;

}  // namespace coilwright
