#include "coilwright/currents.hpp"

#include <Eigen/Cholesky>
#include <Eigen/QR>
#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <vector>

namespace coilwright {

namespace {

// Least squares over the free variables with the others held at their current values (QR).
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

// The active-set iteration, shared by both forms. `solve(fixed, x, target)` writes the minimiser
// over the free variables (fixed ones held at x); `gradient(x, g)` writes Aᵀ(A x - b).
template <class Bounds, class Vector, class Fixed, class Solve, class Gradient>
int active_set(const Bounds& lo, const Bounds& hi, double noise, Vector& x, Fixed& fixed, Vector& target, Vector& grad,
               Solve&& solve, Gradient&& gradient) {
  const Eigen::Index n = lo.size();
  x = Vector::Zero(n).cwiseMax(lo).cwiseMin(hi);
  // Variables with lo == hi are constants.
  for (Eigen::Index j = 0; j < n; ++j) fixed[j] = !(lo[j] < hi[j]);
  const int max_iter = 10 * static_cast<int>(n) + 10;
  int it = 0;
  for (; it < max_iter; ++it) {
    solve(fixed, x, target);
    // Step from the feasible x toward the subproblem minimiser until a bound blocks.
    double alpha = 1.0;
    Eigen::Index blocking = -1;
    for (Eigen::Index j = 0; j < n; ++j) {
      if (fixed[j]) continue;
      const double d = target[j] - x[j];
      if (d < 0 && target[j] < lo[j]) {
        const double a = (lo[j] - x[j]) / d;
        if (a < alpha) alpha = a, blocking = j;
      } else if (d > 0 && target[j] > hi[j]) {
        const double a = (hi[j] - x[j]) / d;
        if (a < alpha) alpha = a, blocking = j;
      }
    }
    if (blocking >= 0) {
      x += std::max(0.0, alpha) * (target - x);
      x[blocking] = target[blocking] < lo[blocking] ? lo[blocking] : hi[blocking];
      fixed[blocking] = true;
      continue;
    }
    x = target;
    // Optimal when no variable held at a bound would decrease the objective by leaving it.
    gradient(x, grad);
    Eigen::Index release = -1;
    // Releasing on rounding noise would cycle: demand a gradient above the noise level.
    double most = noise;
    for (Eigen::Index j = 0; j < n; ++j) {
      if (!fixed[j] || !(lo[j] < hi[j])) continue;
      const double push = x[j] <= lo[j] ? -grad[j] : grad[j];  // > 0: wants to move inward
      if (push > most) most = push, release = j;
    }
    if (release < 0) break;
    fixed[release] = false;
  }
  return it;
}

// Noise level of the gradient Aᵀ(A x - b): 1e-12 |A|_F |b|.
double gradient_noise(double a_norm, double b_norm) {
  return 1e-12 * (a_norm * b_norm + std::numeric_limits<double>::min());
}

}  // namespace

bool solve_bounded_normal_equations(const GramMatrix& G, const GramVector& c, double b_norm,
                                    const Eigen::Ref<const Eigen::VectorXd>& lo, const Eigen::Ref<const Eigen::VectorXd>& hi,
                                    GramVector& x, int* iterations) {
  const Eigen::Index n = G.rows();
  if (n > kMaxGramColumns) return false;
  // Equilibrate to a unit diagonal (within sqrt(n) of the best diagonal scaling: A. van der
  // Sluis, Numer. Math. 14 (1969) 14-23), then judge the conditioning once: every principal
  // submatrix, i.e. every subproblem below, is at least as well conditioned (Cauchy interlacing).
  GramVector s(n);
  for (Eigen::Index j = 0; j < n; ++j) {
    if (!(G(j, j) > 0.0) || !std::isfinite(G(j, j))) return false;
    s[j] = 1.0 / std::sqrt(G(j, j));
  }
  const GramMatrix Gs = s.asDiagonal() * G * s.asDiagonal();
  const Eigen::LLT<GramMatrix> llt(Gs);
  if (llt.info() != Eigen::Success) return false;
  // Two columns at angle theta: eigenvalues 1 +- |cos theta|, so the condition number is known
  // exactly (and equals Eigen's L1 estimate, which costs more than the solve itself).
  const double rcond = n == 1 ? 1.0 : n == 2 ? (1.0 - std::abs(Gs(1, 0))) / (1.0 + std::abs(Gs(1, 0))) : llt.rcond();
  if (!(rcond >= kMinGramRcond)) return false;

  // A subproblem is the full scaled system with the fixed variables' rows and columns replaced
  // by the identity, so every factorisation has the same size and lives on the stack.
  GramMatrix H(n, n);
  GramVector r(n), target(n), grad(n);
  std::array<bool, kMaxGramColumns> fixed{};
  auto solve = [&](const std::array<bool, kMaxGramColumns>& fx, const GramVector& at, GramVector& out) {
    if (std::none_of(fx.begin(), fx.begin() + n, [](bool f) { return f; })) {  // the factor above serves
      out = s.cwiseProduct(llt.solve(s.cwiseProduct(c)));
      return;
    }
    for (Eigen::Index i = 0; i < n; ++i) {
      if (fx[i]) {
        H.row(i).setZero();
        H.col(i).setZero();
        H(i, i) = 1.0;
        r[i] = at[i] / s[i];
        continue;
      }
      double ri = c[i];
      for (Eigen::Index j = 0; j < n; ++j) {
        if (fx[j]) {
          ri -= G(i, j) * at[j];
        } else {
          H(i, j) = Gs(i, j);
        }
      }
      r[i] = s[i] * ri;
    }
    out = s.cwiseProduct(H.llt().solve(r));
    for (Eigen::Index i = 0; i < n; ++i)
      if (fx[i]) out[i] = at[i];  // exactly at its bound: the release test compares with it
  };
  auto gradient = [&](const GramVector& at, GramVector& g) { g.noalias() = G * at - c; };
  const int it = active_set(lo, hi, gradient_noise(std::sqrt(G.trace()), b_norm), x, fixed, target, grad, solve, gradient);
  if (iterations) *iterations = it;
  return x.allFinite();
}

BoundedLeastSquares solve_bounded_least_squares(const Eigen::MatrixXd& A, const Eigen::VectorXd& b,
                                                const Eigen::VectorXd& lo, const Eigen::VectorXd& hi) {
  const Eigen::Index n = A.cols();
  BoundedLeastSquares r;
  if (n <= kMaxGramColumns) {
    GramMatrix G(n, n);
    GramVector c(n), x(n);
    for (Eigen::Index j = 0; j < n; ++j) {
      for (Eigen::Index k = 0; k <= j; ++k) G(j, k) = G(k, j) = A.col(j).dot(A.col(k));
      c[j] = A.col(j).dot(b);
    }
    if (solve_bounded_normal_equations(G, c, b.norm(), lo, hi, x, &r.iterations)) {
      r.x = x;
      r.residual_norm = (A * r.x - b).norm();
      return r;
    }
  }
  // Ill-conditioned (or many circuits): QR of the free columns at every step.
  std::vector<bool> fixed(static_cast<std::size_t>(n), false);
  Eigen::VectorXd target(n), grad(n);
  auto solve = [&](const std::vector<bool>& fx, const Eigen::VectorXd& at, Eigen::VectorXd& out) {
    out = subproblem(A, b, at, fx);
  };
  auto gradient = [&](const Eigen::VectorXd& at, Eigen::VectorXd& g) { g = A.transpose() * (A * at - b); };
  r.iterations = active_set(lo, hi, gradient_noise(A.norm(), b.norm()), r.x, fixed, target, grad, solve, gradient);
  r.residual_norm = (A * r.x - b).norm();
  return r;
}

}  // namespace coilwright
