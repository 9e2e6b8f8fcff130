#pragma once
// Bounded linear least squares for the circuit currents: minimise |A x - b|^2 subject to
// lo <= x <= hi. The problems are small (a column per circuit), so a primal active-set method
// (Lawson & Hanson, "Solving Least Squares Problems", 1974, ch. 23) with a QR solve per step is exact and fast.
#include <Eigen/Core>

namespace coilwright {

struct BoundedLeastSquares {
  Eigen::VectorXd x;        // the minimiser
  double residual_norm = 0; // |A x - b|
  int iterations = 0;
};

[[nodiscard]] BoundedLeastSquares solve_bounded_least_squares(const Eigen::MatrixXd& A, const Eigen::VectorXd& b,
                                                              const Eigen::VectorXd& lo, const Eigen::VectorXd& hi);

}  // namespace coilwright
