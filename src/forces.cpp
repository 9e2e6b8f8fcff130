#include "coilwright/forces.hpp"

#include <algorithm>
#include <cmath>

#include <boost/math/special_functions/ellint_1.hpp>
#include <boost/math/special_functions/ellint_2.hpp>

#include "coilwright/constants.hpp"
#include "coilwright/field.hpp"
#include "coilwright/inductance.hpp"
#include "coilwright/model.hpp"
#include "hw_quadrature.hpp"

namespace coilwright {

double coaxial_loop_force(double a, double b, double d) {
  const double s2 = (a + b) * (a + b) + d * d;
  const double k = std::sqrt(4.0 * a * b / s2);
  const double K = boost::math::ellint_1(k), E = boost::math::ellint_2(k);
  return mu0 * d / std::sqrt(s2) * (K - (a * a + b * b + d * d) / ((a - b) * (a - b) + d * d) * E);
}

namespace {

// A winding alone: the coil moved to the winding's centre, no pair, current sign folded in.
struct Single {
  Coil coil;
  double sign;
  std::size_t circuit;
};

// Quadrature nodes along a filament: position and weighted dl.
void path_nodes(const Filament& f, double weight, const ForceOptions& o, PointSet& pts, std::vector<Vec3>& dl) {
  if (f.circle) {
    const Frame fr = Frame::from_axis(f.axis);
    const int n = o.points_per_turn;
    for (int i = 0; i < n; ++i) {
      const double th = 2.0 * pi * i / n;
      pts.push_back(f.centre_m + f.radius_m * (std::cos(th) * fr.u + std::sin(th) * fr.v));
      dl.push_back(weight * f.radius_m * (2.0 * pi / n) * (-std::sin(th) * fr.u + std::cos(th) * fr.v));
    }
    return;
  }
  const auto& r = hw_detail::gauss_legendre_rule(8);
  constexpr int kPanels = 4;
  const auto& v = f.vertices_m;
  for (std::size_t k = 0; k < v.size(); ++k) {
    const Vec3 p = v[k], s = v[(k + 1) % v.size()] - v[k];
    for (int q = 0; q < kPanels; ++q)
      for (std::size_t j = 0; j < r.x.size(); ++j) {
        pts.push_back(p + ((q + 0.5 * (1.0 + r.x[j])) / kPanels) * s);
        dl.push_back(weight * (0.5 * r.w[j] / kPanels) * s);
      }
  }
}

}  // namespace

std::vector<WindingForce> forces_on_windings(const Model& model, std::span<const double> currents_A,
                                             const ForceOptions& options) {
  std::vector<Single> singles;
  std::vector<Winding> wl;
  for (const Coil& c : model.coils)
    for (const Winding& w : windings(c)) {
      Single s{c, w.sign, model.circuit_index(c.circuit)};
      s.coil.separation_m.reset();
      s.coil.opposed = false;
      s.coil.centre_m = w.centre_m;
      singles.push_back(std::move(s));
      wl.push_back(w);
    }
  std::vector<WindingForce> out(singles.size());
  for (std::size_t i = 0; i < singles.size(); ++i) {
    const double current = currents_A[singles[i].circuit];
    if (current == 0.0) continue;
    PointSet pts;
    std::vector<Vec3> dl;
    for (const auto& wf : filaments_of(wl[i], options.order_across, options.order_across))
      path_nodes(wf.filament, wf.weight, options, pts, dl);  // weights carry sign x turns
    FieldSet b(pts.size());
    for (std::size_t j = 0; j < singles.size(); ++j) {
      if (j == i) continue;
      const double cj = currents_A[singles[j].circuit] * singles[j].sign;
      if (cj != 0.0) add_coil_field(singles[j].coil, cj, view(pts), view(b));
    }
    for (std::size_t p = 0; p < pts.size(); ++p) {
      const Vec3 df = current * dl[p].cross(b[p]);
      out[i].force_N += df;
      out[i].torque_Nm += (pts[p] - wl[i].centre_m).cross(df);
    }
  }
  return out;
}

std::optional<RadialLoad> radial_load(const Winding& w, const std::optional<Wire>& wire, double current_A,
                                      double bundle_width_m, double bundle_depth_m) {
  const Coil& c = *w.coil;
  if (!wire || !(c.shape == Shape::loop || c.shape == Shape::pack || c.shape == Shape::solenoid)) return std::nullopt;
  const bool thin = c.shape == Shape::loop || (c.shape == Shape::solenoid && !c.multilayer());
  const double r_mean = thin ? c.radius_m : 0.5 * (c.inner_radius_m + c.outer_radius_m);
  const double h = 1e-4 * r_mean;
  auto inductance_at = [&](double dr) {
    Coil moved = c;
    moved.radius_m += dr;
    moved.inner_radius_m += dr;
    if (moved.outer_radius_m > 0.0) moved.outer_radius_m += dr;
    return self_inductance(Winding{&moved, w.centre_m, 1.0}, wire, bundle_width_m, bundle_depth_m);
  };
  const auto up = inductance_at(h), down = inductance_at(-h);
  if (!up || !down) return std::nullopt;
  RadialLoad r;
  r.radial_force_N = 0.5 * current_A * current_A * (*up - *down) / (2.0 * h);
  const double width = c.shape == Shape::pack ? c.width_m : c.shape == Shape::solenoid ? c.length_m : bundle_width_m;
  r.pressure_Pa = width > 0.0 ? r.radial_force_N / (2.0 * pi * r_mean * width) : 0.0;
  r.hoop_tension_N = r.radial_force_N / (2.0 * pi);
  r.hoop_stress_Pa = r.hoop_tension_N / (std::max(1.0, std::round(c.turns)) * wire->conductor_area_m2());
  return r;
}

}  // namespace coilwright
