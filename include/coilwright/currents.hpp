#pragma once
// Bounded linear least squares for the circuit currents: minimise |A x - b|^2 subject to
// lo <= x <= hi. The problems are small (a column per circuit), so a primal active-set method
// (Lawson & Hanson, "Solving Least Squares Problems", 1974, ch. 23) is exact and fast. Each step
// solves the free variables' normal equations by Cholesky when the Gram matrix AᵀA is well
// conditioned (the search's case: a few nearly independent circuits), by QR of A otherwise.
#include <Eigen/Core>

namespace coilwright {

struct BoundedLeastSquares {
  Eigen::VectorXd x;        // the minimiser
  double residual_norm = 0; // |A x - b|
  int iterations = 0;
};

[[nodiscard]] BoundedLeastSquares solve_bounded_least_squares(const Eigen::MatrixXd& A, const Eigen::VectorXd& b,
                                                              const Eigen::VectorXd& lo, const Eigen::VectorXd& hi);

// The normal-equations form, for callers that form G = AᵀA and c = Aᵀb themselves (the
// evaluator, from the response matrix without copying it): k <= kMaxGramColumns, stored inline
// so that a solve allocates nothing.
inline constexpr Eigen::Index kMaxGramColumns = 16;
using GramMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::ColMajor, kMaxGramColumns, kMaxGramColumns>;
using GramVector = Eigen::Matrix<double, Eigen::Dynamic, 1, Eigen::ColMajor, kMaxGramColumns, 1>;

// Solves the bounded problem from G, c and |b| (the scale of the stopping test). Returns false,
// leaving x unspecified, when G scaled to a unit diagonal has a reciprocal condition number
// below kMinGramRcond (or a zero column): the caller then solves with A itself.
[[nodiscard]] bool solve_bounded_normal_equations(const GramMatrix& G, const GramVector& c, double b_norm,
                                                  const Eigen::Ref<const Eigen::VectorXd>& lo,
                                                  const Eigen::Ref<const Eigen::VectorXd>& hi, GramVector& x,
                                                  int* iterations = nullptr);

// Normal equations square the condition number: x carries a relative error up to about
// kappa(A)^2 eps, the fitted field A x (what every metric uses) about kappa(A) eps (N. J. Higham,
// "Accuracy and Stability of Numerical Algorithms", 2nd ed., 2002, sec. 20.4). Above 1e-6,
// kappa <= 1e3 after equilibration, so x is good to ~1e-10 and A x to ~1e-13 relative, far
// below the objectives' meaning; the search's two-circuit cases have kappa of 10-70.
inline constexpr double kMinGramRcond = 1e-6;

}  // namespace coilwright
