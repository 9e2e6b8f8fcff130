#pragma once
// Vectors, orthonormal frames and structure-of-arrays point sets.
#include <Eigen/Core>
#include <Eigen/Geometry>
#include <cstddef>
#include <vector>

namespace coilwright {

using Vec3 = Eigen::Vector3d;
using Mat3 = Eigen::Matrix3d;

// A right-handed orthonormal frame: u, v span the coil plane, w is the coil axis.
struct Frame {
  Vec3 u, v, w;
  // The frame with w = axis (normalised) and u = the part of `reference` orthogonal to it;
  // without a usable reference, u is chosen from the coordinate axis least parallel to w.
  static Frame from_axis(const Vec3& axis, const Vec3& reference = Vec3::Zero());
  [[nodiscard]] Mat3 matrix() const;  // columns u, v, w: local -> world
};

// Points as structure of arrays, so kernels vectorise over them.
struct PointSet {
  std::vector<double> x, y, z;  // [m]
  [[nodiscard]] std::size_t size() const noexcept { return x.size(); }
  void reserve(std::size_t n) { x.reserve(n); y.reserve(n); z.reserve(n); }
  void push_back(const Vec3& p) { x.push_back(p.x()); y.push_back(p.y()); z.push_back(p.z()); }
  [[nodiscard]] Vec3 operator[](std::size_t i) const { return {x[i], y[i], z[i]}; }
};

// Field values as structure of arrays.
struct FieldSet {
  std::vector<double> bx, by, bz;  // [T] (or [T/A] for a response column)
  FieldSet() = default;
  explicit FieldSet(std::size_t n) : bx(n, 0.0), by(n, 0.0), bz(n, 0.0) {}
  [[nodiscard]] std::size_t size() const noexcept { return bx.size(); }
  [[nodiscard]] Vec3 operator[](std::size_t i) const { return {bx[i], by[i], bz[i]}; }
};

// Non-owning views of a contiguous range of points and of field accumulators, so callers can
// split work into chunks (one per thread) without copying.
struct PointsView {
  const double* x;
  const double* y;
  const double* z;
  std::size_t n;
};
struct FieldView {
  double* bx;
  double* by;
  double* bz;
};
inline PointsView view(const PointSet& p, std::size_t begin, std::size_t count) {
  return {p.x.data() + begin, p.y.data() + begin, p.z.data() + begin, count};
}
inline PointsView view(const PointSet& p) { return view(p, 0, p.size()); }
inline FieldView view(FieldSet& f, std::size_t begin = 0) {
  return {f.bx.data() + begin, f.by.data() + begin, f.bz.data() + begin};
}

}  // namespace coilwright
