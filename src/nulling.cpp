#include "coilwright/nulling.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "coilwright/ambient_fit.hpp"
#include "coilwright/currents.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/sampling.hpp"

namespace coilwright {

NullingResult null_field(const Model& model, const PointSet& points, const std::vector<double>& weights,
                         const FieldSet& ambient_T) {
  const std::size_t n = points.size();
  if (weights.size() != n || ambient_T.size() != n)
    throw std::invalid_argument("null_field: points, weights and ambient differ in size");
  std::vector<std::size_t> solved;
  for (std::size_t c = 0; c < model.circuits.size(); ++c)
    if (model.circuits[c].solved) solved.push_back(c);
  if (solved.empty())
    throw InputError(SourceLocation{model.source_file, 0, 0}, "",
                     "no circuit has a solved current (solved = true with min/max), so there is nothing to null with");
  check_clear_of_windings(model.coils, points);

  NullingResult r;
  r.points = points;
  r.weights = weights;
  r.ambient_T = ambient_T;
  // Field still to cancel: the ambient plus the circuits held at fixed currents.
  FieldSet base = ambient_T;
  std::vector<FieldSet> per_ampere(model.circuits.size());
  for (std::size_t c = 0; c < model.circuits.size(); ++c) {
    per_ampere[c] = field_per_ampere(model, c, points);
    if (model.circuits[c].solved) continue;
    for (std::size_t i = 0; i < n; ++i) {
      base.bx[i] += model.circuits[c].current_A * per_ampere[c].bx[i];
      base.by[i] += model.circuits[c].current_A * per_ampere[c].by[i];
      base.bz[i] += model.circuits[c].current_A * per_ampere[c].bz[i];
    }
  }
  // Rows scaled by sqrt(weight): the volume RMS is the objective, boundary rows drop out.
  const auto rows = static_cast<Eigen::Index>(3 * n);
  const auto k = static_cast<Eigen::Index>(solved.size());
  Eigen::MatrixXd a(rows, k);
  Eigen::VectorXd b(rows);
  for (std::size_t i = 0; i < n; ++i) {
    const double s = std::sqrt(std::max(0.0, weights[i]));
    const auto row = static_cast<Eigen::Index>(3 * i);
    for (Eigen::Index j = 0; j < k; ++j) {
      const FieldSet& f = per_ampere[solved[static_cast<std::size_t>(j)]];
      a(row, j) = s * f.bx[i];
      a(row + 1, j) = s * f.by[i];
      a(row + 2, j) = s * f.bz[i];
    }
    b(row) = -s * base.bx[i];
    b(row + 1) = -s * base.by[i];
    b(row + 2) = -s * base.bz[i];
  }
  Eigen::VectorXd lo(k), hi(k);
  for (Eigen::Index j = 0; j < k; ++j) {
    const Circuit& c = model.circuits[solved[static_cast<std::size_t>(j)]];
    lo(j) = c.min_current_A;
    hi(j) = c.max_current_A;
  }
  const BoundedLeastSquares sol = solve_bounded_least_squares(a, b, lo, hi);

  r.currents_A.resize(model.circuits.size());
  r.at_limit.assign(model.circuits.size(), false);
  for (std::size_t c = 0; c < model.circuits.size(); ++c) r.currents_A[c] = model.circuits[c].current_A;
  for (Eigen::Index j = 0; j < k; ++j) {
    const std::size_t c = solved[static_cast<std::size_t>(j)];
    r.currents_A[c] = sol.x(j);
    const double span = std::max(1e-300, hi(j) - lo(j));
    r.at_limit[c] = (sol.x(j) - lo(j)) <= 1e-12 * span || (hi(j) - sol.x(j)) <= 1e-12 * span;
  }

  r.residual_T = base;
  for (std::size_t j = 0; j < solved.size(); ++j) {
    const double cur = r.currents_A[solved[j]];
    const FieldSet& f = per_ampere[solved[j]];
    for (std::size_t i = 0; i < n; ++i) {
      r.residual_T.bx[i] += cur * f.bx[i];
      r.residual_T.by[i] += cur * f.by[i];
      r.residual_T.bz[i] += cur * f.bz[i];
    }
  }
  double rms2 = 0.0, amb2 = 0.0, wsum = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double e = r.residual_T[i].norm();
    const double am = ambient_T[i].norm();
    rms2 += weights[i] * e * e;
    amb2 += weights[i] * am * am;
    wsum += weights[i];
    if (e > r.residual_worst_T) {
      r.residual_worst_T = e;
      r.worst_point = i;
    }
    r.ambient_worst_T = std::max(r.ambient_worst_T, am);
  }
  if (wsum > 0.0) {
    r.residual_rms_T = std::sqrt(rms2 / wsum);
    r.ambient_rms_T = std::sqrt(amb2 / wsum);
  }
  if (model.target) {
    const Tolerance& tol = model.target->tolerance;
    r.tolerance_T = tol.relative ? tol.value * r.ambient_worst_T : tol.value;
    r.within_tolerance = r.residual_worst_T <= r.tolerance_T;
  }
  return r;
}

NullingResult null_ambient(const Model& model, const AmbientFit& ambient) {
  if (!model.target)
    throw InputError(SourceLocation{model.source_file, 0, 0}, "target",
                     "the model has no [target] region to null the field over");
  // The ambient field has no symmetry of its own: sample the whole region.
  const SampleSet s = sample_region(*model.target, Symmetry{});
  PointSet pts = s.volume;
  std::vector<double> w = s.weights;
  for (std::size_t i = 0; i < s.boundary.size(); ++i) {
    pts.push_back(s.boundary[i]);
    w.push_back(0.0);
  }
  return null_field(model, pts, w, ambient.field_at(pts));
}

Model with_currents(Model model, const std::vector<double>& currents_A) {
  if (currents_A.size() != model.circuits.size())
    throw std::invalid_argument("with_currents: one current per circuit is needed");
  for (std::size_t c = 0; c < currents_A.size(); ++c) model.circuits[c].current_A = currents_A[c];
  return model;
}

std::vector<Headroom> headroom(const Model& model, const Vec3& point_m) {
  PointSet p;
  p.push_back(point_m);
  std::vector<Headroom> out;
  for (std::size_t c = 0; c < model.circuits.size(); ++c) {
    const Circuit& circ = model.circuits[c];
    if (!circ.solved) continue;
    Headroom h;
    h.circuit = circ.name;
    h.current_A = circ.current_A;
    h.min_current_A = circ.min_current_A;
    h.max_current_A = circ.max_current_A;
    h.field_per_ampere_T_per_A = field_per_ampere(model, c, p)[0];
    const double k = h.field_per_ampere_T_per_A.norm();
    h.up_T = std::max(0.0, circ.max_current_A - circ.current_A) * k;
    h.down_T = std::max(0.0, circ.current_A - circ.min_current_A) * k;
    out.push_back(h);
  }
  return out;
}

}  // namespace coilwright
