#include "coilwright/geometry.hpp"

#include <cmath>

namespace coilwright {

Frame Frame::from_axis(const Vec3& axis, const Vec3& reference) {
  Frame f;
  f.w = axis.normalized();
  Vec3 u = reference - reference.dot(f.w) * f.w;
  if (u.norm() < 1e-12 * std::max(1.0, reference.norm())) {
    // Least-parallel coordinate axis: a stable, deterministic choice.
    const Vec3 a = f.w.cwiseAbs();
    Vec3 e = Vec3::UnitX();
    if (a.y() <= a.x() && a.y() <= a.z()) e = Vec3::UnitY();
    if (a.z() < a.x() && a.z() < a.y()) e = Vec3::UnitZ();
    u = e - e.dot(f.w) * f.w;
  }
  f.u = u.normalized();
  f.v = f.w.cross(f.u);
  return f;
}

Mat3 Frame::matrix() const {
  Mat3 m;
  m.col(0) = u;
  m.col(1) = v;
  m.col(2) = w;
  return m;
}

}  // namespace coilwright
