#include "coilwright/sampling.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <mutex>
#include <numbers>
#include <stdexcept>

#include <fmt/format.h>

#include "coilwright/error.hpp"

namespace coilwright {

namespace {

constexpr double kPi = std::numbers::pi;
constexpr int kMaxGaussOrder = kMaxResolution;

GaussLegendre compute_gauss_legendre(int n) {
  // Newton iteration on the three-term recurrence for P_n (Abramowitz & Stegun 22.7.10),
  // started from Tricomi's approximation of the roots; weights 2/((1-x^2) P_n'(x)^2) (A&S 25.4.29).
  GaussLegendre g;
  g.nodes.resize(n);
  g.weights.resize(n);
  for (int i = 0; i < (n + 1) / 2; ++i) {
    double x = std::cos(kPi * (i + 0.75) / (n + 0.5));
    double dp = 0.0;
    for (int it = 0; it < 100; ++it) {
      double p0 = 1.0, p1 = x;
      for (int k = 2; k <= n; ++k) {
        const double p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = n * (x * p1 - p0) / (x * x - 1.0);
      const double dx = p1 / dp;
      x -= dx;
      if (std::abs(dx) < 1e-16) break;
    }
    // One more derivative at the converged root for the weight.
    double p0 = 1.0, p1 = x;
    for (int k = 2; k <= n; ++k) {
      const double p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
      p0 = p1;
      p1 = p2;
    }
    dp = n * (x * p1 - p0) / (x * x - 1.0);
    const double w = 2.0 / ((1.0 - x * x) * dp * dp);
    g.nodes[i] = -x;
    g.nodes[n - 1 - i] = x;
    g.weights[i] = w;
    g.weights[n - 1 - i] = w;
  }
  if (n % 2 == 1) g.nodes[n / 2] = 0.0;
  return g;
}

// Equal-area points on the unit sphere (a Fibonacci lattice; Á. González, Math. Geosci. 42, 2010).
std::vector<Vec3> fibonacci_sphere(int n) {
  std::vector<Vec3> dirs;
  dirs.reserve(n);
  const double golden = kPi * (3.0 - std::sqrt(5.0));
  for (int i = 0; i < n; ++i) {
    const double z = 1.0 - (2.0 * i + 1.0) / n;
    const double r = std::sqrt(std::max(0.0, 1.0 - z * z));
    const double phi = golden * i;
    dirs.emplace_back(r * std::cos(phi), r * std::sin(phi), z);
  }
  return dirs;
}

struct Placer {
  Vec3 centre;
  Frame frame;
  [[nodiscard]] Vec3 at(double a, double b, double c) const { return centre + a * frame.u + b * frame.v + c * frame.w; }
};

int ceil_int(double x) { return static_cast<int>(std::ceil(x - 1e-9)); }

void add_ring(PointSet& out, const Placer& p, double rho, double z, double spacing, Symmetry sym) {
  if (sym.axisymmetric || rho <= 0.0) {
    out.push_back(p.at(rho, 0.0, z));
    return;
  }
  const int n = std::max(8, ceil_int(2.0 * kPi * rho / spacing));
  for (int k = 0; k < n; ++k) {
    const double phi = 2.0 * kPi * k / n;
    out.push_back(p.at(rho * std::cos(phi), rho * std::sin(phi), z));
  }
}

// Sample [lo, hi] with spacing at most h, both ends included.
std::vector<double> linspace_spacing(double lo, double hi, double h) {
  const int n = std::max(1, ceil_int((hi - lo) / h));
  std::vector<double> v(n + 1);
  for (int i = 0; i <= n; ++i) v[i] = lo + (hi - lo) * i / n;
  return v;
}

void sample_sphere(const Target& t, const Placer& p, int res, Symmetry sym, SampleSet& s) {
  const double R = t.radius_m;
  s.boundary = sphere_surface(t.centre_m, p.frame, R, res, sym);
  const auto& gr = gauss_legendre(std::max(3, res / 2));
  if (sym.axisymmetric) {
    // r^2 dr dcos(theta) (times 2 pi, constant) in the meridian half-plane.
    const auto& gc = gauss_legendre(res);
    for (std::size_t i = 0; i < gr.nodes.size(); ++i) {
      const double r = 0.5 * R * (gr.nodes[i] + 1.0);
      for (std::size_t j = 0; j < gc.nodes.size(); ++j) {
        double c = gc.nodes[j];
        if (sym.mirrored) c = 0.5 * (c + 1.0);  // cos(theta) in [0, 1]
        const double rho = r * std::sqrt(std::max(0.0, 1.0 - c * c));
        s.volume.push_back(p.at(rho, 0.0, r * c));
        s.weights.push_back(gr.weights[i] * r * r * gc.weights[j]);
      }
    }
  } else {
    const auto dirs = fibonacci_sphere(std::max(32, ceil_int(kPi * res * res)));
    for (std::size_t i = 0; i < gr.nodes.size(); ++i) {
      const double r = 0.5 * R * (gr.nodes[i] + 1.0);
      for (const Vec3& d : dirs) {
        s.volume.push_back(p.at(r * d.x(), r * d.y(), r * d.z()));
        s.weights.push_back(gr.weights[i] * r * r);
      }
    }
  }
}

void sample_cylinder(const Target& t, const Placer& p, int res, Symmetry sym, SampleSet& s) {
  const double R = t.radius_m, L = t.length_m;
  s.boundary = cylinder_surface(t.centre_m, p.frame, R, L, res, sym);
  const auto& gr = gauss_legendre(std::max(3, res / 2));
  const auto& gz = gauss_legendre(std::max(3, ceil_int(res * 0.5 * L / R)));
  const int nphi = sym.axisymmetric ? 1 : std::max(8, 2 * res);
  for (std::size_t i = 0; i < gr.nodes.size(); ++i) {
    const double rho = 0.5 * R * (gr.nodes[i] + 1.0);
    for (std::size_t j = 0; j < gz.nodes.size(); ++j) {
      const double z = sym.mirrored ? 0.25 * L * (gz.nodes[j] + 1.0) : 0.5 * L * gz.nodes[j];
      for (int k = 0; k < nphi; ++k) {
        const double phi = 2.0 * kPi * k / nphi;
        s.volume.push_back(p.at(rho * std::cos(phi), rho * std::sin(phi), z));
        s.weights.push_back(gr.weights[i] * rho * gz.weights[j]);
      }
    }
  }
}

void sample_box(const Target& t, const Placer& p, int res, SampleSet& s) {
  const Vec3 half = 0.5 * t.size_m;
  const double h = half.minCoeff() / res;
  // Boundary: a grid on each of the six faces.
  for (int axis = 0; axis < 3; ++axis) {
    const int a1 = (axis + 1) % 3, a2 = (axis + 2) % 3;
    const auto u1 = linspace_spacing(-half[a1], half[a1], h);
    const auto u2 = linspace_spacing(-half[a2], half[a2], h);
    for (double sign : {-1.0, 1.0})
      for (double c1 : u1)
        for (double c2 : u2) {
          Vec3 q;
          q[axis] = sign * half[axis];
          q[a1] = c1;
          q[a2] = c2;
          s.boundary.push_back(p.at(q.x(), q.y(), q.z()));
        }
  }
  std::array<const GaussLegendre*, 3> g{};
  for (int a = 0; a < 3; ++a) g[a] = &gauss_legendre(std::max(3, ceil_int(res * half[a] / half.maxCoeff())));
  for (std::size_t i = 0; i < g[0]->nodes.size(); ++i)
    for (std::size_t j = 0; j < g[1]->nodes.size(); ++j)
      for (std::size_t k = 0; k < g[2]->nodes.size(); ++k) {
        s.volume.push_back(p.at(half.x() * g[0]->nodes[i], half.y() * g[1]->nodes[j], half.z() * g[2]->nodes[k]));
        s.weights.push_back(g[0]->weights[i] * g[1]->weights[j] * g[2]->weights[k]);
      }
}

void sample_plane(const Target& t, const Placer& p, int res, SampleSet& s) {
  // A plane section is not a closed region of the harmonic field: its worst point may be inside,
  // so the "boundary" set is the whole section on a regular grid.
  const double hu = 0.5 * t.size_m.x(), hv = 0.5 * t.size_m.y();
  const double h = std::min(hu, hv) / res;
  for (double a : linspace_spacing(-hu, hu, h))
    for (double b : linspace_spacing(-hv, hv, h)) s.boundary.push_back(p.at(a, b, 0.0));
  const auto& gu = gauss_legendre(std::max(3, ceil_int(res * hu / std::max(hu, hv))));
  const auto& gv = gauss_legendre(std::max(3, ceil_int(res * hv / std::max(hu, hv))));
  for (std::size_t i = 0; i < gu.nodes.size(); ++i)
    for (std::size_t j = 0; j < gv.nodes.size(); ++j) {
      s.volume.push_back(p.at(hu * gu.nodes[i], hv * gv.nodes[j], 0.0));
      s.weights.push_back(gu.weights[i] * gv.weights[j]);
    }
}

}  // namespace

const GaussLegendre& gauss_legendre(int n) {
  static std::vector<GaussLegendre> table;
  static std::once_flag once;
  std::call_once(once, [] {
    table.reserve(kMaxGaussOrder + 1);
    table.emplace_back();
    for (int k = 1; k <= kMaxGaussOrder; ++k) table.push_back(compute_gauss_legendre(k));
  });
  if (n < 1 || n > kMaxGaussOrder) throw std::out_of_range("Gauss-Legendre order out of range");
  return table[static_cast<std::size_t>(n)];
}

PointSet sphere_surface(const Vec3& centre, const Frame& frame, double radius_m, int resolution, Symmetry symmetry) {
  PointSet out;
  const Placer p{centre, frame};
  if (symmetry.axisymmetric) {
    // The meridian from the pole to the opposite pole (or to the equator when mirrored).
    const double top = symmetry.mirrored ? 0.5 * kPi : kPi;
    const int n = std::max(8, ceil_int(resolution * top));
    for (int i = 0; i <= n; ++i) {
      const double th = top * i / n;
      out.push_back(p.at(radius_m * std::sin(th), 0.0, radius_m * std::cos(th)));
    }
    return out;
  }
  for (const Vec3& d : fibonacci_sphere(std::max(64, ceil_int(4.0 * kPi * resolution * resolution))))
    out.push_back(p.at(radius_m * d.x(), radius_m * d.y(), radius_m * d.z()));
  return out;
}

PointSet cylinder_surface(const Vec3& centre, const Frame& frame, double radius_m, double length_m, int resolution,
                          Symmetry symmetry) {
  PointSet out;
  const Placer p{centre, frame};
  const double h = radius_m / resolution;
  const double half = 0.5 * length_m;
  const double zlo = symmetry.mirrored ? 0.0 : -half;
  // End faces (rings), then the side (rings).
  for (double z : symmetry.mirrored ? std::vector<double>{half} : std::vector<double>{-half, half})
    for (double rho : linspace_spacing(0.0, radius_m, h)) add_ring(out, p, rho, z, h, symmetry);
  for (double z : linspace_spacing(zlo, half, h)) add_ring(out, p, radius_m, z, h, symmetry);
  return out;
}

SampleCount count_samples(const Target& target) {
  // Mirrors the samplers above with no symmetry (the most points), except the axisymmetric
  // sphere's polar rule, whose order is the resolution itself.
  const double r = target.resolution > 0 ? target.resolution : kDefaultResolution;
  const auto steps = [](double length, double h) { return std::max(1.0, std::ceil(length / h - 1e-9)) + 1.0; };
  const auto ring = [](double rho, double h) { return std::max(8.0, std::ceil(2.0 * kPi * rho / h - 1e-9)); };
  const auto order = [](double n) { return std::max(3.0, std::ceil(n - 1e-9)); };
  SampleCount c;
  switch (target.region) {
    case RegionKind::sphere:
      c.points = std::max(64.0, std::ceil(4.0 * kPi * r * r)) + order(r / 2) * std::max(32.0, std::ceil(kPi * r * r));
      c.gauss_order = std::max(order(r / 2), r);
      break;
    case RegionKind::cylinder: {
      const double R = target.radius_m, h = R / r, nz = order(r * 0.5 * target.length_m / R);
      c.points = 2.0 * steps(R, h) * ring(R, h) + steps(0.5 * target.length_m, h) * 2.0 * ring(R, h) +
                 order(r / 2) * nz * std::max(8.0, 2.0 * r);
      c.gauss_order = std::max(order(r / 2), nz);
      break;
    }
    case RegionKind::box: {
      const Vec3 half = 0.5 * target.size_m;
      const double h = half.minCoeff() / r;
      double volume = 1.0;
      for (int a = 0; a < 3; ++a) {
        const double n = order(r * half[a] / half.maxCoeff());
        volume *= n;
        c.gauss_order = std::max(c.gauss_order, n);
        c.points += 2.0 * steps(2.0 * half[(a + 1) % 3], h) * steps(2.0 * half[(a + 2) % 3], h);
      }
      c.points += volume;
      break;
    }
    case RegionKind::plane: {
      const double hu = 0.5 * target.size_m.x(), hv = 0.5 * target.size_m.y(), h = std::min(hu, hv) / r;
      const double nu = order(r * hu / std::max(hu, hv)), nv = order(r * hv / std::max(hu, hv));
      c.points = steps(2.0 * hu, h) * steps(2.0 * hv, h) + nu * nv;
      c.gauss_order = std::max(nu, nv);
      break;
    }
    case RegionKind::points:
      c.points = 2.0 * static_cast<double>(target.points.size());
      break;
  }
  // A degenerate region (zero or non-finite size) counts as too many rather than as NaN.
  if (!std::isfinite(c.points)) c.points = std::numeric_limits<double>::infinity();
  if (!std::isfinite(c.gauss_order)) c.gauss_order = std::numeric_limits<double>::infinity();
  return c;
}

SampleSet sample_region(const Target& target, Symmetry symmetry) {
  const SampleCount count = count_samples(target);
  if (!count.within_limits())
    throw DomainError(fmt::format("the target region would need {:.3g} sample points and a Gauss-Legendre order of {:.3g}; "
                                  "at most {:g} points and order {} are possible",
                                  count.points, count.gauss_order, kMaxSamplePoints, kMaxResolution));
  const int res = target.resolution > 0 ? target.resolution : kDefaultResolution;
  SampleSet s;
  const bool symmetric_region = target.region == RegionKind::sphere || target.region == RegionKind::cylinder;
  if (!symmetric_region) symmetry = Symmetry{};
  s.symmetry = symmetry;
  const Placer p{target.centre_m, Frame::from_axis(target.axis, target.reference)};
  switch (target.region) {
    case RegionKind::sphere: sample_sphere(target, p, res, symmetry, s); break;
    case RegionKind::cylinder: sample_cylinder(target, p, res, symmetry, s); break;
    case RegionKind::box: sample_box(target, p, res, s); break;
    case RegionKind::plane: sample_plane(target, p, res, s); break;
    case RegionKind::points:
      s.boundary = target.points;
      s.volume = target.points;
      s.weights.assign(target.points.size(), 1.0);
      break;
  }
  double total = 0.0;
  for (double w : s.weights) total += w;
  for (double& w : s.weights) w /= total;
  return s;
}

namespace {

bool circular(const Coil& c) { return c.shape == Shape::loop || c.shape == Shape::pack || c.shape == Shape::solenoid; }

}  // namespace

Symmetry detect_symmetry(const Model& model) {
  if (!model.target) return {};
  const Target& t = *model.target;
  const Vec3 a = t.axis.normalized();
  constexpr double kTol = 1e-12;
  auto on_axis = [&](const Vec3& p) {
    const Vec3 d = p - t.centre_m;
    return (d - d.dot(a) * a).norm() <= kTol * std::max(1.0, d.norm());
  };
  Symmetry sym;
  sym.axisymmetric = true;
  for (const Coil& c : model.coils) {
    if (!circular(c) || c.axis.cross(a).norm() > kTol || !on_axis(c.centre_m)) sym.axisymmetric = false;
  }
  if (t.goal == Goal::uniform && t.field_T.cross(a).norm() > kTol * std::max(1e-300, t.field_T.norm()))
    sym.axisymmetric = false;
  if (t.ambient && (t.ambient->uniform_T.cross(a).norm() > kTol * t.ambient->uniform_T.norm() ||
                    !t.ambient->gradient_T_per_m.isZero()))
    sym.axisymmetric = false;
  // Mirror symmetry about the centre plane: every coil a pair (or a single coil) centred on
  // the target centre, every pair opposed for a gradient goal and none opposed otherwise.
  sym.mirrored = sym.axisymmetric;
  for (const Coil& c : model.coils) {
    if ((c.centre_m - t.centre_m).norm() > kTol * std::max(1.0, t.centre_m.norm())) sym.mirrored = false;
    const bool wants_opposed = t.goal == Goal::gradient;
    if (wants_opposed != (c.is_pair() && c.opposed)) sym.mirrored = false;
  }
  for (const FreeParameter& f : model.free_parameters)
    if (f.key == CoilKey::centre_x || f.key == CoilKey::centre_y || f.key == CoilKey::centre_z) sym.mirrored = false;
  return sym;
}

}  // namespace coilwright
