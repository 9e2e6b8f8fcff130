// Straight filament segment: Hanson-Hirshman closed form with a cancellation-free denominator.
#include <cmath>

#include "coilwright/constants.hpp"
#include "coilwright/kernels.hpp"

namespace coilwright::kernels {

namespace {

// Compiled for AVX-512, AVX2+FMA and the baseline; the loader picks the widest the CPU has
// (GCC function multiversioning), so the default build needs no -march=native.
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__) && !defined(__AVX512F__) && \
    !defined(COILWRIGHT_NO_MULTIVERSION)
#define COILWRIGHT_CLONES __attribute__((target_clones("arch=x86-64-v4", "arch=x86-64-v3", "default")))
#else
#define COILWRIGHT_CLONES
#endif

COILWRIGHT_CLONES
void segment_points(const Vec3& a, const Vec3& b, double current_A, PointsView pts, FieldView out) noexcept {
  const double ax = a.x(), ay = a.y(), az = a.z();
  const double bx = b.x(), by = b.y(), bz = b.z();
  const double c = mu0 * current_A / (4.0 * pi);
  // Ri x Rf = Ri x (b - a): one rounded vector instead of two in the cross product.
  const double ex = bx - ax, ey = by - ay, ez = bz - az;
  const double* __restrict px = pts.x;
  const double* __restrict py = pts.y;
  const double* __restrict pz = pts.z;
  double* __restrict ox = out.bx;
  double* __restrict oy = out.by;
  double* __restrict oz = out.bz;
  const std::size_t n = pts.n;
#if !defined(__clang__)  // clang has no ivdep; the __restrict pointers above say the same
#pragma GCC ivdep
#endif
  for (std::size_t i = 0; i < n; ++i) {
    const double ix = ax - px[i], iy = ay - py[i], iz = az - pz[i];  // R_i = a - r
    const double fx = bx - px[i], fy = by - py[i], fz = bz - pz[i];  // R_f = b - r
    const double ri = std::sqrt(ix * ix + iy * iy + iz * iz);
    const double rf = std::sqrt(fx * fx + fy * fy + fz * fz);
    const double cx = iy * ez - iz * ey;
    const double cy = iz * ex - ix * ez;
    const double cz = ix * ey - iy * ex;
    const double dot = ix * fx + iy * fy + iz * fz;
    const double rr = ri * rf;
    const double c2 = cx * cx + cy * cy + cz * cz;
    // (Ri Rf + Ri.Rf) (Ri Rf - Ri.Rf) = |Ri x Rf|^2: take the form without cancellation.
    // factor = (Ri+Rf) / (Ri Rf (Ri Rf + Ri.Rf)).
    const double num = dot >= 0.0 ? 1.0 : rr - dot;
    const double den = dot >= 0.0 ? rr + dot : c2;
    const double k = c * (ri + rf) * num / (rr * den);
    ox[i] += k * cx;
    oy[i] += k * cy;
    oz[i] += k * cz;
  }
}

}  // namespace

void add_segment_field(const Vec3& a, const Vec3& b, double current_A, PointsView pts,
                       FieldView out) noexcept {
  segment_points(a, b, current_A, pts, out);
}

}  // namespace coilwright::kernels
