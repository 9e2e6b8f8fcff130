// Bounded least squares for circuit currents.
// Rule: the solution satisfies the Karush–Kuhn–Tucker conditions of min |Ax-b|^2, lo <= x <= hi
// (common practice, no source): free variables have zero gradient, variables at a bound have a
// gradient pointing out of the box. Checked against brute force over all active sets.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include <Eigen/QR>

#include "coilwright/currents.hpp"

using coilwright::solve_bounded_least_squares;

namespace {

// Brute force: every assignment of {free, at lower, at upper} to each variable; keep the best
// feasible one.
double brute_force_best(const Eigen::MatrixXd& A, const Eigen::VectorXd& b, const Eigen::VectorXd& lo,
                        const Eigen::VectorXd& hi) {
  const int n = static_cast<int>(A.cols());
  int combos = 1;
  for (int i = 0; i < n; ++i) combos *= 3;
  double best = 1e300;
  for (int code = 0; code < combos; ++code) {
    Eigen::VectorXd x = Eigen::VectorXd::Zero(n);
    std::vector<int> free_idx;
    int c = code;
    for (int i = 0; i < n; ++i, c /= 3) {
      if (c % 3 == 0) free_idx.push_back(i);
      if (c % 3 == 1) x[i] = lo[i];
      if (c % 3 == 2) x[i] = hi[i];
    }
    Eigen::VectorXd rhs = b - A * x;
    if (!free_idx.empty()) {
      Eigen::MatrixXd Af(A.rows(), static_cast<Eigen::Index>(free_idx.size()));
      for (std::size_t k = 0; k < free_idx.size(); ++k) Af.col(static_cast<Eigen::Index>(k)) = A.col(free_idx[k]);
      const Eigen::VectorXd xf = Af.colPivHouseholderQr().solve(rhs);
      for (std::size_t k = 0; k < free_idx.size(); ++k) x[free_idx[k]] = xf[static_cast<Eigen::Index>(k)];
    }
    if (((x - lo).array() < -1e-12).any() || ((hi - x).array() < -1e-12).any()) continue;
    best = std::min(best, (A * x - b).norm());
  }
  return best;
}

}  // namespace

TEST_CASE("unconstrained optimum inside the bounds is returned unchanged", "[currents]") {
  Eigen::MatrixXd A(4, 2);
  A << 1, 0, 0, 1, 1, 1, 1, -1;
  const Eigen::VectorXd x_true = Eigen::Vector2d(0.3, -0.7);
  const Eigen::VectorXd b = A * x_true;
  const auto r = solve_bounded_least_squares(A, b, Eigen::Vector2d(-1, -1), Eigen::Vector2d(1, 1));
  CHECK((r.x - x_true).norm() < 1e-14);
  CHECK(r.residual_norm < 1e-14);
}

TEST_CASE("an active bound holds the variable at the bound", "[currents]") {
  Eigen::MatrixXd A = Eigen::MatrixXd::Identity(2, 2);
  const auto r = solve_bounded_least_squares(A, Eigen::Vector2d(5, -0.25), Eigen::Vector2d(-1, -1), Eigen::Vector2d(1, 1));
  CHECK(r.x[0] == Approx(1.0).margin(1e-15));
  CHECK(r.x[1] == Approx(-0.25).margin(1e-15));
}

TEST_CASE("random problems agree with brute force over active sets", "[currents]") {
  std::mt19937_64 rng(42);
  std::normal_distribution<double> g(0.0, 1.0);
  for (int trial = 0; trial < 200; ++trial) {
    const int n = 1 + trial % 4, m = 3 + trial % 7;
    Eigen::MatrixXd A(m, n);
    Eigen::VectorXd b(m), lo(n), hi(n);
    for (int i = 0; i < m; ++i) {
      b[i] = 3 * g(rng);
      for (int j = 0; j < n; ++j) A(i, j) = g(rng);
    }
    for (int j = 0; j < n; ++j) {
      lo[j] = -std::abs(g(rng));
      hi[j] = std::abs(g(rng));
    }
    const auto r = solve_bounded_least_squares(A, b, lo, hi);
    REQUIRE(((r.x - lo).array() >= -1e-15).all());
    REQUIRE(((hi - r.x).array() >= -1e-15).all());
    // Same optimal residual as brute force, to rounding (1e-10 relative: QR on well-conditioned 10x4 systems).
    CHECK(r.residual_norm == Approx(brute_force_best(A, b, lo, hi)).epsilon(1e-10).margin(1e-12));
  }
}

TEST_CASE("the normal equations agree with QR where accepted and refuse ill-conditioned columns", "[currents]") {
  // Two columns at a small angle theta: kappa = cot(theta/2) after equilibration, so the Gram
  // matrix's reciprocal condition number is tan(theta/2)^2 (accepted above kMinGramRcond).
  std::mt19937_64 rng(3);
  std::normal_distribution<double> g(0.0, 1.0);
  const int m = 500;
  Eigen::VectorXd u(m), v(m), b(m);
  for (int i = 0; i < m; ++i) u[i] = g(rng), v[i] = g(rng), b[i] = g(rng);
  v -= u * (u.dot(v) / u.squaredNorm());
  u.normalize();
  v.normalize();
  const Eigen::VectorXd lo = Eigen::Vector2d(-1e9, -1e9), hi = Eigen::Vector2d(1e9, 1e9);
  for (const double theta : {0.5, 1e-2, 3e-3, 1e-4, 1e-7}) {
    Eigen::MatrixXd A(m, 2);
    A.col(0) = 3.0 * u;
    A.col(1) = 0.01 * (std::cos(theta) * u + std::sin(theta) * v);
    coilwright::GramMatrix G = A.transpose() * A;
    coilwright::GramVector c = A.transpose() * b, x(2);
    const bool accepted = coilwright::solve_bounded_normal_equations(G, c, b.norm(), lo, hi, x);
    const double rcond = std::pow(std::tan(0.5 * theta), 2);
    CHECK(accepted == (rcond >= coilwright::kMinGramRcond));
    const Eigen::VectorXd qr = A.colPivHouseholderQr().solve(b);
    const auto r = solve_bounded_least_squares(A, b, lo, hi);
    // Either path: the currents to kappa^2 eps (normal equations; QR is better), with kappa
    // = cot(theta/2) <= 1e3 where accepted; the fitted values to kappa eps.
    const double kappa = 1.0 / std::tan(0.5 * theta);
    CHECK((r.x - qr).norm() <= 10.0 * kappa * kappa * 2.2e-16 * qr.norm());
    CHECK((A * r.x - A * qr).norm() <= 10.0 * kappa * 2.2e-16 * b.norm());
    if (accepted) CHECK((Eigen::VectorXd(x) - qr).norm() <= 10.0 * kappa * kappa * 2.2e-16 * qr.norm());
  }
}
