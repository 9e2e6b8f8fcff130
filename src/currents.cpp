#include "coilwright/currents.hpp"

#include <Eigen/QR>
#include <algorithm>
#include <limits>
#include <vector>

namespace coilwright {

namespace {

// Least squares over the free variables with the others held at their current values.
Eigen::VectorXd subproblem(const Eigen::MatrixXd& A, const Eigen::VectorXd& b, const Eigen::VectorXd& x,
                           const std::vector<bool>& fixed) {
  const Eigen::Index n = A.cols();
  std::vector<Eigen::Index> free_idx;
  Eigen::VectorXd rhs = b;
  for (Eigen::Index j = 0; j < n; ++j) {
    if (fixed[j])
      rhs -= A.col(j) * x[j];
    else
      free_idx.push_back(j);
  }
  Eigen::VectorXd out = x;
  if (free_idx.empty()) return out;
  Eigen::MatrixXd Af(A.rows(), static_cast<Eigen::Index>(free_idx.size()));
  for (std::size_t k = 0; k < free_idx.size(); ++k) Af.col(static_cast<Eigen::Index>(k)) = A.col(free_idx[k]);
  const Eigen::VectorXd xf = Af.colPivHouseholderQr().solve(rhs);
  for (std::size_t k = 0; k < free_idx.size(); ++k) out[free_idx[k]] = xf[static_cast<Eigen::Index>(k)];
  return out;
}

}  // namespace

BoundedLeastSquares solve_bounded_least_squares(const Eigen::MatrixXd& A, const Eigen::VectorXd& b,
                                                const Eigen::VectorXd& lo, const Eigen::VectorXd& hi) {
  const Eigen::Index n = A.cols();
  BoundedLeastSquares r;
  r.x = Eigen::VectorXd::Zero(n).cwiseMax(lo).cwiseMin(hi);
  std::vector<bool> fixed(static_cast<std::size_t>(n), false);
  // Variables with lo == hi are constants.
  for (Eigen::Index j = 0; j < n; ++j) fixed[j] = !(lo[j] < hi[j]);
  const int max_iter = 10 * static_cast<int>(n) + 10;
  for (r.iterations = 0; r.iterations < max_iter; ++r.iterations) {
    const Eigen::VectorXd target = subproblem(A, b, r.x, fixed);
    // Step from the feasible x toward the subproblem minimiser until a bound blocks.
    double alpha = 1.0;
    Eigen::Index blocking = -1;
    for (Eigen::Index j = 0; j < n; ++j) {
      if (fixed[j]) continue;
      const double d = target[j] - r.x[j];
      if (d < 0 && target[j] < lo[j]) {
        const double a = (lo[j] - r.x[j]) / d;
        if (a < alpha) alpha = a, blocking = j;
      } else if (d > 0 && target[j] > hi[j]) {
        const double a = (hi[j] - r.x[j]) / d;
        if (a < alpha) alpha = a, blocking = j;
      }
    }
    if (blocking >= 0) {
      r.x += std::max(0.0, alpha) * (target - r.x);
      r.x[blocking] = target[blocking] < lo[blocking] ? lo[blocking] : hi[blocking];
      fixed[blocking] = true;
      continue;
    }
    r.x = target;
    // Optimal when no variable held at a bound would decrease the objective by leaving it.
    const Eigen::VectorXd grad = A.transpose() * (A * r.x - b);
    Eigen::Index release = -1;
    // Releasing on rounding noise would cycle: demand a gradient above the noise level.
    double most = 1e-12 * (A.norm() * b.norm() + std::numeric_limits<double>::min());
    for (Eigen::Index j = 0; j < n; ++j) {
      if (!fixed[j] || !(lo[j] < hi[j])) continue;
      const double push = r.x[j] <= lo[j] ? -grad[j] : grad[j];  // > 0: wants to move inward
      if (push > most) most = push, release = j;
    }
    if (release < 0) break;
    fixed[release] = false;
  }
  r.residual_norm = (A * r.x - b).norm();
  return r;
}

}  // namespace coilwright
