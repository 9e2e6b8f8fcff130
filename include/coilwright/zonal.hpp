#pragma once
// The on-axis (zonal harmonic) expansion of a coil system: B·a along the line centre + s·a is
// B(s) = Σ b_n s^n. For a coaxial system these coefficients fix the field everywhere near the
// centre (M. W. Garrett, J. Appl. Phys. 22, 1091 (1951)); a design's order is its first
// non-vanishing error term.
#include <optional>
#include <vector>

#include <Eigen/Core>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

struct AxialResponse {
  double scale_m = 0.0;        // h: the coefficients are per ampere of b_n·h^n [T/A]
  Eigen::MatrixXd per_ampere;  // (degree+1) x circuits
};

// Coefficients of B·a on the axis per ampere of each circuit, up to `degree`, scaled by h^n with
// h = half the distance from the centre to the nearest conductor. Circular coils coaxial with the
// axis are expanded exactly (Gegenbauer series of the loop, integrated over the winding by
// Gauss–Legendre); any other coil by Chebyshev interpolation of its exact field on [-h, h]
// (inside the disc of convergence, so the series converges geometrically), converted to monomials.
[[nodiscard]] AxialResponse axial_response(const Model& model, const Vec3& centre, const Vec3& axis, int degree);

// Chebyshev coefficients -> monomial coefficients on [-1, 1] (T_m by its recurrence).
[[nodiscard]] std::vector<double> chebyshev_to_monomial(const std::vector<double>& chebyshev, int degree);

// Distance from a point to the nearest conductor of any coil.
[[nodiscard]] double nearest_conductor_m(const Model& model, const Vec3& p);

}  // namespace coilwright
