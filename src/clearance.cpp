#include "coilwright/clearance.hpp"

#include <algorithm>
#include <array>
#include <utility>
#include <cmath>
#include <limits>
#include <numbers>

namespace coilwright {

namespace {

constexpr int kCircleSamples = 180;
constexpr int kSegmentSubdivisions = 24;

double point_segment_distance(const Vec3& p, const Vec3& a, const Vec3& b) {
  const Vec3 ab = b - a;
  const double len2 = ab.squaredNorm();
  const double t = len2 > 0 ? std::clamp((p - a).dot(ab) / len2, 0.0, 1.0) : 0.0;
  return (p - (a + t * ab)).norm();
}

// Distance between the rectangles [r0,r1]x[z0,z1] of two coaxial annuli in the ρ–z plane.
double rect_gap(double ar0, double ar1, double az0, double az1, double br0, double br1, double bz0, double bz1) {
  const double dr = std::max({br0 - ar1, ar0 - br1, 0.0});
  const double dz = std::max({bz0 - az1, az0 - bz1, 0.0});
  if (dr > 0 || dz > 0) return std::hypot(dr, dz);
  // Overlapping: minus the penetration depth.
  return -std::min({ar1 - br0, br1 - ar0, az1 - bz0, bz1 - az0});
}

std::vector<Vec3> polygon_path(const std::vector<Vec3>& corners) {
  std::vector<Vec3> path;
  for (std::size_t i = 0; i < corners.size(); ++i) {
    const Vec3& a = corners[i];
    const Vec3& b = corners[(i + 1) % corners.size()];
    for (int k = 0; k < kSegmentSubdivisions; ++k) path.push_back(a + (b - a) * (double(k) / kSegmentSubdivisions));
  }
  return path;
}

// The unit circle once for all: circular paths are sampled in search evaluations.
const std::array<std::pair<double, double>, kCircleSamples>& unit_circle() {
  static const std::array<std::pair<double, double>, kCircleSamples> circle = [] {
    std::array<std::pair<double, double>, kCircleSamples> c{};
    for (int k = 0; k < kCircleSamples; ++k) {
      const double phi = 2.0 * std::numbers::pi * k / kCircleSamples;
      c[static_cast<std::size_t>(k)] = {std::cos(phi), std::sin(phi)};
    }
    return c;
  }();
  return circle;
}

void sample_circle(const WindingBody& b, std::vector<Vec3>& path) {
  const Frame f = Frame::from_axis(b.axis, b.reference);
  const double rho_mid = 0.5 * (b.rho_in_m + b.rho_out_m);
  path.clear();
  path.reserve(kCircleSamples);
  for (const auto& [cos_phi, sin_phi] : unit_circle()) path.push_back(b.centre_m + rho_mid * (cos_phi * f.u + sin_phi * f.v));
}

// The body's path: its own, or a circular body's sampled into `scratch` when it was built without.
const std::vector<Vec3>& path_of(const WindingBody& b, std::vector<Vec3>& scratch) {
  if (!b.circular || !b.path_m.empty()) return b.path_m;
  sample_circle(b, scratch);
  return scratch;
}

bool coaxial(const WindingBody& a, const WindingBody& b) {
  if (!(a.circular && b.circular && a.axis.cross(b.axis).norm() < 1e-12)) return false;
  const Vec3 d = b.centre_m - a.centre_m;
  return (d - d.dot(a.axis) * a.axis).norm() < 1e-12 * std::max(1.0, d.norm());
}

}  // namespace

WindingBody body_of(const Winding& w, Paths paths) {
  const Coil& c = *w.coil;
  WindingBody b;
  b.centre_m = w.centre_m;
  b.axis = c.axis.normalized();
  b.reference = c.width_axis;
  switch (c.shape) {
    case Shape::loop:
      b.circular = true;
      b.rho_in_m = b.rho_out_m = c.radius_m;
      break;
    case Shape::pack:
      b.circular = true;
      b.rho_in_m = c.inner_radius_m;
      b.rho_out_m = c.outer_radius_m;
      b.half_width_m = 0.5 * c.width_m;
      break;
    case Shape::solenoid:
      b.circular = true;
      b.rho_in_m = c.multilayer() ? c.inner_radius_m : c.radius_m;
      b.rho_out_m = c.multilayer() ? c.outer_radius_m : c.radius_m;
      b.half_width_m = 0.5 * c.length_m;
      break;
    case Shape::rectangle: {
      const Frame f = Frame::from_axis(c.axis, c.width_axis);
      const double hw = 0.5 * c.width_m, hh = 0.5 * c.height_m;
      b.path_m = polygon_path({w.centre_m + hw * f.u + hh * f.v, w.centre_m - hw * f.u + hh * f.v,
                               w.centre_m - hw * f.u - hh * f.v, w.centre_m + hw * f.u - hh * f.v});
      b.tube_radius_m = 0.5 * std::hypot(c.depth_m, c.thickness_m);
      return b;
    }
    case Shape::polygon: {
      std::vector<Vec3> corners;
      for (const Vec3& v : c.vertices_m) corners.push_back(w.centre_m + v);
      b.path_m = polygon_path(corners);
      return b;
    }
  }
  if (paths == Paths::always) sample_circle(b, b.path_m);
  b.tube_radius_m = std::hypot(0.5 * (b.rho_out_m - b.rho_in_m), b.half_width_m);
  return b;
}

std::vector<WindingBody> bodies_of(std::span<const Coil> coils, Paths paths) {
  std::vector<WindingBody> out;
  for (const Coil& c : coils)
    for (const Winding& w : windings(c)) out.push_back(body_of(w, paths));
  return out;
}

double distance_to(const WindingBody& body, const Vec3& p) {
  if (body.circular) {
    const Vec3 d = p - body.centre_m;
    const double z = d.dot(body.axis);
    const double rho = (d - z * body.axis).norm();
    const double dr = std::max({body.rho_in_m - rho, rho - body.rho_out_m, 0.0});
    const double dz = std::max(std::abs(z) - body.half_width_m, 0.0);
    return std::hypot(dr, dz);
  }
  double best = std::numeric_limits<double>::infinity();
  const std::size_t n = body.path_m.size();
  for (std::size_t i = 0; i < n; ++i)
    best = std::min(best, point_segment_distance(p, body.path_m[i], body.path_m[(i + 1) % n]));
  return std::max(0.0, best - body.tube_radius_m);
}

double gap_m(const WindingBody& a, const WindingBody& b) {
  if (coaxial(a, b)) {
    const double dz = (b.centre_m - a.centre_m).dot(a.axis);
    return rect_gap(a.rho_in_m, a.rho_out_m, -a.half_width_m, a.half_width_m, b.rho_in_m, b.rho_out_m,
                    dz - b.half_width_m, dz + b.half_width_m);
  }
  // Sampled paths: distance of each sample of one path to the segments of the other.
  std::vector<Vec3> scratch_a, scratch_b;
  const std::vector<Vec3>& pa = path_of(a, scratch_a);
  const std::vector<Vec3>& pb = path_of(b, scratch_b);
  double best = std::numeric_limits<double>::infinity();
  auto scan = [&best](const std::vector<Vec3>& from, const std::vector<Vec3>& to) {
    const std::size_t n = to.size();
    for (const Vec3& p : from)
      for (std::size_t i = 0; i < n; ++i) best = std::min(best, point_segment_distance(p, to[i], to[(i + 1) % n]));
  };
  scan(pa, pb);
  scan(pb, pa);
  return best - a.tube_radius_m - b.tube_radius_m;
}

Extents extents(std::span<const WindingBody> bodies, const Vec3& centre, const Vec3& axis) {
  const Vec3 a = axis.normalized();
  Extents e;
  e.min_radial_m = std::numeric_limits<double>::infinity();
  for (const WindingBody& b : bodies) {
    const bool coaxial = b.circular && b.axis.cross(a).norm() < 1e-12 &&
                         ((b.centre_m - centre) - (b.centre_m - centre).dot(a) * a).norm() < 1e-12;
    if (coaxial) {
      const double z = (b.centre_m - centre).dot(a);
      e.max_radial_m = std::max(e.max_radial_m, b.rho_out_m);
      e.min_radial_m = std::min(e.min_radial_m, b.rho_in_m);
      e.max_axial_m = std::max(e.max_axial_m, std::abs(z) + b.half_width_m);
      continue;
    }
    std::vector<Vec3> scratch;
    for (const Vec3& p : path_of(b, scratch)) {
      const Vec3 d = p - centre;
      const double z = d.dot(a);
      const double rho = (d - z * a).norm();
      e.max_radial_m = std::max(e.max_radial_m, rho + b.tube_radius_m);
      e.min_radial_m = std::min(e.min_radial_m, std::max(0.0, rho - b.tube_radius_m));
      e.max_axial_m = std::max(e.max_axial_m, std::abs(z) + b.tube_radius_m);
    }
  }
  if (bodies.empty()) e.min_radial_m = 0.0;
  return e;
}

}  // namespace coilwright
