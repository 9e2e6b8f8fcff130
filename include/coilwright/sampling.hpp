#pragma once
// Sample points fitted to a target region: quadrature in the volume (for RMS measures) and a
// dense boundary set (for worst-case measures: every field component is harmonic in a
// current-free region, so |B - B_goal| is subharmonic and takes its maximum on the boundary).
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

// How much of the region must be sampled, given the symmetry of the coil system.
struct Symmetry {
  bool axisymmetric = false;  // coils and goal are coaxial with the target axis: one half-plane suffices
  bool mirrored = false;      // symmetric about the plane through the centre normal to the axis: half suffices
};

struct SampleSet {
  PointSet volume;              // quadrature nodes inside the region
  std::vector<double> weights;  // volume fraction of each node, summing to 1
  PointSet boundary;            // dense points on the boundary (all points for plane and point regions)
  Symmetry symmetry;
};

inline constexpr int kDefaultResolution = 12;  // points per radius (or half-side) of the region
inline constexpr int kMaxResolution = 128;      // the highest Gauss-Legendre order sampling has
// The most points (volume and boundary together) one target may be sampled with: about 100 MB of
// samples, and seconds per field evaluation; a larger request is a mistake, not a design.
inline constexpr double kMaxSamplePoints = 4e6;

// What sample_region would make for a target, counted without making it: the number of points
// (volume and boundary, the most over any symmetry) and the highest Gauss-Legendre order needed.
// Doubles, so absurd requests count without overflow.
struct SampleCount {
  double points = 0.0;
  double gauss_order = 0.0;
  [[nodiscard]] bool within_limits() const noexcept {
    return points <= kMaxSamplePoints && gauss_order <= kMaxResolution;
  }
};
[[nodiscard]] SampleCount count_samples(const Target& target);

// The samples of a target region. Points lie in the ρ–z half-plane (ρ along the frame's u)
// when axisymmetric, and on the z >= 0 side of the centre when mirrored. Throws DomainError when
// count_samples is beyond its limits (the config reader refuses such targets first).
[[nodiscard]] SampleSet sample_region(const Target& target, Symmetry symmetry);

// Points on the surface of a sphere (radius_m about centre), honouring the symmetry.
[[nodiscard]] PointSet sphere_surface(const Vec3& centre, const Frame& frame, double radius_m, int resolution,
                                      Symmetry symmetry);
// Points on the surface of a cylinder (radius_m, length_m) about the frame's w axis.
[[nodiscard]] PointSet cylinder_surface(const Vec3& centre, const Frame& frame, double radius_m, double length_m,
                                        int resolution, Symmetry symmetry);

// Gauss–Legendre nodes and weights on [-1, 1] (Golub–Welsch via Newton on P_n; exact for
// polynomials of degree 2n-1).
struct GaussLegendre {
  std::vector<double> nodes, weights;
};
[[nodiscard]] const GaussLegendre& gauss_legendre(int n);

// The symmetry of a model's coil system relative to its target (see Symmetry).
[[nodiscard]] Symmetry detect_symmetry(const Model& model);

}  // namespace coilwright
