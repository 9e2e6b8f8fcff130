#pragma once
// A least-squares model of the ambient field from a survey.
//
// Inside a current-free region B = -grad(Phi) with Phi harmonic, so the field is expanded in
// the gradients of real regular solid harmonics about a centre c, scaled by a reference radius
// r0 (the farthest survey point from c):
//     B(r) = sum over terms t of coefficient_t * F_t((r - c) / r0),   F_t = grad R_lm,
// i.e. Phi(r) = -r0 * sum coefficient_t R_lm((r - c) / r0). R_lm are the real solid harmonics
// in Racah's normalisation (R_1 = x, y, z; from memory of the standard associated-Legendre
// form). Each F_t is a homogeneous polynomial of degree l - 1, divergence- and curl-free by
// construction. Degree 1 is the uniform field (3 terms), degree 2 adds the symmetric, traceless
// gradient tensor (5 terms), degree L has (L + 1)^2 - 1 terms in all. A coefficient is in tesla:
// the size of its term at distance r0 from the centre.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

struct Survey;

// One term of the expansion: R_lm with cos(m phi) (sine = false) or sin(m phi) (sine = true).
struct HarmonicTerm {
  int degree = 1;  // l >= 1
  int order = 0;   // 0 <= m <= l
  bool sine = false;
  [[nodiscard]] std::string label() const;  // "C2,1" / "S2,1"
};

// Terms of degrees 1..degree, ordered by degree, then m, cosine before sine.
[[nodiscard]] std::vector<HarmonicTerm> harmonic_terms(int degree);
[[nodiscard]] constexpr std::size_t harmonic_term_count(int degree) noexcept {
  return degree < 1 ? 0 : static_cast<std::size_t>((degree + 1) * (degree + 1) - 1);
}
// F_t at the scaled point s = (r - c) / r0 (dimensionless).
[[nodiscard]] Vec3 harmonic_basis_field(const HarmonicTerm& term, const Vec3& s);

struct AmbientFitOptions {
  int degree = 2;                 // highest solid-harmonic degree: 1 uniform, 2 + gradient, ... (1..8)
  std::optional<Vec3> centre_m;   // expansion centre; default the centroid of the survey points
  // Throws InputError naming the field, its value and the rule broken.
  void validate() const;
};

struct AmbientFit {
  int degree = 0;
  Vec3 centre_m = Vec3::Zero();
  double reference_radius_m = 1.0;      // r0
  std::vector<HarmonicTerm> terms;
  Eigen::VectorXd coefficients_T;       // one per term
  Eigen::MatrixXd covariance_T2;        // of the coefficients
  Vec3 uniform_T = Vec3::Zero();        // B at the centre
  Vec3 uniform_sigma_T = Vec3::Zero();
  Mat3 gradient_T_per_m = Mat3::Zero();  // row i = dB_i/d(x, y, z) at the centre
  Mat3 gradient_sigma_T_per_m = Mat3::Zero();
  std::size_t readings = 0;
  std::size_t dof = 0;                  // 3 readings - terms
  bool weighted = false;                // per-reading uncertainties were given
  double chi2_reduced = 0.0;            // sum(w r^2)/dof with weights 1/sigma^2 (1 per T^2 when unweighted)
  double residual_rms_T = 0.0;          // sqrt(mean |B_meas - B_fit|^2) over readings
  double residual_worst_T = 0.0;        // max |B_meas - B_fit|
  std::size_t worst_reading = 0;        // index of that reading

  [[nodiscard]] Vec3 field_at(const Vec3& r_m) const;
  [[nodiscard]] FieldSet field_at(const PointSet& pts) const;
  [[nodiscard]] double coefficient_sigma_T(std::size_t t) const;
  // The uniform and gradient part only (exact when degree <= 2).
  [[nodiscard]] AmbientField uniform_and_gradient() const;
  // The field and its gradient at another point (the linearisation there; exact when degree <= 2).
  [[nodiscard]] AmbientField linearised_at(const Vec3& point_m) const;
};

// Weighted least squares (column-pivoted QR on the whitened system). Weights 1/sigma^2 with
// per-reading uncertainties; the coefficient covariance is (A^T W A)^-1, multiplied by the
// reduced chi-square when the survey has none. Throws InputError when the survey has too few
// readings for the degree, or when its points do not determine every term.
[[nodiscard]] AmbientFit fit_ambient(const Survey& survey, const AmbientFitOptions& options = {});

}  // namespace coilwright
