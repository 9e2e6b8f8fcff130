#pragma once
// Field kernels: pure functions of one conductor's geometry and a set of points, in the
// conductor's local frame (except segments, which are frame-free). No allocation, no I/O; the
// point loops are written over structure-of-arrays data so that the compiler vectorises them.
#include <cstddef>

#include "coilwright/geometry.hpp"

namespace coilwright::kernels {

// Bulirsch's generalised complete elliptic integral
//   cel(kc, p, a, b) = int_0^{pi/2} (a cos^2 t + b sin^2 t) / ((cos^2 t + p sin^2 t) sqrt(cos^2 t + kc^2 sin^2 t)) dt,
// for kc != 0 and p > 0 (R. Bulirsch, Numer. Math. 7 (1965) 78-90; 13 (1969) 305-315).
// Scalar reference implementation; the kernels use specialised shared iterations.
[[nodiscard]] double cel(double kc, double p, double a, double b) noexcept;

// Circular filament of radius `radius_m` in the plane z = 0, centred on the origin, carrying 1 A
// right-handed about +z. For each of the n points (rho[i] >= 0, z[i]) writes
//   brho_over_rho[i] = B_rho / rho  [T/(A m)]   (finite on the axis; exact there)
//   bz[i]            = B_z          [T/A]
// With D = (a+rho)^2 + z^2, d = (a-rho)^2 + z^2, kc = sqrt(d/D), k^2 = 4 a rho / D:
//   B_z       = mu0 a / (pi sqrt(D) d) * cel(kc, 1, a - rho, (a + rho) kc^2)
//   B_rho/rho = mu0 4 a^2 z / (pi sqrt(D) d D) * cel(kc, 1, 1, -kc^2) / k^2,
// obtained from the Biot-Savart integral with the substitution phi = pi - 2t (which turns
// |r - r'|^2 into D (cos^2 t + kc^2 sin^2 t)). The factor k^2 is divided out analytically in
// the first step of Bulirsch's iteration, so B_rho/rho has no cancellation near the axis. Both
// integrals have p = 1, for which Bulirsch's p stays equal to his running mean `em`; they share
// one iteration (one square root per step, no division), run over batches of 16 points with
// a convergence mask. B_z's first step is formed without the cancellation of terms of size rho
// that the plain form has far from the loop (it lost about eps rho/a: 1e-13 at 700 a); measured
// against 40-digit values, both components keep about 1e-15 of |B| everywhere (axis, far field)
// except within 0.1 a of the wire, where the inputs themselves fix B only to ~eps a/distance.
// The point loop is compiled for AVX-512, AVX2+FMA and baseline x86-64 and picked at load time.
// Points on the wire (rho = a, z = 0) give non-finite values.
void loop_field(double radius_m, std::size_t n, const double* rho, const double* z,
                double* brho_over_rho, double* bz) noexcept;

// Straight filament from a to b carrying current_A, in any frame: adds its field [T] at the
// points to `out`. Closed form of J. D. Hanson and S. P. Hirshman, Phys. Plasmas 9, 4410 (2002):
//   B = mu0 I / (4 pi) * (Ri + Rf) / (Ri Rf (Ri Rf + Ri.Rf)) * (Ri x Rf),
// with Ri = a - r, Rf = b - r (so (Ri+Rf)^2 - L^2 = 2 (Ri Rf + Ri.Rf)). Beside the segment
// (Ri.Rf < 0) the factor Ri Rf + Ri.Rf is evaluated as |Ri x Rf|^2 / (Ri Rf - Ri.Rf), which
// avoids cancellation: about 1e-11 relative at 1e-6 L from the wire. Points on the segment's
// line within it give non-finite values.
void add_segment_field(const Vec3& a, const Vec3& b, double current_A, PointsView pts,
                       FieldView out) noexcept;

// Cylindrical current sheet of radius a and length L centred on the origin with axis +z,
// n turns per metre, 1 A right-handed about +z (N. Derby and S. Olbert, Am. J. Phys. 78,
// 229 (2010)): with z+- = z +- L/2, D+- = z+-^2 + (a+rho)^2, k+-^2 = 4 a rho / D+-, gamma =
// (a - rho)/(a + rho) and B0 = mu0 n / pi,
//   B_z       = B0 a/(a+rho) [ z+/sqrt(D+) cel(kc+, gamma^2, 1, gamma) - (same at z-) ]
//   B_rho/rho = B0 4 a^2 [ P'(kc+)/D+^{3/2} - P'(kc-)/D-^{3/2} ],  P' = cel(kc, 1, 1, -1) / k^2,
// again with k^2 divided out analytically. Writes B_rho/rho [T/(A m)] and B_z [T/A].
// The form is a difference of the two ends' terms: far from the sheet (distance r >> L) it
// loses about eps (r/L)^2 relative (measured 3e-14 at r = 10 L), where a sum of loops or the
// dipole expansion would be more precise.
void solenoid_sheet_field(double radius_m, double length_m, double turns_per_m, std::size_t n,
                          const double* rho, const double* z, double* brho_over_rho,
                          double* bz) noexcept;

}  // namespace coilwright::kernels
