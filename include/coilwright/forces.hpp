#pragma once
// Forces and torques between windings, and the self-force that stretches a circular winding.
// Pure: no I/O.
#include <optional>
#include <span>
#include <vector>

#include "coilwright/coil.hpp"
#include "coilwright/geometry.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

struct Model;

// Axial force per ampere squared [N/A^2] on coaxial loop b (radius b, at +d along the axis from
// loop a, radius a), from the radial field of a: F = -2 pi b B_rho(b, d) per ampere, with the loop's
// off-axis field (e.g. W. R. Smythe, Static and Dynamic Electricity, sec. 7.10):
//   F = mu0 d / sqrt((a+b)^2 + d^2) [K(k) - (a^2 + b^2 + d^2)/((a-b)^2 + d^2) E(k)],
//   k^2 = 4ab/((a+b)^2 + d^2).  Negative (attraction) for currents in the same sense; equal to dM/dd.
[[nodiscard]] double coaxial_loop_force(double a_m, double b_m, double d_m);

struct ForceOptions {
  int points_per_turn = 128;  // trapezoid points around a circular turn; per segment: 4 panels x 8
  int order_across = 4;       // Gauss-Legendre nodes across / along a winding's cross-section
};

// Net Lorentz force and torque on one winding from all the others (the other half of a pair
// included), F = sum I w dl x B by quadrature along the conductor, B from add_coil_field.
struct WindingForce {
  Vec3 force_N = Vec3::Zero();
  Vec3 torque_Nm = Vec3::Zero();  // about the winding's centre
};

// One entry per winding, in the order of model.coils x windings(coil); `currents_A` one per circuit.
[[nodiscard]] std::vector<WindingForce> forces_on_windings(const Model& model, std::span<const double> currents_A,
                                                           const ForceOptions& options = {});

// The outward radial self-force on a circular winding by virtual work, F_r = 1/2 I^2 dL/dR (the
// derivative of its self-inductance with respect to the radius at a fixed cross-section, by central
// difference), with the mean pressure on the winding's mean cylinder and the hoop tension the
// conductor carries. Only for loops, packs and solenoids; needs the self-inductance function.
struct RadialLoad {
  double radial_force_N = 0.0;   // total outward force, all turns
  double pressure_Pa = 0.0;      // F_r / (2 pi R_mean x axial width)
  double hoop_tension_N = 0.0;   // F_r / (2 pi), shared by the turns of the cross-section
  double hoop_stress_Pa = 0.0;   // hoop tension / (turns x conductor area)
};
// `bundle_*` as for self_inductance (filament coils). nullopt without a wire or for non-circular coils.
[[nodiscard]] std::optional<RadialLoad> radial_load(const Winding& w, const std::optional<Wire>& wire, double current_A,
                                                    double bundle_width_m = 0.0, double bundle_depth_m = 0.0);

}  // namespace coilwright
