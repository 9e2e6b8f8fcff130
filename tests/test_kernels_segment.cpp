// The straight-segment kernel against the textbook finite-wire formula, including 1e-6 L from
// the wire, and its behaviour on the segment's line beyond its ends.
#include <catch2/catch.hpp>

#include <cmath>

#include "coilwright/constants.hpp"
#include "coilwright/kernels.hpp"

using namespace coilwright;

namespace {

Vec3 segment_at(const Vec3& a, const Vec3& b, double current, const Vec3& p) {
  double x = p.x(), y = p.y(), z = p.z();
  double bx = 0.0, by = 0.0, bz = 0.0;
  kernels::add_segment_field(a, b, current, {&x, &y, &z, 1}, {&bx, &by, &bz});
  return {bx, by, bz};
}

// Source: a finite straight wire, B = mu0 I/(4 pi s) (sin t2 - sin t1) along t x s_hat
// (D. J. Griffiths, Introduction to Electrodynamics, 4th ed., Example 5.5), with sin t from the
// foot of the perpendicular: l / sqrt(l^2 + s^2); no cancellation for a foot inside the segment.
// Evaluated in long double (64-bit mantissa) so the reference is ~1e-13 even 1e-6 L from the wire.
Vec3 griffiths(const Vec3& a_, const Vec3& b_, double current, const Vec3& p_) {
  using V = Eigen::Matrix<long double, 3, 1>;
  const V a = a_.cast<long double>(), b = b_.cast<long double>(), p = p_.cast<long double>();
  const V t = (b - a).normalized();
  const long double l1 = (a - p).dot(t), l2 = (b - p).dot(t);
  const V sv = (p - a) - (p - a).dot(t) * t;  // from the line to the point
  const long double s = sv.norm();
  const long double mag = static_cast<long double>(mu0) * current / (4.0L * static_cast<long double>(pi) * s) *
                          (l2 / std::sqrt(l2 * l2 + s * s) - l1 / std::sqrt(l1 * l1 + s * s));
  return (mag * t.cross(sv / s)).cast<double>();
}

}  // namespace

TEST_CASE("segment kernel matches the finite-wire formula", "[kernels][segment]") {
  const Vec3 a(0.1, -0.2, 0.3), b(0.7, 0.5, -0.4);  // generic direction: no exact cross products
  const Vec3 t = (b - a).normalized();
  const Vec3 n1 = t.cross(Vec3(0.3, 0.2, 0.9)).normalized();
  const Vec3 n2 = t.cross(n1);
  const double L = (b - a).norm();
  for (double frac : {0.02, 0.3, 0.5, 0.77, 0.999}) {
    for (double dist : {1e-6, 1e-3, 0.1, 2.0, 50.0}) {
      for (double ang : {0.0, 1.1, 2.9}) {
        const Vec3 p = a + frac * L * t + dist * L * (std::cos(ang) * n1 + std::sin(ang) * n2);
        const Vec3 got = segment_at(a, b, 2.5, p);
        const Vec3 want = griffiths(a, b, 2.5, p);
        // The differences a - r round by ~1e-16 L, which moves the point by ~1e-16 L/dist
        // relative to its distance: allow 1e-16 L/dist (1e-10 at 1e-6 L; 1e-11 to 6e-11 is
        // measured), plus 1e-14 for the closed form's own roundings.
        const double rel = (got - want).norm() / want.norm();
        INFO("frac=" << frac << " dist=" << dist << " ang=" << ang << " rel=" << rel);
        CHECK(rel <= 1e-14 + 1e-16 / dist);
      }
    }
  }
}

TEST_CASE("segment kernel beside the ends and on the line beyond them", "[kernels][segment]") {
  const Vec3 a(0.0, 0.0, 0.0), b(0.0, 0.0, 1.0);
  // On the line beyond the ends the field vanishes (Biot-Savart: dl parallel to r - r').
  const Vec3 on_line = segment_at(a, b, 1.0, Vec3(0.0, 0.0, 1.5));
  CHECK(std::isfinite(on_line.norm()));
  CHECK(on_line.norm() < 1e-30);
  // Points past the ends (foot outside the segment), against the same textbook formula.
  for (double zz : {-2.0, -1e-3, 1.0 + 1e-4, 3.0}) {
    const Vec3 p(0.2, -0.1, zz);
    const Vec3 got = segment_at(a, b, 1.0, p);
    const Vec3 want = griffiths(a, b, 1.0, p);
    // Source as above (in long double, so its cancellation of sin t2 - sin t1 stays ~1e-16).
    CHECK((got - want).norm() <= 1e-13 * want.norm());
  }
}

TEST_CASE("long segment tends to the infinite wire", "[kernels][segment]") {
  // Source: B = mu0 I / (2 pi s) for an infinite straight wire (Ampere's law). A segment of
  // half-length H differs by the factor H / sqrt(H^2 + s^2) = 1 - s^2/(2 H^2) + ...
  const double s = 0.01, H = 1e3;
  const Vec3 got = segment_at(Vec3(0, 0, -H), Vec3(0, 0, H), 3.0, Vec3(s, 0, 0));
  const double want = mu0 * 3.0 / (2.0 * pi * s) * H / std::hypot(H, s);
  CHECK(std::fabs(got.y() - want) <= 1e-13 * want);  // direction +y for current +z at +x
  CHECK(std::fabs(got.x()) <= 1e-16 * want);
  CHECK(std::fabs(got.z()) <= 1e-16 * want);
}
