#include "coilwright/zonal.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

#include "coilwright/clearance.hpp"
#include "coilwright/constants.hpp"
#include "coilwright/field.hpp"
#include "coilwright/sampling.hpp"

namespace coilwright {

namespace {
// Chebyshev nodes. The nearest singularity of B(s) lies at least d = 2h from the centre, so the
// coefficients fall at least as fast as rho^-m with rho = 2 + sqrt(5) (the Bernstein ellipse through
// 2ih): 28 terms reach 1e-17. More terms would only amplify rounding in the monomial conversion.
constexpr int kNodes = 28;
}

std::vector<double> chebyshev_to_monomial(const std::vector<double>& chebyshev, int degree) {
  // T_0 = 1, T_1 = x, T_{m+1} = 2x T_m - T_{m-1} (A&S 22.7.4), carried as monomial coefficients.
  const std::size_t n = chebyshev.size();
  std::vector<double> out(static_cast<std::size_t>(degree) + 1, 0.0);
  std::vector<double> tm1(n + 1, 0.0), tm(n + 1, 0.0), tp(n + 1, 0.0);
  tm1[0] = 1.0;
  if (n > 0) out[0] += chebyshev[0];
  if (n > 1) {
    tm[1] = 1.0;
    if (degree >= 1) out[1] += chebyshev[1];
  }
  for (std::size_t m = 2; m < n; ++m) {
    std::fill(tp.begin(), tp.end(), 0.0);
    for (std::size_t k = 0; k < m; ++k) tp[k + 1] += 2.0 * tm[k];
    for (std::size_t k = 0; k + 1 < m; ++k) tp[k] -= tm1[k];
    for (std::size_t k = 0; k <= std::min<std::size_t>(m, static_cast<std::size_t>(degree)); ++k) out[k] += chebyshev[m] * tp[k];
    std::swap(tm1, tm);
    std::swap(tm, tp);
  }
  return out;
}

double nearest_conductor_m(const Model& model, const Vec3& p) {
  double d = std::numeric_limits<double>::infinity();
  for (const WindingBody& b : bodies_of(model.coils)) d = std::min(d, distance_to(b, p));
  return d;
}

namespace {

constexpr int kCrossSectionNodes = 16;  // Gauss–Legendre nodes across a pack or solenoid layer

// Adds weight * b_n h^n of a coaxial loop (radius a, centre at z0 along the axis) for n <= degree:
// b_n = mu0 a^2 C_n^{3/2}(z0/R) / (2 R^{n+3}), R^2 = a^2 + z0^2, from the generating function of
// the Gegenbauer polynomials (Abramowitz & Stegun 22.9.3) applied to the on-axis loop field.
void add_loop_terms(double a, double z0, double weight, double h, Eigen::Ref<Eigen::VectorXd> out) {
  const double R = std::hypot(a, z0);
  const double x = z0 / R, t = h / R;
  double c_prev = 1.0, c = 3.0 * x;  // C_0, C_1 (A&S 22.7.3 recurrence below)
  double scale = weight * mu0 * a * a / (2.0 * R * R * R);
  out[0] += scale;
  for (Eigen::Index n = 1; n < out.size(); ++n) {
    scale *= t;
    out[n] += scale * c;
    const double next = (2.0 * x * (n + 1.5) * c - (n + 2.0) * c_prev) / (n + 1.0);
    c_prev = c;
    c = next;
  }
}

// Adds the averaged loop terms over [z0 - half, z0 + half] x [r_in, r_out] (uniform current density),
// in panels no wider than the smallest radius so the smooth integrand is resolved.
void add_sheet_terms(double r_in, double r_out, double z0, double half, double weight, double h,
                     Eigen::Ref<Eigen::VectorXd> out) {
  const auto& g = gauss_legendre(kCrossSectionNodes);
  const int radial = r_out > r_in ? kCrossSectionNodes : 1;
  const int panels = half > 0 ? std::max(1, static_cast<int>(std::ceil(2.0 * half / std::max(r_in, 1e-3 * half)))) : 1;
  const int axial = half > 0 ? kCrossSectionNodes : 1;
  for (int p = 0; p < panels; ++p) {
    const double lo = z0 - half + 2.0 * half * p / panels, width = 2.0 * half / panels;
    for (int j = 0; j < axial; ++j) {
      const double z = axial == 1 ? z0 : lo + 0.5 * width * (g.nodes[j] + 1.0);
      const double wz = axial == 1 ? 1.0 : 0.5 * g.weights[j] / panels;
      for (int i = 0; i < radial; ++i) {
        const double r = radial == 1 ? r_in : 0.5 * (r_in + r_out) + 0.5 * (r_out - r_in) * g.nodes[i];
        const double wr = radial == 1 ? 1.0 : 0.5 * g.weights[i];
        add_loop_terms(r, z, weight * wz * wr, h, out);
      }
    }
  }
}

// Exact terms of a circular coil coaxial with the expansion axis; false for any other coil.
bool add_coaxial_terms(const Coil& c, const Vec3& centre, const Vec3& a, double h, Eigen::Ref<Eigen::VectorXd> out) {
  const bool circular = c.shape == Shape::loop || c.shape == Shape::pack || c.shape == Shape::solenoid;
  if (!circular || c.axis.cross(a).norm() > 1e-12) return false;
  const double direction = c.axis.dot(a) > 0 ? 1.0 : -1.0;
  for (const Winding& w : windings(c)) {
    const Vec3 d = w.centre_m - centre;
    const double z0 = d.dot(a);
    if ((d - z0 * a).norm() > 1e-12 * std::max(1.0, d.norm())) return false;
  }
  for (const Winding& w : windings(c)) {
    const double z0 = (w.centre_m - centre).dot(a);
    const double weight = direction * w.sign * c.turns;
    switch (c.shape) {
      case Shape::loop: add_loop_terms(c.radius_m, z0, weight, h, out); break;
      case Shape::pack: add_sheet_terms(c.inner_radius_m, c.outer_radius_m, z0, 0.5 * c.width_m, weight, h, out); break;
      case Shape::solenoid:
        if (c.multilayer())
          add_sheet_terms(c.inner_radius_m, c.outer_radius_m, z0, 0.5 * c.length_m, weight, h, out);
        else
          add_sheet_terms(c.radius_m, c.radius_m, z0, 0.5 * c.length_m, weight, h, out);
        break;
      default: return false;
    }
  }
  return true;
}

// Terms of any coil by Chebyshev interpolation of its exact on-axis field on [-h, h].
void add_fitted_terms(const Coil& c, const Vec3& centre, const Vec3& a, double h, Eigen::Ref<Eigen::VectorXd> out) {
  PointSet pts;
  for (int j = 0; j < kNodes; ++j) pts.push_back(centre + h * std::cos(std::numbers::pi * (j + 0.5) / kNodes) * a);
  FieldSet b(pts.size());
  add_coil_field(c, 1.0, view(pts), view(b));
  std::vector<double> cheb(kNodes, 0.0);
  for (int m = 0; m < kNodes; ++m) {
    double s = 0.0;
    for (int j = 0; j < kNodes; ++j) s += b[j].dot(a) * std::cos(m * std::numbers::pi * (j + 0.5) / kNodes);
    cheb[m] = (m == 0 ? 1.0 : 2.0) * s / kNodes;
  }
  const auto mono = chebyshev_to_monomial(cheb, static_cast<int>(out.size()) - 1);
  for (Eigen::Index n = 0; n < out.size(); ++n) out[n] += mono[n];
}

}  // namespace

AxialResponse axial_response(const Model& model, const Vec3& centre, const Vec3& axis, int degree) {
  const Vec3 a = axis.normalized();
  AxialResponse r;
  r.scale_m = 0.5 * nearest_conductor_m(model, centre);
  r.per_ampere.setZero(degree + 1, static_cast<Eigen::Index>(model.circuits.size()));
  for (const Coil& c : model.coils) {
    auto col = r.per_ampere.col(static_cast<Eigen::Index>(model.circuit_index(c.circuit)));
    if (!add_coaxial_terms(c, centre, a, r.scale_m, col)) add_fitted_terms(c, centre, a, r.scale_m, col);
  }
  return r;
}

}  // namespace coilwright
