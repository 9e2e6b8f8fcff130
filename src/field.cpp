// Field of each coil shape from the kernels: frames, quadrature over winding cross-sections,
// pairs, and the parallel evaluation over points.
#include "coilwright/field.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <vector>

#include "coilwright/constants.hpp"
#include "coilwright/error.hpp"
#include "coilwright/kernels.hpp"
#include "coilwright/model.hpp"
#include "coilwright/parallel.hpp"

namespace coilwright {

namespace detail {

// Gauss-Legendre rules on [-1, 1] for a fixed ladder of orders, computed once (Newton's method on
// the three-term recurrence; nodes to ~1 ulp).
struct GaussRule {
  int n = 0;
  std::vector<double> x, w;
};
constexpr std::array<int, 17> kOrders{1, 2, 3, 4, 6, 8, 10, 12, 16, 20, 24, 32, 40, 48, 64, 96, 128};

inline GaussRule make_rule(int n) {
  GaussRule r;
  r.n = n;
  r.x.resize(static_cast<std::size_t>(n));
  r.w.resize(static_cast<std::size_t>(n));
  for (int i = 0; i < (n + 1) / 2; ++i) {
    double x = std::cos(pi * (i + 0.75) / (n + 0.5));
    double dp = 0.0;
    for (int it = 0; it < 100; ++it) {
      double p0 = 1.0, p1 = x;
      for (int k = 2; k <= n; ++k) {
        const double p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      if (n == 1) { p1 = x; p0 = 1.0; }
      dp = n * (x * p1 - p0) / (x * x - 1.0);
      const double dx = p1 / dp;
      x -= dx;
      if (std::fabs(dx) < 1e-16) {
        // One more evaluation of the derivative at the converged node.
        p0 = 1.0; p1 = x;
        for (int k = 2; k <= n; ++k) {
          const double p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
          p0 = p1;
          p1 = p2;
        }
        dp = n * (x * p1 - p0) / (x * x - 1.0);
        break;
      }
    }
    const double w = 2.0 / ((1.0 - x * x) * dp * dp);
    r.x[static_cast<std::size_t>(i)] = -x;
    r.x[static_cast<std::size_t>(n - 1 - i)] = x;
    r.w[static_cast<std::size_t>(i)] = w;
    r.w[static_cast<std::size_t>(n - 1 - i)] = w;
  }
  if (n == 1) { r.x[0] = 0.0; r.w[0] = 2.0; }
  return r;
}

const GaussRule& gauss_rule(int n) {
  static const std::vector<GaussRule> rules = [] {
    std::vector<GaussRule> v;
    for (int k : kOrders) v.push_back(make_rule(k));
    return v;
  }();
  for (const auto& r : rules)
    if (r.n >= n) return r;
  return rules.back();
}

// Gauss-Legendre order for an integrand over an interval of half-length h whose nearest
// singularity is at distance delta from the interval. The error of the n-point rule is below
// 64 M / (15 (r^2 - 1) r^{2n}) with r the Bernstein ellipse parameter through the singularity
// (L. N. Trefethen, Approximation Theory and Approximation Practice, SIAM 2013, Thm 19.3);
// the worst placement (on the interval's extension) gives r = x + sqrt(x^2 - 1), x = 1 + delta/h.
// The target 1e-16 leaves margin for the ratio of M to the integral, so the result stays ~1e-13.
int gauss_order(double delta, double h) {
  if (!(h > 0.0)) return 1;
  if (!(delta > 0.0)) return kOrders.back();
  const double x = 1.0 + delta / h;
  const double r = x + std::sqrt((x - 1.0) * (x + 1.0));
  const double lr = std::log(r);
  const double need = (std::log(64.0 / 15.0) + 16.0 * std::log(10.0) +
                       std::max(0.0, -std::log((r - 1.0) * (r + 1.0)))) / (2.0 * lr);
  if (!(need < kOrders.back())) return kOrders.back();
  return gauss_rule(static_cast<int>(std::ceil(need))).n;
}

// Distance from (rho, z) to the rectangle [r0, r1] x [z0, z1] of the meridian plane (0 inside).
inline double distance_to_box(double rho, double z, double r0, double r1, double z0, double z1) {
  const double dr = rho < r0 ? r0 - rho : (rho > r1 ? rho - r1 : 0.0);
  const double dz = z < z0 ? z0 - z : (z > z1 ? z - z1 : 0.0);
  return std::hypot(dr, dz);
}

// Distance from point p to segment [a, b].
inline double distance_to_segment(const Vec3& p, const Vec3& a, const Vec3& b) {
  const Vec3 ab = b - a;
  const double l2 = ab.squaredNorm();
  double t = l2 > 0.0 ? (p - a).dot(ab) / l2 : 0.0;
  t = std::clamp(t, 0.0, 1.0);
  return (p - (a + t * ab)).norm();
}

constexpr std::size_t kBlock = 256;  // points transformed to the local frame at a time

// Points of a block in an axisymmetric winding's local frame.
struct LocalBlock {
  double x[kBlock], y[kBlock], z[kBlock], rho[kBlock];
  double brr[kBlock], bz[kBlock];
  double tr[kBlock], tz[kBlock];  // scratch for accumulation over quadrature nodes
  std::size_t n = 0;
};

// Evaluates an axisymmetric winding at `centre` with frame `f`: `local` fills blk.brr (B_rho/rho)
// and blk.bz for the block's (rho, z); the result times `scale` is rotated back and added.
template <class Local>
void add_axisymmetric(const Frame& f, const Vec3& centre, double scale, PointsView pts, FieldView out,
                      Local&& local) {
  LocalBlock blk;
  for (std::size_t b0 = 0; b0 < pts.n; b0 += kBlock) {
    const std::size_t m = std::min(kBlock, pts.n - b0);
    blk.n = m;
    for (std::size_t i = 0; i < m; ++i) {
      const double dx = pts.x[b0 + i] - centre.x();
      const double dy = pts.y[b0 + i] - centre.y();
      const double dz = pts.z[b0 + i] - centre.z();
      const double lx = f.u.x() * dx + f.u.y() * dy + f.u.z() * dz;
      const double ly = f.v.x() * dx + f.v.y() * dy + f.v.z() * dz;
      blk.x[i] = lx;
      blk.y[i] = ly;
      blk.z[i] = f.w.x() * dx + f.w.y() * dy + f.w.z() * dz;
      blk.rho[i] = std::sqrt(lx * lx + ly * ly);
    }
    local(blk);
    for (std::size_t i = 0; i < m; ++i) {
      const double bu = scale * blk.brr[i] * blk.x[i];
      const double bv = scale * blk.brr[i] * blk.y[i];
      const double bw = scale * blk.bz[i];
      out.bx[b0 + i] += f.u.x() * bu + f.v.x() * bv + f.w.x() * bw;
      out.by[b0 + i] += f.u.y() * bu + f.v.y() * bv + f.w.y() * bw;
      out.bz[b0 + i] += f.u.z() * bu + f.v.z() * bv + f.w.z() * bw;
    }
  }
}

// The block's points grouped by their quadrature orders: points that share (order_a, order_b)
// are evaluated together, so each kernel call gets all their nodes at once instead of a handful
// (the loop kernel works on 16 points at a time; a pack's 6 axial nodes alone filled it by a third).
struct OrderGroups {
  std::size_t member[kBlock];  // point indices, grouped
  std::size_t begin[kBlock + 1];
  int order_a[kBlock], order_b[kBlock];  // orders of each group
  std::size_t count = 0;

  // Groups points 0..n-1 whose orders are a[i], b[i]; groups keep the order of first appearance
  // and points within a group keep their block order, so the result depends only on the block.
  void build(std::size_t n, const int* a, const int* b) {
    bool taken[kBlock] = {};
    std::size_t m = 0;
    count = 0;
    for (std::size_t i0 = 0; i0 < n; ++i0) {
      if (taken[i0]) continue;
      begin[count] = m;
      order_a[count] = a[i0];
      order_b[count] = b[i0];
      for (std::size_t i = i0; i < n; ++i)
        if (!taken[i] && a[i] == a[i0] && b[i] == b[i0]) {
          taken[i] = true;
          member[m++] = i;
        }
      ++count;
    }
    begin[count] = m;
  }
};

// Scratch for one group's nodes (per thread: blocks are evaluated in parallel).
struct NodeScratch {
  std::vector<double> rho, z, br, bz;
  void resize(std::size_t n) {
    if (rho.size() < n) {
      rho.resize(n);
      z.resize(n);
      br.resize(n);
      bz.resize(n);
    }
  }
};
NodeScratch& node_scratch() {
  thread_local NodeScratch s;
  return s;
}

// Uniform current density over [r0, r1] x [-hw, hw] (per unit total current): for each point,
// Gauss-Legendre over radius and axial position with orders from the point's distance to the
// cross-section. For each radial node, the axial nodes of every point of an order group form
// one vectorised call of the loop kernel.
void pack_local(double r0, double r1, double hw, LocalBlock& blk) {
  const double hr = 0.5 * (r1 - r0), rc = 0.5 * (r0 + r1);
  int nr[kBlock], nz[kBlock];
  for (std::size_t i = 0; i < blk.n; ++i) {
    const double delta = distance_to_box(blk.rho[i], blk.z[i], r0, r1, -hw, hw);
    nr[i] = gauss_order(delta, hr);
    nz[i] = gauss_order(delta, hw);
  }
  OrderGroups groups;
  groups.build(blk.n, nr, nz);
  NodeScratch& s = node_scratch();
  for (std::size_t g = 0; g < groups.count; ++g) {
    const GaussRule& gr = gauss_rule(groups.order_a[g]);
    const GaussRule& gz = gauss_rule(groups.order_b[g]);
    const std::size_t q = static_cast<std::size_t>(gz.n);
    const std::size_t* members = groups.member + groups.begin[g];
    const std::size_t m = groups.begin[g + 1] - groups.begin[g];
    s.resize(m * q);
    for (std::size_t p = 0; p < m; ++p) {
      const std::size_t i = members[p];
      for (std::size_t k = 0; k < q; ++k) {
        s.rho[p * q + k] = blk.rho[i];
        s.z[p * q + k] = blk.z[i] - hw * gz.x[k];
      }
      blk.tr[i] = 0.0;
      blk.tz[i] = 0.0;
    }
    for (int j = 0; j < gr.n; ++j) {
      const double a = rc + hr * gr.x[static_cast<std::size_t>(j)];
      const double wj = gr.w[static_cast<std::size_t>(j)];
      kernels::loop_field(a, m * q, s.rho.data(), s.z.data(), s.br.data(), s.bz.data());
      for (std::size_t p = 0; p < m; ++p) {
        double tr = 0.0, tz = 0.0;
        for (std::size_t k = 0; k < q; ++k) {
          tr += gz.w[k] * s.br[p * q + k];
          tz += gz.w[k] * s.bz[p * q + k];
        }
        blk.tr[members[p]] += wj * tr;
        blk.tz[members[p]] += wj * tz;
      }
    }
    for (std::size_t p = 0; p < m; ++p) {
      blk.brr[members[p]] = 0.25 * blk.tr[members[p]];  // weights on [-1,1]^2 sum to 4
      blk.bz[members[p]] = 0.25 * blk.tz[members[p]];
    }
  }
}

// Multi-layer solenoid: current sheets between r0 and r1, Gauss-Legendre over radius
// (per unit total current, turns_per_m = turns / length of the whole winding); the points of an
// order group share each radial node's kernel call.
void multilayer_local(double r0, double r1, double length, double turns_per_m, LocalBlock& blk) {
  const double hr = 0.5 * (r1 - r0), rc = 0.5 * (r0 + r1);
  int nr[kBlock], one[kBlock];
  for (std::size_t i = 0; i < blk.n; ++i) {
    nr[i] = gauss_order(distance_to_box(blk.rho[i], blk.z[i], r0, r1, -0.5 * length, 0.5 * length), hr);
    one[i] = 1;
  }
  OrderGroups groups;
  groups.build(blk.n, nr, one);
  NodeScratch& s = node_scratch();
  for (std::size_t g = 0; g < groups.count; ++g) {
    const GaussRule& gr = gauss_rule(groups.order_a[g]);
    const std::size_t* members = groups.member + groups.begin[g];
    const std::size_t m = groups.begin[g + 1] - groups.begin[g];
    s.resize(m);
    for (std::size_t p = 0; p < m; ++p) {
      s.rho[p] = blk.rho[members[p]];
      s.z[p] = blk.z[members[p]];
      blk.tr[members[p]] = 0.0;
      blk.tz[members[p]] = 0.0;
    }
    for (int j = 0; j < gr.n; ++j) {
      const double a = rc + hr * gr.x[static_cast<std::size_t>(j)];
      const double wj = gr.w[static_cast<std::size_t>(j)];
      kernels::solenoid_sheet_field(a, length, turns_per_m, m, s.rho.data(), s.z.data(), s.br.data(), s.bz.data());
      for (std::size_t p = 0; p < m; ++p) {
        blk.tr[members[p]] += wj * s.br[p];
        blk.tz[members[p]] += wj * s.bz[p];
      }
    }
    for (std::size_t p = 0; p < m; ++p) {
      blk.brr[members[p]] = 0.5 * blk.tr[members[p]];
      blk.bz[members[p]] = 0.5 * blk.tz[members[p]];
    }
  }
}

// Corners of a filament rectangle with half-sides hu (along f.u) and hv (along f.v) at `c`,
// in the order that makes the current right-handed about f.w.
inline std::array<Vec3, 4> rectangle_corners(const Frame& f, const Vec3& c, double hu, double hv) {
  return {c + hu * f.u - hv * f.v, c + hu * f.u + hv * f.v, c - hu * f.u + hv * f.v,
          c - hu * f.u - hv * f.v};
}

void add_closed_polyline(const Vec3* v, std::size_t nv, double current, PointsView pts, FieldView out) {
  for (std::size_t k = 0; k < nv; ++k) kernels::add_segment_field(v[k], v[(k + 1) % nv], current, pts, out);
}

// Rectangle with a cross-section: filament rectangles over the cross-section (in-plane offset s
// outwards from the mean side lines, axial offset t), Gauss-Legendre in s and t with orders from
// the nearest point of the block to the mean rectangle.
void add_thick_rectangle(const Coil& c, const Frame& f, const Vec3& centre, double current,
                         PointsView pts, FieldView out) {
  constexpr std::size_t kSub = 64;
  const double hu = 0.5 * c.width_m, hv = 0.5 * c.height_m;
  const double hs = 0.5 * c.depth_m, ht = 0.5 * c.thickness_m;
  const auto mean = rectangle_corners(f, centre, hu, hv);
  const double tube = std::hypot(hs, ht);
  for (std::size_t b0 = 0; b0 < pts.n; b0 += kSub) {
    const std::size_t m = std::min(kSub, pts.n - b0);
    double delta = 1e300;
    for (std::size_t i = 0; i < m; ++i) {
      const Vec3 p(pts.x[b0 + i], pts.y[b0 + i], pts.z[b0 + i]);
      for (std::size_t k = 0; k < 4; ++k) delta = std::min(delta, distance_to_segment(p, mean[k], mean[(k + 1) % 4]));
    }
    delta = std::max(0.0, delta - tube);
    const GaussRule& gs = gauss_rule(gauss_order(delta, hs));
    const GaussRule& gt = gauss_rule(gauss_order(delta, ht));
    const PointsView sub{pts.x + b0, pts.y + b0, pts.z + b0, m};
    const FieldView so{out.bx + b0, out.by + b0, out.bz + b0};
    for (int j = 0; j < gs.n; ++j) {
      const double s = hs * gs.x[static_cast<std::size_t>(j)];
      for (int k = 0; k < gt.n; ++k) {
        const double t = ht * gt.x[static_cast<std::size_t>(k)];
        const double wgt = 0.25 * gs.w[static_cast<std::size_t>(j)] * gt.w[static_cast<std::size_t>(k)];
        const auto v = rectangle_corners(f, centre + t * f.w, hu + s, hv + s);
        add_closed_polyline(v.data(), 4, current * wgt, sub, so);
      }
    }
  }
}

}  // namespace detail

void add_coil_field(const Coil& coil, double current_A, PointsView pts, FieldView out) {
  using namespace detail;
  const Frame f = Frame::from_axis(coil.axis, coil.width_axis);
  for (const Winding& wdg : windings(coil)) {
    const double current = wdg.sign * coil.turns * current_A;  // ampere-turns of this winding
    switch (coil.shape) {
      case Shape::loop: {
        const double a = coil.radius_m;
        add_axisymmetric(f, wdg.centre_m, current, pts, out, [a](LocalBlock& b) {
          kernels::loop_field(a, b.n, b.rho, b.z, b.brr, b.bz);
        });
        break;
      }
      case Shape::pack: {
        const double r0 = coil.inner_radius_m, r1 = coil.outer_radius_m, hw = 0.5 * coil.width_m;
        add_axisymmetric(f, wdg.centre_m, current, pts, out,
                         [=](LocalBlock& b) { pack_local(r0, r1, hw, b); });
        break;
      }
      case Shape::solenoid: {
        const double len = coil.length_m;
        if (coil.multilayer()) {
          const double r0 = coil.inner_radius_m, r1 = coil.outer_radius_m;
          add_axisymmetric(f, wdg.centre_m, current, pts, out,
                           [=](LocalBlock& b) { multilayer_local(r0, r1, len, 1.0 / len, b); });
        } else {
          const double a = coil.radius_m;
          add_axisymmetric(f, wdg.centre_m, current, pts, out, [=](LocalBlock& b) {
            kernels::solenoid_sheet_field(a, len, 1.0 / len, b.n, b.rho, b.z, b.brr, b.bz);
          });
        }
        break;
      }
      case Shape::rectangle: {
        if (coil.thick_rectangle()) {
          add_thick_rectangle(coil, f, wdg.centre_m, current, pts, out);
        } else {
          const auto v = rectangle_corners(f, wdg.centre_m, 0.5 * coil.width_m, 0.5 * coil.height_m);
          add_closed_polyline(v.data(), 4, current, pts, out);
        }
        break;
      }
      case Shape::polygon: {
        const std::size_t nv = coil.vertices_m.size();
        for (std::size_t k = 0; k < nv; ++k)
          kernels::add_segment_field(wdg.centre_m + coil.vertices_m[k],
                                     wdg.centre_m + coil.vertices_m[(k + 1) % nv], current, pts, out);
        break;
      }
    }
  }
}

namespace {
constexpr std::size_t kChunk = 1024;  // points per parallel task

// (coil, current) pairs resolved before the parallel region, so nothing there can throw.
FieldSet field_of(const std::vector<std::pair<const Coil*, double>>& drive, const PointSet& pts) {
  FieldSet out(pts.size());
  parallel_chunks(pts.size(), kChunk, [&](std::size_t begin, std::size_t count) {
    for (const auto& [coil, current] : drive) add_coil_field(*coil, current, view(pts, begin, count), view(out, begin));
  });
  return out;
}
}  // namespace

FieldSet field_of_model(const Model& model, const PointSet& pts) {
  std::vector<std::pair<const Coil*, double>> drive;
  for (const Coil& c : model.coils) drive.emplace_back(&c, model.circuits.at(model.circuit_index(c.circuit)).current_A);
  return field_of(drive, pts);
}

FieldSet field_per_ampere(const Model& model, std::size_t circuit, const PointSet& pts) {
  std::vector<std::pair<const Coil*, double>> drive;
  for (const Coil& c : model.coils)
    if (model.circuit_index(c.circuit) == circuit) drive.emplace_back(&c, 1.0);
  return field_of(drive, pts);
}

namespace {

// A conductor size for the "on a filament" tolerance.
double coil_size(const Coil& c) {
  switch (c.shape) {
    case Shape::loop: return c.radius_m;
    case Shape::pack: return std::max({c.outer_radius_m, c.width_m});
    case Shape::solenoid: return std::max({c.radius_m, c.outer_radius_m, c.length_m});
    case Shape::rectangle: return std::max(c.width_m, c.height_m);
    case Shape::polygon: {
      double s = 0.0;
      for (const Vec3& v : c.vertices_m) s = std::max(s, v.norm());
      return s;
    }
  }
  return 0.0;
}

bool on_or_inside(const Coil& c, const Frame& f, const Vec3& centre, const Vec3& p) {
  using namespace detail;
  const double tol = 1e-9 * coil_size(c);
  const Vec3 d = p - centre;
  const double lz = d.dot(f.w);
  const double rho = std::hypot(d.dot(f.u), d.dot(f.v));
  switch (c.shape) {
    case Shape::loop: return std::hypot(rho - c.radius_m, lz) <= tol;
    case Shape::pack:
      return distance_to_box(rho, lz, c.inner_radius_m, c.outer_radius_m, -0.5 * c.width_m, 0.5 * c.width_m) <= tol;
    case Shape::solenoid:
      if (c.multilayer())
        return distance_to_box(rho, lz, c.inner_radius_m, c.outer_radius_m, -0.5 * c.length_m, 0.5 * c.length_m) <= tol;
      return distance_to_box(rho, lz, c.radius_m, c.radius_m, -0.5 * c.length_m, 0.5 * c.length_m) <= tol;
    case Shape::rectangle: {
      const double hs = 0.5 * c.depth_m, ht = 0.5 * c.thickness_m;
      const auto v = rectangle_corners(f, centre, 0.5 * c.width_m, 0.5 * c.height_m);
      if (!c.thick_rectangle()) {
        for (std::size_t k = 0; k < 4; ++k)
          if (distance_to_segment(p, v[k], v[(k + 1) % 4]) <= tol) return true;
        return false;
      }
      // Inside the band between the inner and outer rectangles, within the thickness.
      const double au = std::fabs(d.dot(f.u)), av = std::fabs(d.dot(f.v));
      const bool in_outer = au <= 0.5 * c.width_m + hs + tol && av <= 0.5 * c.height_m + hs + tol;
      const bool in_inner = au < 0.5 * c.width_m - hs - tol && av < 0.5 * c.height_m - hs - tol;
      return std::fabs(lz) <= ht + tol && in_outer && !in_inner;
    }
    case Shape::polygon: {
      const std::size_t nv = c.vertices_m.size();
      for (std::size_t k = 0; k < nv; ++k)
        if (distance_to_segment(p, centre + c.vertices_m[k], centre + c.vertices_m[(k + 1) % nv]) <= tol) return true;
      return false;
    }
  }
  return false;
}

}  // namespace

void check_clear_of_windings(std::span<const Coil> coils, const PointSet& pts) {
  for (const Coil& c : coils) {
    const Frame f = Frame::from_axis(c.axis, c.width_axis);
    for (const Winding& w : windings(c)) {
      for (std::size_t i = 0; i < pts.size(); ++i) {
        const Vec3 p = pts[i];
        if (on_or_inside(c, f, w.centre_m, p))
          throw DomainError(fmt::format(
              "point ({:.9g}, {:.9g}, {:.9g}) m lies on or inside the winding of coil '{}' ({}), "
              "where its field is not finite or not modelled",
              p.x(), p.y(), p.z(), c.name, to_string(c.shape)));
      }
    }
  }
}

}  // namespace coilwright
