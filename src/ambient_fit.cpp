#include "coilwright/ambient_fit.hpp"

#include <array>
#include <cmath>
#include <map>

#include <Eigen/QR>
#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/survey.hpp"

namespace coilwright {

namespace detail {
namespace {

constexpr int kMaxDegree = 8;

// A polynomial in (x, y, z): exponents -> coefficient. Only used to build the basis once.
using Exponents = std::array<int, 3>;
using Poly = std::map<Exponents, double>;

Poly multiply(const Poly& a, const Poly& b) {
  Poly out;
  for (const auto& [ea, ca] : a)
    for (const auto& [eb, cb] : b) out[{ea[0] + eb[0], ea[1] + eb[1], ea[2] + eb[2]}] += ca * cb;
  return out;
}

Poly derivative(const Poly& p, int axis) {
  Poly out;
  for (const auto& [e, c] : p) {
    if (e[static_cast<std::size_t>(axis)] == 0) continue;
    Exponents d = e;
    d[static_cast<std::size_t>(axis)] -= 1;
    out[d] += c * e[static_cast<std::size_t>(axis)];
  }
  return out;
}

double factorial(int n) {
  double f = 1.0;
  for (int i = 2; i <= n; ++i) f *= i;
  return f;
}
double binomial(int n, int k) { return factorial(n) / (factorial(k) * factorial(n - k)); }

// Real regular solid harmonic r^l P_l^m(cos theta) {cos, sin}(m phi), Racah-normalised:
//   N_lm * sum_k (-1)^k 2^-l C(l,k) C(2l-2k,l) (l-2k)!/(l-2k-m)! r^2k z^(l-2k-m) * {Re, Im}(x + i y)^m,
//   N_lm = sqrt((2 - delta_m0) (l-m)!/(l+m)!)   (from memory of the associated-Legendre series).
Poly solid_harmonic(int l, int m, bool sine) {
  Poly r2{{{2, 0, 0}, 1.0}, {{0, 2, 0}, 1.0}, {{0, 0, 2}, 1.0}};
  Poly xy;  // Re or Im of (x + i y)^m
  for (int j = 0; j <= m; ++j) {
    if ((j % 2 == 1) != sine) continue;
    const double sign = ((sine ? (j - 1) / 2 : j / 2) % 2 == 0) ? 1.0 : -1.0;
    xy[{m - j, j, 0}] += sign * binomial(m, j);
  }
  Poly sum;
  Poly r2k{{{0, 0, 0}, 1.0}};
  for (int k = 0; 2 * k <= l - m; ++k) {
    const double c = ((k % 2 == 0) ? 1.0 : -1.0) * std::ldexp(1.0, -l) * binomial(l, k) * binomial(2 * l - 2 * k, l) *
                     factorial(l - 2 * k) / factorial(l - 2 * k - m);
    for (const auto& [e, v] : r2k) sum[{e[0], e[1], e[2] + l - 2 * k - m}] += c * v;
    r2k = multiply(r2k, r2);
  }
  const double norm = std::sqrt((m == 0 ? 1.0 : 2.0) * factorial(l - m) / factorial(l + m));
  Poly out = multiply(sum, xy);
  for (auto& [e, v] : out) v *= norm;
  return out;
}

struct Monomial {
  int ex, ey, ez;
  double c;
};
struct TermBasis {
  HarmonicTerm term;
  std::array<std::vector<Monomial>, 3> grad;  // components of grad R_lm
};

std::vector<TermBasis> build_basis() {
  std::vector<TermBasis> out;
  for (int l = 1; l <= kMaxDegree; ++l)
    for (int m = 0; m <= l; ++m)
      for (bool sine : {false, true}) {
        if (sine && m == 0) continue;
        const Poly r = solid_harmonic(l, m, sine);
        TermBasis b{{l, m, sine}, {}};
        for (int a = 0; a < 3; ++a)
          for (const auto& [e, c] : derivative(r, a))
            if (std::abs(c) > 1e-14) b.grad[static_cast<std::size_t>(a)].push_back({e[0], e[1], e[2], c});
        out.push_back(std::move(b));
      }
  return out;
}

const std::vector<TermBasis>& basis() {
  static const std::vector<TermBasis> table = build_basis();
  return table;
}

const TermBasis& basis_of(const HarmonicTerm& t) {
  if (t.degree < 1 || t.degree > kMaxDegree || t.order < 0 || t.order > t.degree || (t.sine && t.order == 0))
    throw std::invalid_argument(fmt::format("no harmonic term {}", t.label()));
  // Index: terms of lower degrees, then within degree l: m = 0 (1), then 2 per m.
  const int before = t.degree * t.degree - 1;
  const int within = t.order == 0 ? 0 : 2 * t.order - 1 + (t.sine ? 1 : 0);
  return basis()[static_cast<std::size_t>(before + within)];
}

Vec3 evaluate(const TermBasis& b, const Vec3& s) {
  std::array<std::array<double, kMaxDegree + 1>, 3> pw{};
  for (std::size_t a = 0; a < 3; ++a) {
    pw[a][0] = 1.0;
    for (std::size_t k = 1; k <= kMaxDegree; ++k) pw[a][k] = pw[a][k - 1] * s[static_cast<Eigen::Index>(a)];
  }
  Vec3 f = Vec3::Zero();
  for (std::size_t a = 0; a < 3; ++a)
    for (const auto& mo : b.grad[a])
      f[static_cast<Eigen::Index>(a)] += mo.c * pw[0][static_cast<std::size_t>(mo.ex)] *
                                         pw[1][static_cast<std::size_t>(mo.ey)] * pw[2][static_cast<std::size_t>(mo.ez)];
  return f;
}

}  // namespace
}  // namespace detail

std::string HarmonicTerm::label() const { return fmt::format("{}{},{}", sine ? 'S' : 'C', degree, order); }

std::vector<HarmonicTerm> harmonic_terms(int degree) {
  std::vector<HarmonicTerm> out;
  for (int l = 1; l <= degree; ++l)
    for (int m = 0; m <= l; ++m) {
      out.push_back({l, m, false});
      if (m > 0) out.push_back({l, m, true});
    }
  return out;
}

Vec3 harmonic_basis_field(const HarmonicTerm& term, const Vec3& s) { return detail::evaluate(detail::basis_of(term), s); }

void AmbientFitOptions::validate() const {
  if (degree < 1 || degree > detail::kMaxDegree)
    throw InputError(fmt::format("ambient degree = {}: must be between 1 (uniform) and {}", degree, detail::kMaxDegree));
  if (centre_m && !centre_m->allFinite()) throw InputError("ambient centre: must be finite");
}

Vec3 AmbientFit::field_at(const Vec3& r_m) const {
  const Vec3 s = (r_m - centre_m) / reference_radius_m;
  Vec3 b = Vec3::Zero();
  for (std::size_t t = 0; t < terms.size(); ++t)
    b += coefficients_T[static_cast<Eigen::Index>(t)] * harmonic_basis_field(terms[t], s);
  return b;
}

FieldSet AmbientFit::field_at(const PointSet& pts) const {
  FieldSet out(pts.size());
  for (std::size_t i = 0; i < pts.size(); ++i) {
    const Vec3 b = field_at(pts[i]);
    out.bx[i] = b.x();
    out.by[i] = b.y();
    out.bz[i] = b.z();
  }
  return out;
}

double AmbientFit::coefficient_sigma_T(std::size_t t) const {
  const auto i = static_cast<Eigen::Index>(t);
  return std::sqrt(std::max(0.0, covariance_T2(i, i)));
}

AmbientField AmbientFit::uniform_and_gradient() const { return {uniform_T, gradient_T_per_m}; }

AmbientField AmbientFit::linearised_at(const Vec3& point_m) const {
  // Central differences: exact for fields quadratic in r (degree <= 3) up to rounding; the
  // step 1e-3 r0 keeps the truncation of higher degrees near 1e-6 of their size.
  const double h = 1e-3 * reference_radius_m;
  AmbientField a;
  a.uniform_T = field_at(point_m);
  for (Eigen::Index j = 0; j < 3; ++j) {
    const Vec3 e = h * Vec3::Unit(j);
    a.gradient_T_per_m.col(j) = (field_at(point_m + e) - field_at(point_m - e)) / (2.0 * h);
  }
  // Every term is curl- and divergence-free, so the exact gradient is symmetric and traceless:
  // impose it on the difference quotient to remove its rounding.
  Mat3& g = a.gradient_T_per_m;
  g = (0.5 * (g + g.transpose())).eval();
  g -= (g.trace() / 3.0) * Mat3::Identity();
  return a;
}

AmbientFit fit_ambient(const Survey& survey, const AmbientFitOptions& options) {
  options.validate();
  AmbientFit fit;
  fit.degree = options.degree;
  fit.terms = harmonic_terms(options.degree);
  fit.weighted = survey.has_uncertainty();
  const std::size_t n = survey.size();
  const std::size_t p = fit.terms.size();
  fit.readings = n;

  // Each reading gives 3 equations; without per-reading uncertainties one more equation than
  // unknowns is needed to estimate the scatter the uncertainties are scaled by.
  const std::size_t equations_needed = p + (fit.weighted ? 0 : 1);
  const std::size_t readings_needed = (equations_needed + 2) / 3;
  if (n < readings_needed)
    throw InputError(SourceLocation{survey.source_file, 0, 0}, "",
                     fmt::format("the survey has {} reading(s); a degree-{} model has {} coefficients and needs at least {} "
                                 "readings (3 components each{}); add readings or lower the degree",
                                 n, options.degree, p, readings_needed,
                                 fit.weighted ? "" : ", and one spare equation to estimate the scatter, as no sigma column is given"));

  Vec3 centroid = Vec3::Zero();
  for (std::size_t i = 0; i < n; ++i) centroid += survey.points[i];
  centroid /= static_cast<double>(n);
  fit.centre_m = options.centre_m.value_or(centroid);
  double r0 = 0.0;
  for (std::size_t i = 0; i < n; ++i) r0 = std::max(r0, (survey.points[i] - fit.centre_m).norm());
  fit.reference_radius_m = r0 > 0.0 ? r0 : 1.0;

  const auto rows = static_cast<Eigen::Index>(3 * n);
  const auto cols = static_cast<Eigen::Index>(p);
  Eigen::MatrixXd a(rows, cols);
  Eigen::VectorXd b(rows);
  Eigen::VectorXd sqrt_w(rows);
  for (std::size_t i = 0; i < n; ++i) {
    const Vec3 s = (survey.points[i] - fit.centre_m) / fit.reference_radius_m;
    const Vec3 meas = survey.field[i];
    const double w = fit.weighted ? 1.0 / survey.sigma_T[i] : 1.0;
    for (std::size_t t = 0; t < p; ++t) {
      const Vec3 f = harmonic_basis_field(fit.terms[t], s);
      for (Eigen::Index c = 0; c < 3; ++c) a(static_cast<Eigen::Index>(3 * i) + c, static_cast<Eigen::Index>(t)) = f[c];
    }
    for (Eigen::Index c = 0; c < 3; ++c) {
      b(static_cast<Eigen::Index>(3 * i) + c) = meas[c];
      sqrt_w(static_cast<Eigen::Index>(3 * i) + c) = w;
    }
  }
  const Eigen::MatrixXd aw = sqrt_w.asDiagonal() * a;
  Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(aw.rows(), aw.cols());
  qr.setThreshold(1e-10);  // relative to the largest pivot; the basis columns are O(1) at |s| <= 1
  qr.compute(aw);
  if (static_cast<std::size_t>(qr.rank()) < p)
    throw InputError(SourceLocation{survey.source_file, 0, 0}, "",
                     fmt::format("the {} survey points do not determine all {} coefficients of a degree-{} model (rank {}): "
                                 "spread the readings over a volume rather than a line or a plane, or lower the degree",
                                 n, p, options.degree, qr.rank()));
  fit.coefficients_T = qr.solve(Eigen::VectorXd(sqrt_w.asDiagonal() * b));

  const Eigen::MatrixXd r = qr.matrixR().topLeftCorner(cols, cols).triangularView<Eigen::Upper>();
  const Eigen::MatrixXd r_inv =
      r.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(cols, cols));
  const Eigen::MatrixXd perm = qr.colsPermutation();
  fit.covariance_T2 = perm * (r_inv * r_inv.transpose()) * perm.transpose();

  const Eigen::VectorXd resid = b - a * fit.coefficients_T;
  fit.dof = 3 * n - p;
  const double chi2 = (sqrt_w.asDiagonal() * resid).squaredNorm();
  fit.chi2_reduced = fit.dof > 0 ? chi2 / static_cast<double>(fit.dof) : 0.0;
  if (!fit.weighted) fit.covariance_T2 *= fit.chi2_reduced;

  double sum2 = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double e = resid.segment<3>(static_cast<Eigen::Index>(3 * i)).norm();
    sum2 += e * e;
    if (e > fit.residual_worst_T) {
      fit.residual_worst_T = e;
      fit.worst_reading = i;
    }
  }
  fit.residual_rms_T = std::sqrt(sum2 / static_cast<double>(n));

  // Uniform part = the degree-1 terms (constant fields); gradient = the degree-2 terms (linear
  // in s = (r - c)/r0, so d/dr carries 1/r0). Higher degrees vanish at the centre with their
  // first derivatives, so these are B and grad B at the centre for any degree.
  Eigen::MatrixXd ju = Eigen::MatrixXd::Zero(3, cols);
  Eigen::MatrixXd jg = Eigen::MatrixXd::Zero(9, cols);
  for (std::size_t t = 0; t < p; ++t) {
    const auto col = static_cast<Eigen::Index>(t);
    if (fit.terms[t].degree == 1) ju.col(col) = harmonic_basis_field(fit.terms[t], Vec3::Zero());
    if (fit.terms[t].degree == 2)
      for (Eigen::Index j = 0; j < 3; ++j) {
        const Vec3 d = harmonic_basis_field(fit.terms[t], Vec3::Unit(j)) / fit.reference_radius_m;  // linear: F(e_j) = column j
        for (Eigen::Index i = 0; i < 3; ++i) jg(3 * i + j, col) = d[i];
      }
  }
  const Eigen::VectorXd u = ju * fit.coefficients_T;
  const Eigen::VectorXd g = jg * fit.coefficients_T;
  const Eigen::VectorXd u_var = (ju * fit.covariance_T2 * ju.transpose()).diagonal();
  const Eigen::VectorXd g_var = (jg * fit.covariance_T2 * jg.transpose()).diagonal();
  for (Eigen::Index i = 0; i < 3; ++i) {
    fit.uniform_T[i] = u(i);
    fit.uniform_sigma_T[i] = std::sqrt(std::max(0.0, u_var(i)));
    for (Eigen::Index j = 0; j < 3; ++j) {
      fit.gradient_T_per_m(i, j) = g(3 * i + j);
      fit.gradient_sigma_T_per_m(i, j) = std::sqrt(std::max(0.0, g_var(3 * i + j)));
    }
  }
  return fit;
}

}  // namespace coilwright
