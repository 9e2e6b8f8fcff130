// Ambient-field fit: solid-harmonic basis and weighted least squares.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>
#include <string>

#include "coilwright/ambient_fit.hpp"
#include "coilwright/error.hpp"
#include "coilwright/survey.hpp"

using namespace coilwright;

namespace {

// A field built independently of the fit's basis from harmonic polynomials (each is the
// gradient of a harmonic potential, so divergence- and curl-free; checked by hand):
//   uniform B0; gradient G symmetric and traceless; K1 grad(xyz) = K1 (yz, xz, xy);
//   K2 grad(x^3 - 3 x y^2) = K2 (3x^2 - 3y^2, -6xy, 0).
struct Synthetic {
  Vec3 b0{21.5e-6, -3.2e-6, -41.0e-6};  // T, Earth-like (our choice)
  Mat3 g;                                // T/m
  double k1 = 0.0, k2 = 0.0;             // T/m^2
  Synthetic() { g << 150e-9, 90e-9, -40e-9, 90e-9, -310e-9, 120e-9, -40e-9, 120e-9, 160e-9; }
  [[nodiscard]] Vec3 at(const Vec3& r) const {
    Vec3 b = b0 + g * r;
    b += k1 * Vec3(r.y() * r.z(), r.x() * r.z(), r.x() * r.y());
    b += k2 * Vec3(3 * r.x() * r.x() - 3 * r.y() * r.y(), -6 * r.x() * r.y(), 0.0);
    return b;
  }
};

// A 3 x 3 x 3 grid, spacing h about `centre`, optionally with Gaussian noise of sigma per component.
Survey grid_survey(const Synthetic& f, const Vec3& centre, double h, double sigma, bool give_sigma, unsigned seed) {
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, 1.0);
  Survey s;
  s.source_file = "synthetic";
  for (int i = -1; i <= 1; ++i)
    for (int j = -1; j <= 1; ++j)
      for (int k = -1; k <= 1; ++k) {
        const Vec3 r = centre + h * Vec3(i, j, k);
        Vec3 b = f.at(r);
        for (int a = 0; a < 3; ++a) b[a] += sigma * noise(rng);
        s.points.push_back(r);
        s.field.bx.push_back(b.x());
        s.field.by.push_back(b.y());
        s.field.bz.push_back(b.z());
        if (give_sigma) s.sigma_T.push_back(sigma);
        s.lines.push_back(s.lines.size() + 2);
      }
  return s;
}

// Recovery of exact data is limited by rounding in a QR solve of a well-conditioned 81 x 15
// system: 1e-9 relative to the field size (about 5e-5 T) leaves a wide margin over ~1e-15.
constexpr double kExactAbsT = 1e-9 * 5e-5;
constexpr double kExactAbsGrad = 1e-9 * 5e-5 / 0.1;  // per metre of the 0.1 m grid

}  // namespace

TEST_CASE("ambient fit: term counts are (L+1)^2 - 1", "[ambient]") {
  // 3 uniform, 3 + 5 with gradients, 3 + 5 + 7 (common practice, no source: 2l+1 terms per degree).
  CHECK(harmonic_term_count(1) == 3);
  CHECK(harmonic_term_count(2) == 8);
  CHECK(harmonic_term_count(3) == 15);
  for (int l = 1; l <= 8; ++l) CHECK(harmonic_terms(l).size() == harmonic_term_count(l));
}

TEST_CASE("ambient fit: basis fields are divergence- and curl-free", "[ambient]") {
  // Central differences with h = 1e-4 on polynomials of degree <= 4 with O(1) coefficients at
  // |s| < 1: truncation ~h^2 * (third derivative ~ 10) = 1e-7, rounding ~1e-16/h = 1e-12.
  constexpr double h = 1e-4;
  constexpr double kTol = 1e-6;
  const Vec3 s(0.31, -0.47, 0.22);
  for (const auto& t : harmonic_terms(5)) {
    Mat3 d;  // d(i, j) = dF_i/ds_j
    for (int j = 0; j < 3; ++j) {
      const Vec3 e = h * Vec3::Unit(j);
      d.col(j) = (harmonic_basis_field(t, s + e) - harmonic_basis_field(t, s - e)) / (2 * h);
    }
    INFO(t.label());
    CHECK(std::abs(d.trace()) < kTol);
    CHECK(std::abs(d(0, 1) - d(1, 0)) < kTol);
    CHECK(std::abs(d(0, 2) - d(2, 0)) < kTol);
    CHECK(std::abs(d(1, 2) - d(2, 1)) < kTol);
  }
}

TEST_CASE("ambient fit: low-degree basis fields have their known form", "[ambient]") {
  // R_1 = (z, x, y) and R_20 = z^2 - (x^2 + y^2)/2 (from P_1, P_2 with Racah normalisation, from
  // memory), so grad R_20 = (-x, -y, 2z). Exact polynomial arithmetic: 1e-14 absolute.
  const Vec3 s(0.3, -0.2, 0.5);
  CHECK((harmonic_basis_field({1, 0, false}, s) - Vec3::UnitZ()).norm() < 1e-14);
  CHECK((harmonic_basis_field({1, 1, false}, s) - Vec3::UnitX()).norm() < 1e-14);
  CHECK((harmonic_basis_field({1, 1, true}, s) - Vec3::UnitY()).norm() < 1e-14);
  CHECK((harmonic_basis_field({2, 0, false}, s) - Vec3(-0.3, 0.2, 1.0)).norm() < 1e-14);
}

TEST_CASE("ambient fit: exact harmonic fields are recovered exactly", "[ambient]") {
  Synthetic f;
  f.k1 = 800e-9;
  f.k2 = -300e-9;
  const Vec3 centre(0.02, -0.01, 0.03);
  const Survey s = grid_survey(f, centre, 0.1, 0.0, false, 1);
  AmbientFitOptions opt;
  opt.degree = 3;
  opt.centre_m = centre;
  const AmbientFit fit = fit_ambient(s, opt);
  // Uniform and gradient at the centre: B(c) and the Jacobian there (derived by hand from at()).
  const Vec3 c = centre;
  Mat3 jac = f.g;
  jac.row(0) += f.k1 * Vec3(0, c.z(), c.y()).transpose() + f.k2 * Vec3(6 * c.x(), -6 * c.y(), 0).transpose();
  jac.row(1) += f.k1 * Vec3(c.z(), 0, c.x()).transpose() + f.k2 * Vec3(-6 * c.y(), -6 * c.x(), 0).transpose();
  jac.row(2) += f.k1 * Vec3(c.y(), c.x(), 0).transpose();
  CHECK((fit.uniform_T - f.at(c)).norm() < kExactAbsT);
  CHECK((fit.gradient_T_per_m - jac).norm() < kExactAbsGrad);
  CHECK(fit.residual_worst_T < kExactAbsT);
  // Off the grid, inside it.
  const Vec3 p = centre + Vec3(0.07, -0.04, 0.05);
  CHECK((fit.field_at(p) - f.at(p)).norm() < kExactAbsT);
  CHECK(fit.dof == 81 - 15);
}

TEST_CASE("ambient fit: degree 2 recovers a uniform field with a traceless symmetric gradient", "[ambient]") {
  const Synthetic f;
  const Survey s = grid_survey(f, Vec3::Zero(), 0.1, 0.0, false, 1);
  const AmbientFit fit = fit_ambient(s);  // default degree 2, centre = centroid = 0
  CHECK((fit.uniform_T - f.b0).norm() < kExactAbsT);
  CHECK((fit.gradient_T_per_m - f.g).norm() < kExactAbsGrad);
  CHECK(std::abs(fit.gradient_T_per_m.trace()) < kExactAbsGrad);
  const AmbientField a = fit.uniform_and_gradient();
  CHECK((a.uniform_T - f.b0).norm() < kExactAbsT);
}

TEST_CASE("ambient fit: with noise, the coefficients lie within their stated uncertainties", "[ambient]") {
  Synthetic f;
  f.k1 = 500e-9;
  constexpr double sigma = 3e-9;  // T, a fluxgate's typical noise (from memory)
  for (const bool give_sigma : {true, false}) {
    for (unsigned seed : {7u, 8u, 9u}) {
      const Survey s = grid_survey(f, Vec3::Zero(), 0.1, sigma, give_sigma, seed);
      AmbientFitOptions opt;
      opt.degree = 3;
      const AmbientFit fit = fit_ambient(s, opt);
      INFO("sigma given " << give_sigma << ", seed " << seed);
      // 4 sigma: a Gaussian exceeds it with probability 6e-5 per coefficient, so the 3 x 3 x 9
      // checks here fail by chance with probability < 1e-2 (and the seeds are fixed).
      for (int i = 0; i < 3; ++i) {
        CHECK(std::abs(fit.uniform_T[i] - f.b0[i]) < 4 * fit.uniform_sigma_T[i]);
        for (int j = 0; j < 3; ++j)
          CHECK(std::abs(fit.gradient_T_per_m(i, j) - f.g(i, j)) < 4 * fit.gradient_sigma_T_per_m(i, j));
      }
      // The uncertainties are of the right size: the uniform term is a mean over 27 readings,
      // so its sigma is near sigma/sqrt(27) = 0.58 nT; allow a factor 2 either way.
      CHECK(fit.uniform_sigma_T.x() > 0.5 * sigma / std::sqrt(27.0));
      CHECK(fit.uniform_sigma_T.x() < 2.0 * sigma / std::sqrt(27.0));
      if (give_sigma) {
        // chi^2/dof with dof = 66 has standard deviation sqrt(2/66) = 0.17: +-4 of those.
        CHECK(fit.chi2_reduced > 1.0 - 4 * 0.17);
        CHECK(fit.chi2_reduced < 1.0 + 4 * 0.17);
      }
    }
  }
}

TEST_CASE("ambient fit: too few readings are refused with the true requirement", "[ambient]") {
  const Synthetic f;
  Survey s = grid_survey(f, Vec3::Zero(), 0.1, 0.0, false, 1);
  auto keep = [&](std::size_t n) {
    Survey t = s;
    t.points.x.resize(n); t.points.y.resize(n); t.points.z.resize(n);
    t.field.bx.resize(n); t.field.by.resize(n); t.field.bz.resize(n);
    t.lines.resize(n);
    return t;
  };
  // Degree 2: 8 coefficients; without sigma 9 equations are needed -> 3 readings.
  AmbientFitOptions opt;
  opt.degree = 2;
  try {
    (void)fit_ambient(keep(2), opt);
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK_THAT(std::string(e.what()), Catch::Contains("has 2 reading(s)") && Catch::Contains("at least 3 readings"));
  }
  // Degree 3: 15 coefficients, 16 equations -> 6 readings.
  opt.degree = 3;
  CHECK_THROWS_WITH(fit_ambient(keep(5), opt), Catch::Contains("at least 6 readings"));
  // With sigma, 15 equations suffice -> 5 readings (the count passes; the five grid points used
  // here lie in one corner line-up, so the rank test may still refuse: only the count is checked).
  Survey w = keep(5);
  w.sigma_T.assign(5, 1e-9);
  try {
    (void)fit_ambient(w, opt);
  } catch (const InputError& e) {
    CHECK_THAT(std::string(e.what()), !Catch::Contains("at least"));
  }
}

TEST_CASE("ambient fit: points on a line cannot determine a gradient", "[ambient]") {
  Survey s;
  s.source_file = "line.csv";
  for (int i = 0; i < 10; ++i) {
    s.points.push_back(Vec3(0.01 * i, 0, 0));
    s.field.bx.push_back(1e-6); s.field.by.push_back(0); s.field.bz.push_back(0);
    s.lines.push_back(static_cast<std::size_t>(i + 2));
  }
  CHECK_THROWS_WITH(fit_ambient(s), Catch::Contains("do not determine") && Catch::Contains("line.csv"));
  AmbientFitOptions opt;
  opt.degree = 1;
  CHECK(fit_ambient(s, opt).uniform_T.x() == Approx(1e-6).epsilon(1e-12));
}

TEST_CASE("ambient fit: default options are valid; bad degrees are refused", "[ambient]") {
  CHECK_NOTHROW(AmbientFitOptions{}.validate());
  AmbientFitOptions bad;
  bad.degree = 0;
  CHECK_THROWS_WITH(bad.validate(), Catch::Contains("degree = 0"));
  bad.degree = 9;
  CHECK_THROWS_AS(bad.validate(), InputError);
}
