#pragma once
// The space a winding occupies, for clearance checks: overlaps, gaps, bore and outer size.
// Coaxial circular windings are compared exactly as rectangles in the ρ–z half-plane; other
// shapes as tubes about sampled conductor paths (a tube containing the cross-section).
#include <span>
#include <vector>

#include "coilwright/coil.hpp"
#include "coilwright/geometry.hpp"

namespace coilwright {

struct WindingBody {
  bool circular = false;        // loop, pack or solenoid: an annulus about `axis`
  Vec3 centre_m = Vec3::Zero();
  Vec3 axis = Vec3::UnitZ();
  double rho_in_m = 0.0, rho_out_m = 0.0, half_width_m = 0.0;  // circular: cross-section rectangle
  Vec3 reference = Vec3::UnitX();  // circular: the coil's width_axis, which fixes where its path starts
  std::vector<Vec3> path_m;     // conductor centre-line samples (closed); see Paths
  double tube_radius_m = 0.0;   // radius about the path that contains the cross-section
};

// Circular windings' paths serve only where the closed forms do not (windings off each other's
// axis, extents about another line); the search checks clearance on every evaluation, so it
// asks for them `when_needed` and gap_m/extents sample them on the fly in those cases.
enum class Paths { always, when_needed };

[[nodiscard]] WindingBody body_of(const Winding& w, Paths paths = Paths::always);
[[nodiscard]] std::vector<WindingBody> bodies_of(std::span<const Coil> coils, Paths paths = Paths::always);

// Clear distance between two windings (negative or zero when they touch or overlap).
[[nodiscard]] double gap_m(const WindingBody& a, const WindingBody& b);
// Distance from a point to the nearest conductor of a winding (0 inside it).
[[nodiscard]] double distance_to(const WindingBody& body, const Vec3& p);

// Extents relative to a line (centre, unit axis): the largest distance of any conductor from
// the line, the smallest (the clear bore), and the largest distance along it from the centre.
struct Extents {
  double max_radial_m = 0.0;
  double min_radial_m = 0.0;
  double max_axial_m = 0.0;
};
[[nodiscard]] Extents extents(std::span<const WindingBody> bodies, const Vec3& centre, const Vec3& axis);

}  // namespace coilwright
