#include "coilwright/inductance.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include <boost/math/special_functions/ellint_2.hpp>
#include <boost/math/special_functions/ellint_d.hpp>

#include "coilwright/constants.hpp"
#include "coilwright/model.hpp"
#include "hw_quadrature.hpp"

namespace coilwright {

using hw_detail::gauss_legendre_rule;

Filament Filament::loop(const Vec3& centre, const Vec3& axis, double radius) {
  Filament f;
  f.circle = true;
  f.centre_m = centre;
  f.axis = axis.normalized();
  f.radius_m = radius;
  return f;
}

Filament Filament::polygon(std::vector<Vec3> vertices) {
  Filament f;
  f.circle = false;
  f.vertices_m = std::move(vertices);
  return f;
}

namespace {

// D(k) = (K(k) - E(k))/k^2 of modulus k in [0, 1).
double ellint_d(double k) { return boost::math::ellint_d(k); }

// M = 2 mu0 sqrt(ab) k1^(3/2) D(k1) = 16 mu0 a^2 b^2 D(k1) / (r1 + r2)^3 (no square roots of ab).
double landen_mutual(double a, double b, double d) {
  const double r1 = std::hypot(a - b, d), r2 = std::hypot(a + b, d);
  const double s = r1 + r2;
  const double k1 = 4.0 * a * b / (s * s);
  if (!(k1 < 1.0)) return std::numeric_limits<double>::infinity();
  return 16.0 * mu0 * a * a * b * b * ellint_d(k1) / (s * s * s);
}

bool coaxial(const Filament& a, const Filament& b, double& d, double& orientation) {
  const double scale = std::max(a.radius_m, b.radius_m);
  if (a.axis.cross(b.axis).norm() > 1e-12) return false;
  const Vec3 off = b.centre_m - a.centre_m;
  if (off.cross(a.axis).norm() > 1e-12 * scale) return false;
  d = off.dot(a.axis);
  orientation = a.axis.dot(b.axis) > 0.0 ? 1.0 : -1.0;
  return true;
}

// Vector potential per ampere of the straight segment p -> q, |r - r'| regularised by g:
// mu0/(4 pi) u ln((R1 + R2 + L)/(R1 + R2 - L)) (exact; Hanson & Hirshman's robust form).
Vec3 segment_vector_potential(const Vec3& p, const Vec3& q, const Vec3& x, double g) {
  const Vec3 s = q - p;
  const double L = s.norm();
  const double r1 = std::sqrt((x - p).squaredNorm() + g * g), r2 = std::sqrt((x - q).squaredNorm() + g * g);
  const double sum = r1 + r2;
  const double denom = sum - L;
  if (!(denom > 0.0)) return Vec3::Constant(std::numeric_limits<double>::infinity());
  return (mu0 / (4.0 * pi)) * std::log((sum + L) / denom) * (s / L);
}

Vec3 polygon_vector_potential(const std::vector<Vec3>& v, const Vec3& x, double g) {
  Vec3 a = Vec3::Zero();
  for (std::size_t k = 0; k < v.size(); ++k) a += segment_vector_potential(v[k], v[(k + 1) % v.size()], x, g);
  return a;
}

// Graded Gauss-Legendre on a segment: geometric subintervals toward both ends, down to `finest`,
// so that the log-like end behaviour of regularised or corner-touching integrands is resolved.
template <class F>
double integrate_segment(const Vec3& p, const Vec3& q, int order, double finest, F&& f) {
  const Vec3 s = q - p;
  const double L = s.norm();
  std::vector<double> cuts{0.0};
  std::vector<double> right;
  for (double h = 0.25; h * L > finest && h > 1e-12; h *= 0.25) { cuts.push_back(h); right.push_back(1.0 - h); }
  std::reverse(cuts.begin(), cuts.end());
  cuts.insert(cuts.begin(), 0.0);
  cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  std::sort(cuts.begin(), cuts.end());
  cuts.push_back(0.5);
  std::sort(right.begin(), right.end());
  cuts.insert(cuts.end(), right.begin(), right.end());
  cuts.push_back(1.0);
  const auto& r = gauss_legendre_rule(order);
  double total = 0.0;
  for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
    const double t0 = cuts[i], t1 = cuts[i + 1];
    if (!(t1 > t0)) continue;
    for (std::size_t j = 0; j < r.x.size(); ++j) {
      const double t = 0.5 * (t0 + t1) + 0.5 * (t1 - t0) * r.x[j];
      total += 0.5 * (t1 - t0) * r.w[j] * f(p + t * s, s);  // dl = s dt
    }
  }
  return total;
}

// \oint_path A . dl with n trapezoid points on a circle or `order`-point graded rules on segments.
template <class A>
double line_integral(const Filament& path, int n, double finest, A&& potential) {
  if (path.circle) {
    const Frame fr = Frame::from_axis(path.axis);
    double total = 0.0;
    for (int i = 0; i < n; ++i) {
      const double th = 2.0 * pi * i / n;
      const Vec3 radial = std::cos(th) * fr.u + std::sin(th) * fr.v;
      const Vec3 tangent = -std::sin(th) * fr.u + std::cos(th) * fr.v;
      total += potential(path.centre_m + path.radius_m * radial).dot(tangent);
    }
    return total * path.radius_m * 2.0 * pi / n;
  }
  double total = 0.0;
  const auto& v = path.vertices_m;
  for (std::size_t k = 0; k < v.size(); ++k)
    total += integrate_segment(v[k], v[(k + 1) % v.size()], n, finest,
                               [&](const Vec3& x, const Vec3& dl) { return potential(x).dot(dl); });
  return total;
}

double size_of(const Filament& f) {
  if (f.circle) return f.radius_m;
  double s = 0.0;
  for (std::size_t k = 0; k < f.vertices_m.size(); ++k)
    s = std::max(s, (f.vertices_m[(k + 1) % f.vertices_m.size()] - f.vertices_m[k]).norm());
  return s;
}

// Refines the number of path points until two successive results agree.
template <class Eval>
double refine(Eval&& eval, bool circle_path, double rel_tol) {
  int n = circle_path ? 64 : 8;
  double prev = eval(n);
  for (int it = 0; it < 8; ++it) {
    n = circle_path ? 2 * n : n + 8;
    const double next = eval(n);
    if (std::abs(next - prev) <= rel_tol * std::abs(next) + 1e-30) return next;
    prev = next;
  }
  return prev;
}

}  // namespace

double mutual_coaxial_loops(double a_m, double b_m, double d_m) { return landen_mutual(a_m, b_m, d_m); }

Vec3 loop_vector_potential(const Filament& loop, const Vec3& point) {
  const Vec3 r = point - loop.centre_m;
  const double z = r.dot(loop.axis);
  const Vec3 rho_vec = r - z * loop.axis;
  const double rho = rho_vec.norm();
  const double a = loop.radius_m;
  const double r1 = std::hypot(a - rho, z), r2 = std::hypot(a + rho, z), s = r1 + r2;
  const double k1 = 4.0 * a * rho / (s * s);
  if (!(k1 < 1.0)) return Vec3::Constant(std::numeric_limits<double>::infinity());
  return (8.0 * mu0 * a * a * ellint_d(k1) / (pi * s * s * s)) * loop.axis.cross(rho_vec);
}

double mutual_inductance(const Filament& a, const Filament& b, double rel_tol) {
  double d = 0.0, orientation = 1.0;
  if (a.circle && b.circle && coaxial(a, b, d, orientation))
    return orientation * landen_mutual(a.radius_m, b.radius_m, d);
  // Put the source (exact potential) on a circle when there is one: its potential is cheapest.
  const Filament& src = a.circle ? a : b;
  const Filament& path = a.circle ? b : a;
  const double finest = 1e-3 * size_of(path);
  auto eval = [&](int n) {
    if (src.circle)
      return line_integral(path, n, finest, [&](const Vec3& x) { return loop_vector_potential(src, x); });
    return line_integral(path, n, finest, [&](const Vec3& x) { return polygon_vector_potential(src.vertices_m, x, 0.0); });
  };
  return refine(eval, path.circle, rel_tol);
}

double neumann_mutual_inductance(const Filament& a, const Filament& b, int panels, int order) {
  // Nodes (position, dl) of each curve.
  auto nodes = [&](const Filament& f) {
    std::vector<std::pair<Vec3, Vec3>> out;
    const auto& r = gauss_legendre_rule(order);
    if (f.circle) {
      const Frame fr = Frame::from_axis(f.axis);
      for (int p = 0; p < panels; ++p) {
        const double t0 = 2.0 * pi * p / panels, h = pi / panels;
        for (std::size_t j = 0; j < r.x.size(); ++j) {
          const double th = t0 + h * (1.0 + r.x[j]);
          const Vec3 radial = std::cos(th) * fr.u + std::sin(th) * fr.v;
          const Vec3 tangent = -std::sin(th) * fr.u + std::cos(th) * fr.v;
          out.emplace_back(f.centre_m + f.radius_m * radial, tangent * (f.radius_m * h * r.w[j]));
        }
      }
    } else {
      const auto& v = f.vertices_m;
      for (std::size_t k = 0; k < v.size(); ++k) {
        const Vec3 p = v[k], s = v[(k + 1) % v.size()] - v[k];
        for (int q = 0; q < panels; ++q)
          for (std::size_t j = 0; j < r.x.size(); ++j) {
            const double t = (q + 0.5 * (1.0 + r.x[j])) / panels;
            out.emplace_back(p + t * s, s * (0.5 * r.w[j] / panels));
          }
      }
    }
    return out;
  };
  const auto na = nodes(a), nb = nodes(b);
  double total = 0.0;
  for (const auto& [x1, d1] : na)
    for (const auto& [x2, d2] : nb) total += d1.dot(d2) / (x1 - x2).norm();
  return mu0 / (4.0 * pi) * total;
}

double filament_self_inductance(const Filament& f, double gmd_m) {
  if (f.circle) return landen_mutual(f.radius_m, f.radius_m, gmd_m);
  const double finest = 0.25 * gmd_m;
  auto eval = [&](int n) {
    return line_integral(f, n, finest, [&](const Vec3& x) { return polygon_vector_potential(f.vertices_m, x, gmd_m); });
  };
  return refine(eval, false, 1e-9);
}

double loop_self_inductance(double R, double a) { return mu0 * R * (std::log(8.0 * R / a) - 1.75); }

double rectangle_gmd(double b, double c) {
  if (b <= 0.0 && c <= 0.0) return 0.0;
  if (b <= 0.0 || c <= 0.0) return std::max(b, c) * std::exp(-1.5);  // a line: ln g = ln l - 3/2
  const double b2 = b * b, c2 = c * c;
  const double lng = 0.5 * std::log(b2 + c2) - b2 / (12.0 * c2) * std::log1p(c2 / b2) -
                     c2 / (12.0 * b2) * std::log1p(b2 / c2) + 2.0 * b / (3.0 * c) * std::atan(c / b) +
                     2.0 * c / (3.0 * b) * std::atan(b / c) - 25.0 / 12.0;
  return std::exp(lng);
}

double round_gmd(double radius_m) { return radius_m * std::exp(-0.25); }

double nagaoka_coefficient(double diameter_m, double length_m) {
  // In the Landen-free form; K - E = k^2 D(k) avoids the cancellation for long solenoids.
  const double dd = diameter_m * diameter_m, ll = length_m * length_m;
  const double k2 = dd / (dd + ll);
  const double k = std::sqrt(k2), kp = std::sqrt(ll / (dd + ll));
  const double D = boost::math::ellint_d(k);
  const double E = boost::math::ellint_2(k);
  return 4.0 / (3.0 * pi * kp) * (kp * kp * D + E - k);
}

double solenoid_self_inductance(double radius_m, double length_m, double turns) {
  return mu0 * pi * radius_m * radius_m * turns * turns * nagaoka_coefficient(2.0 * radius_m, length_m) / length_m;
}

double wheeler_solenoid_inductance(double radius_m, double length_m, double turns) {
  return mu0 * pi * radius_m * radius_m * turns * turns / (length_m + 0.9 * radius_m);
}

// ---- Windings ----------------------------------------------------------------------------------

namespace {

std::vector<Vec3> rectangle_vertices(const Frame& f, const Vec3& centre, double hu, double hv) {
  // Right-handed about w: u -> v counter-clockwise seen from +w.
  return {centre + hu * f.u - hv * f.v, centre + hu * f.u + hv * f.v, centre - hu * f.u + hv * f.v,
          centre - hu * f.u - hv * f.v};
}

}  // namespace

std::vector<WeightedFilament> filaments_of(const Winding& w, int order_across, int order_along) {
  const Coil& c = *w.coil;
  const double n = w.sign * c.turns;
  const Frame f = Frame::from_axis(c.axis, c.width_axis);
  std::vector<WeightedFilament> out;
  auto circular_block = [&](double r0, double r1, double half_width) {
    const auto& gr = gauss_legendre_rule(r1 > r0 ? order_across : 1);
    const auto& gz = gauss_legendre_rule(half_width > 0.0 ? order_along : 1);
    for (std::size_t i = 0; i < gr.x.size(); ++i)
      for (std::size_t j = 0; j < gz.x.size(); ++j) {
        const double r = 0.5 * (r0 + r1) + 0.5 * (r1 - r0) * gr.x[i];
        const double z = half_width * gz.x[j];
        out.push_back({Filament::loop(w.centre_m + z * f.w, f.w, r), n * 0.25 * gr.w[i] * gz.w[j]});
      }
  };
  switch (c.shape) {
    case Shape::loop: out.push_back({Filament::loop(w.centre_m, f.w, c.radius_m), n}); break;
    case Shape::pack: circular_block(c.inner_radius_m, c.outer_radius_m, 0.5 * c.width_m); break;
    case Shape::solenoid:
      if (c.multilayer()) circular_block(c.inner_radius_m, c.outer_radius_m, 0.5 * c.length_m);
      else circular_block(c.radius_m, c.radius_m, 0.5 * c.length_m);
      break;
    case Shape::rectangle: {
      const double hs = 0.5 * c.depth_m, ht = 0.5 * c.thickness_m;
      const auto& gs = gauss_legendre_rule(hs > 0.0 ? order_across : 1);
      const auto& gt = gauss_legendre_rule(ht > 0.0 ? order_along : 1);
      for (std::size_t i = 0; i < gs.x.size(); ++i)
        for (std::size_t j = 0; j < gt.x.size(); ++j) {
          const double s = hs * gs.x[i], t = ht * gt.x[j];
          out.push_back({Filament::polygon(rectangle_vertices(f, w.centre_m + t * f.w, 0.5 * c.width_m + s, 0.5 * c.height_m + s)),
                         n * 0.25 * gs.w[i] * gt.w[j]});
        }
      break;
    }
    case Shape::polygon: {
      std::vector<Vec3> v;
      for (const Vec3& p : c.vertices_m) v.push_back(w.centre_m + p);
      out.push_back({Filament::polygon(std::move(v)), n});
      break;
    }
  }
  return out;
}

namespace {

double mutual_at_order(const Winding& a, const Winding& b, int order) {
  const auto fa = filaments_of(a, order, order), fb = filaments_of(b, order, order);
  double total = 0.0;
  for (const auto& x : fa)
    for (const auto& y : fb) total += x.weight * y.weight * mutual_inductance(x.filament, y.filament, 1e-10);
  return total;
}

bool has_cross_section(const Coil& c) {
  return c.shape == Shape::pack || c.shape == Shape::solenoid || (c.shape == Shape::rectangle && c.thick_rectangle());
}

}  // namespace

double mutual_inductance(const Winding& a, const Winding& b) {
  if (!has_cross_section(*a.coil) && !has_cross_section(*b.coil)) return mutual_at_order(a, b, 1);
  double prev = mutual_at_order(a, b, 4);
  for (int order = 6; order <= 16; order += (order < 10 ? 2 : 3)) {
    const double next = mutual_at_order(a, b, order);
    if (std::abs(next - prev) <= 1e-7 * std::abs(next) + 1e-20) return next;
    prev = next;
  }
  return prev;
}

std::optional<double> self_inductance(const Winding& w, const std::optional<Wire>& wire, double bundle_width_m,
                                      double bundle_depth_m) {
  if (!wire) return std::nullopt;
  const Coil& c = *w.coil;
  const double n = c.turns;
  const Frame f = Frame::from_axis(c.axis, c.width_axis);
  auto bundle_gmd = [&]() {
    if (n <= 1.0 + 1e-9 && wire->form == WireForm::round) return round_gmd(0.5 * wire->bare_diameter_m);
    if (n <= 1.0 + 1e-9) return rectangle_gmd(wire->bare_width_m, wire->bare_thickness_m);
    return rectangle_gmd(std::max(bundle_width_m, wire->outer_width_m()), std::max(bundle_depth_m, wire->outer_thickness_m()));
  };
  // Cell sums over a rectangular cross-section (across x along), current uniform over it.
  auto cell_sum = [&](double across, double along, auto&& mutual_of_cells) {
    constexpr double kCells = 400.0;
    const double h = std::sqrt(across * along / kCells);
    const int na = std::clamp(static_cast<int>(std::lround(across / h)), 1, 60);
    const int nl = std::clamp(static_cast<int>(std::lround(along / h)), 1, 400);
    const double ca = across / na, cl = along / nl;
    const double g = rectangle_gmd(ca, cl);
    double total = 0.0;
    const int cells = na * nl;
    for (int i = 0; i < cells; ++i)
      for (int j = i; j < cells; ++j) {
        const double m = mutual_of_cells(i % na, i / na, j % na, j / na, ca, cl, i == j ? g : 0.0);
        total += (i == j ? 1.0 : 2.0) * m;
      }
    return n * n * total / (static_cast<double>(cells) * cells);
  };
  switch (c.shape) {
    case Shape::loop: return n * n * landen_mutual(c.radius_m, c.radius_m, bundle_gmd());
    case Shape::solenoid:
      if (!c.multilayer()) return solenoid_self_inductance(c.radius_m, c.length_m, n);
      [[fallthrough]];
    case Shape::pack: {
      const double r0 = c.inner_radius_m, r1 = c.outer_radius_m;
      const double along = c.shape == Shape::pack ? c.width_m : c.length_m;
      return cell_sum(r1 - r0, along, [&](int i, int j, int k, int l, double ca, double cl, double g) {
        const double ra = r0 + (i + 0.5) * ca, rb = r0 + (k + 0.5) * ca;
        return landen_mutual(ra, rb, g > 0.0 ? g : (l - j) * cl);
      });
    }
    case Shape::rectangle: {
      if (!c.thick_rectangle())
        return n * n * filament_self_inductance(Filament::polygon(rectangle_vertices(f, w.centre_m, 0.5 * c.width_m, 0.5 * c.height_m)),
                                                bundle_gmd());
      const double depth = std::max(c.depth_m, wire->outer_thickness_m()), thick = std::max(c.thickness_m, wire->outer_width_m());
      return cell_sum(depth, thick, [&](int i, int j, int k, int l, double ca, double cl, double g) {
        const double s1 = -0.5 * depth + (i + 0.5) * ca, s2 = -0.5 * depth + (k + 0.5) * ca;
        const double t1 = -0.5 * thick + (j + 0.5) * cl, t2 = -0.5 * thick + (l + 0.5) * cl;
        const auto fa = Filament::polygon(rectangle_vertices(f, w.centre_m + t1 * f.w, 0.5 * c.width_m + s1, 0.5 * c.height_m + s1));
        if (g > 0.0) return filament_self_inductance(fa, g);
        const auto fb = Filament::polygon(rectangle_vertices(f, w.centre_m + t2 * f.w, 0.5 * c.width_m + s2, 0.5 * c.height_m + s2));
        return mutual_inductance(fa, fb, 1e-8);
      });
    }
    case Shape::polygon: {
      std::vector<Vec3> v;
      for (const Vec3& p : c.vertices_m) v.push_back(w.centre_m + p);
      return n * n * filament_self_inductance(Filament::polygon(std::move(v)), bundle_gmd());
    }
  }
  return std::nullopt;
}

InductanceMatrix circuit_inductance(const Model& model, std::span<const std::optional<double>> self_of_winding) {
  struct Item { Winding w; std::size_t circuit; std::optional<double> self; };
  std::vector<Item> items;
  for (const Coil& c : model.coils)
    for (const Winding& w : windings(c)) {
      const std::size_t k = items.size();
      items.push_back({w, model.circuit_index(c.circuit), k < self_of_winding.size() ? self_of_winding[k] : std::nullopt});
    }
  const auto nc = static_cast<Eigen::Index>(model.circuits.size());
  InductanceMatrix L;
  L.henry = Eigen::MatrixXd::Zero(nc, nc);
  L.known.assign(model.circuits.size(), true);
  for (std::size_t i = 0; i < items.size(); ++i) {
    const auto ci = static_cast<Eigen::Index>(items[i].circuit);
    if (items[i].self) L.henry(ci, ci) += *items[i].self;  // sign^2 = 1
    else L.known[items[i].circuit] = false;
    for (std::size_t j = i + 1; j < items.size(); ++j) {
      const auto cj = static_cast<Eigen::Index>(items[j].circuit);
      const double m = mutual_inductance(items[i].w, items[j].w);  // signs included
      L.henry(ci, cj) += m;
      if (ci != cj) L.henry(cj, ci) += m;
      else L.henry(ci, ci) += m;  // both orders of a pair in the same circuit
    }
  }
  for (Eigen::Index i = 0; i < nc; ++i)
    if (!L.known[static_cast<std::size_t>(i)]) L.henry(i, i) = std::numeric_limits<double>::quiet_NaN();
  return L;
}

std::optional<double> stored_energy(const InductanceMatrix& L, std::span<const double> currents_A) {
  const auto n = static_cast<Eigen::Index>(currents_A.size());
  if (n != L.henry.rows()) throw std::invalid_argument("stored_energy: one current per circuit");
  double e = 0.0;
  for (Eigen::Index i = 0; i < n; ++i) {
    if (currents_A[static_cast<std::size_t>(i)] == 0.0) continue;
    if (!L.known[static_cast<std::size_t>(i)]) return std::nullopt;
    for (Eigen::Index j = 0; j < n; ++j) {
      if (currents_A[static_cast<std::size_t>(j)] == 0.0) continue;
      e += 0.5 * currents_A[static_cast<std::size_t>(i)] * L.henry(i, j) * currents_A[static_cast<std::size_t>(j)];
    }
  }
  return e;
}

AcDrive ac_drive(double inductance_H, double resistance_ohm, double current_A, double frequency_Hz) {
  AcDrive a;
  const double w = 2.0 * pi * frequency_Hz;
  a.reactance_ohm = w * inductance_H;
  a.impedance_ohm = std::hypot(resistance_ohm, a.reactance_ohm);
  a.voltage_V = current_A * a.impedance_ohm;
  a.resonance_capacitance_F = (w > 0.0 && inductance_H > 0.0) ? 1.0 / (w * w * inductance_H) : 0.0;
  a.capacitor_voltage_V = current_A * a.reactance_ohm;
  return a;
}

}  // namespace coilwright
