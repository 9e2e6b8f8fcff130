#pragma once
// Self- and mutual inductance of filaments, windings and circuits, and the figures that follow
// from them (time constant, stored energy, AC drive, ramp voltage). Pure: no I/O.
#include <optional>
#include <span>
#include <vector>

#include <Eigen/Core>

#include "coilwright/coil.hpp"
#include "coilwright/geometry.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

struct Model;

// ---- Filaments ---------------------------------------------------------------------------------

// A closed filament: a circle (centre, unit axis, radius; current right-handed about the axis) or
// a closed polygon through `vertices_m` in order (world coordinates).
struct Filament {
  bool circle = true;
  Vec3 centre_m = Vec3::Zero();
  Vec3 axis = Vec3::UnitZ();
  double radius_m = 0.0;
  std::vector<Vec3> vertices_m;
  [[nodiscard]] static Filament loop(const Vec3& centre, const Vec3& axis, double radius);
  [[nodiscard]] static Filament polygon(std::vector<Vec3> vertices);
};

// Maxwell's mutual inductance [H] of coaxial circular filaments of radii a, b a distance d apart
// (Treatise, vol. 2, art. 701): M = mu0 sqrt(ab) [(2/k - k) K(k) - (2/k) E(k)], k^2 = 4ab/((a+b)^2+d^2).
// Evaluated in the Landen-transformed form M = 2 mu0 sqrt(ab) k1^(3/2) D(k1), D = (K - E)/k^2,
// k1 = 4ab/(r1 + r2)^2 with r1, r2 the least and greatest distances between the circles, which
// keeps full relative precision for distant loops where the textbook form cancels.
[[nodiscard]] double mutual_coaxial_loops(double a_m, double b_m, double d_m);

// Vector potential per ampere [T m/A] at `point` of a circular filament: azimuthal,
// A_phi = 8 mu0 a^2 rho D(k1) / (pi (r1 + r2)^3) (the flux M/(2 pi rho) of the form above).
[[nodiscard]] Vec3 loop_vector_potential(const Filament& loop, const Vec3& point);

// Mutual inductance [H] of two filaments (one turn each). Coaxial circles: Maxwell's formula;
// otherwise the Neumann integral with the inner integral in closed form: the line integral of
// one filament's exact vector potential (circle: above; straight segment:
// mu0/(4 pi) ln((R1 + R2 + L)/(R1 + R2 - L)) along the segment) around the other, by the periodic
// trapezoidal rule on circles and graded Gauss-Legendre on segments, refined until two orders
// agree to `rel_tol`.
[[nodiscard]] double mutual_inductance(const Filament& a, const Filament& b, double rel_tol = 1e-9);

// The Neumann double integral mu0/(4 pi) \oint\oint dl1.dl2/|r1 - r2| by plain Gauss-Legendre over
// both curves (each circle or segment cut into `panels` pieces of `order` nodes). A check on the
// above for curves that do not touch.
[[nodiscard]] double neumann_mutual_inductance(const Filament& a, const Filament& b, int panels = 16, int order = 16);

// Self-inductance [H] of a one-turn filament of round-wire (or bundle) cross-section with geometric
// mean distance `gmd_m` from itself: the Neumann integral with |r1 - r2| replaced by
// sqrt(|r1 - r2|^2 + gmd^2) (for a circle exactly Maxwell's M(R, R, gmd)).
[[nodiscard]] double filament_self_inductance(const Filament& f, double gmd_m);

// Classical self-inductance of a circular loop of round wire with uniform current,
// L = mu0 R (ln(8R/a) - 7/4) (E. B. Rosa and F. W. Grover, Bull. Bur. Stand. 8, 1912), R >> a.
[[nodiscard]] double loop_self_inductance(double loop_radius_m, double wire_radius_m);

// Geometric mean distance of a rectangle b x c from itself (Maxwell; Rosa & Grover 1912, eq. 124):
// ln g = ln sqrt(b^2+c^2) - b^2/(12c^2) ln(1+c^2/b^2) - c^2/(12b^2) ln(1+b^2/c^2)
//        + 2b/(3c) atan(c/b) + 2c/(3b) atan(b/c) - 25/12;  a square: g = 0.44705 b.
[[nodiscard]] double rectangle_gmd(double b_m, double c_m);
// Of a circular cross-section of radius a: a e^(-1/4).
[[nodiscard]] double round_gmd(double radius_m);

// Nagaoka's coefficient of a cylindrical current sheet (H. Nagaoka, J. Coll. Sci. Tokyo 27, 1909):
// K = 4/(3 pi k') [(k'^2/k^2)(K(k) - E(k)) + E(k) - k], k^2 = d^2/(d^2 + l^2), d = 2a.
[[nodiscard]] double nagaoka_coefficient(double diameter_m, double length_m);
// Current-sheet inductance of a single-layer solenoid: L = mu0 pi a^2 N^2 K / l.
[[nodiscard]] double solenoid_self_inductance(double radius_m, double length_m, double turns);
// Wheeler's approximation (H. A. Wheeler, Proc. IRE 16, 1928), ~1 % for l > 0.8 a:
// L = mu0 pi a^2 N^2 / (l + 0.9 a).
[[nodiscard]] double wheeler_solenoid_inductance(double radius_m, double length_m, double turns);

// ---- Windings and circuits ---------------------------------------------------------------------

// A winding as weighted one-turn filaments spread over its cross-section (Gauss-Legendre nodes;
// weights sum to sign x turns), the current uniform over the declared cross-section.
struct WeightedFilament {
  Filament filament;
  double weight;
};
[[nodiscard]] std::vector<WeightedFilament> filaments_of(const Winding& w, int order_across, int order_along);

// Mutual inductance [H] between two distinct windings (turns and current signs included), with the
// cross-section quadrature raised until two orders agree to 1e-7 (or order 16).
[[nodiscard]] double mutual_inductance(const Winding& a, const Winding& b);

// Self-inductance [H] of one winding (sign-independent). Needs a wire: without one, nullopt.
//  loop / thin rectangle / polygon: N^2 times the one-turn filament inductance with the GMD of the
//    wound bundle (one turn: the round wire's a e^(-1/4));
//  single-layer solenoid: the current sheet (Nagaoka);
//  pack, multi-layer solenoid, thick rectangle: N^2/n^2 sum over n near-square cells of the
//    cross-section of the cell-to-cell filament mutual inductances, the cell's own term at its GMD.
// `bundle_width_m`/`bundle_depth_m` give the bundle of filament coils (from the winding pack).
[[nodiscard]] std::optional<double> self_inductance(const Winding& w, const std::optional<Wire>& wire,
                                                    double bundle_width_m = 0.0, double bundle_depth_m = 0.0);

// The inductance matrix [H] between circuits (model order). Entry (i, j) sums s_a s_b M(a, b) over
// the windings a of circuit i and b of circuit j (self terms on the diagonal). A diagonal entry is
// absent when a winding of that circuit has no self-inductance (no wire).
struct InductanceMatrix {
  Eigen::MatrixXd henry;           // absent diagonal entries hold NaN
  std::vector<bool> known;         // per circuit: diagonal entry known
  [[nodiscard]] std::optional<double> self(std::size_t i) const {
    return known[i] ? std::optional<double>(henry(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(i))) : std::nullopt;
  }
};
// `self_of_winding[k]` is the self-inductance of the k-th winding in the order of
// model.coils x windings(coil) (nullopt without a wire).
[[nodiscard]] InductanceMatrix circuit_inductance(const Model& model,
                                                  std::span<const std::optional<double>> self_of_winding);

// Stored energy 1/2 I^T L I [J]; nullopt when a circuit with current has no known self term.
[[nodiscard]] std::optional<double> stored_energy(const InductanceMatrix& L, std::span<const double> currents_A);

// Sinusoidal drive at frequency f of a series R-L circuit (amplitudes or RMS alike).
struct AcDrive {
  double reactance_ohm = 0.0;              // X = 2 pi f L
  double impedance_ohm = 0.0;              // |Z| = sqrt(R^2 + X^2)
  double voltage_V = 0.0;                  // I |Z|
  double resonance_capacitance_F = 0.0;    // series C with 1/(2 pi f C) = X: then V = I R
  double capacitor_voltage_V = 0.0;        // I X across that capacitor
};
[[nodiscard]] AcDrive ac_drive(double inductance_H, double resistance_ohm, double current_A, double frequency_Hz);

// Voltage to ramp a circuit's current at dI/dt, reached at the top of the ramp: V = L dI/dt + I R.
[[nodiscard]] inline double ramp_voltage(double inductance_H, double resistance_ohm, double current_A,
                                         double ramp_A_per_s) {
  return inductance_H * ramp_A_per_s + current_A * resistance_ohm;
}

}  // namespace coilwright
