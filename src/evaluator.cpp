#include "coilwright/evaluator.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "coilwright/clearance.hpp"
#include "coilwright/currents.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/supply.hpp"
#include "coilwright/winding.hpp"
#include "coilwright/zonal.hpp"

namespace coilwright {

namespace {

constexpr int kBisectionSteps = 20;  // good-field radius to 1e-6 of the nearest-conductor distance
constexpr double kStructuralZero = 1e-10;  // on-axis terms smaller than this (normalised) vanish by symmetry

bool on_target_axis(const Model& model, const Vec3& centre, const Vec3& a) {
  for (const Coil& c : model.coils) {
    if (c.axis.cross(a).norm() > 1e-12) return false;
    const Vec3 d = c.centre_m - centre;
    if ((d - d.dot(a) * a).norm() > 1e-12 * std::max(1.0, d.norm())) return false;
  }
  return true;
}

// The ambient's on-axis terms b_0 and b_1 (it is linear, so higher terms vanish).
double ambient_term(const GoalSpec& g, int n) {
  if (!g.ambient) return 0.0;
  if (n == 0) return g.ambient->uniform_T.dot(g.axis);
  if (n == 1) return g.axis.dot(g.ambient->gradient_T_per_m * g.axis);
  return 0.0;
}

// The goal's on-axis terms: b_0 = B_goal·a (uniform), b_1 = G (gradient), zero otherwise.
double goal_term(const GoalSpec& g, int n) {
  if (g.goal == Goal::uniform && n == 0) return g.field_T.dot(g.axis);
  if (g.goal == Goal::gradient && n == 0) return g.field_T.dot(g.axis);
  if (g.goal == Goal::gradient && n == 1) return g.gradient_T_per_m;
  return 0.0;
}

int reference_term(const GoalSpec& g) { return g.goal == Goal::gradient ? 1 : 0; }

double max_deviation_on(const Model& model, const GoalSpec& goal, const PointSet& pts) {
  const FieldSet b = field_of_model(model, pts);
  double worst = 0.0;
  for (std::size_t i = 0; i < pts.size(); ++i) {
    const Vec3 p = pts[i];
    worst = std::max(worst, goal.deviation_T(p, b[i] + goal.ambient_at(p)));
  }
  return worst;
}

// Largest s in (0, s_max] with worst(s) <= tolerance; worst(s) is non-decreasing (maximum principle).
template <class Worst>
double largest_within(double s_max, double tolerance, Worst&& worst) {
  if (!(s_max > 0.0)) return 0.0;
  if (worst(s_max) <= tolerance) return s_max;
  if (worst(1e-9 * s_max) > tolerance) return 0.0;
  double lo = 1e-9 * s_max, hi = s_max;
  for (int i = 0; i < kBisectionSteps; ++i) {
    const double mid = 0.5 * (lo + hi);
    (worst(mid) <= tolerance ? lo : hi) = mid;
  }
  return lo;
}

}  // namespace

double half_extent_along_axis(const Target& t) {
  switch (t.region) {
    case RegionKind::sphere: return t.radius_m;
    case RegionKind::cylinder: return 0.5 * t.length_m;
    case RegionKind::box: return 0.5 * t.size_m.z();
    case RegionKind::plane: return 0.5 * std::max(t.size_m.x(), t.size_m.y());
    case RegionKind::points: {
      double m = 0.0;
      for (std::size_t i = 0; i < t.points.size(); ++i) m = std::max(m, std::abs((t.points[i] - t.centre_m).dot(t.axis)));
      return m;
    }
  }
  return 0.0;
}

GoalSpec GoalSpec::from(const Target& t) {
  GoalSpec g;
  g.goal = t.goal;
  g.centre_m = t.centre_m;
  g.axis = t.axis.normalized();
  g.field_T = t.field_T;
  g.gradient_T_per_m = t.gradient_T_per_m;
  g.ambient = t.ambient;
  switch (t.goal) {
    case Goal::uniform:
      g.reference_T = t.field_T.norm();
      break;
    case Goal::gradient:
      g.reference_T = std::abs(t.gradient_T_per_m) * half_extent_along_axis(t);
      break;
    case Goal::null:
      g.reference_T = t.ambient ? t.ambient->uniform_T.norm() : 0.0;
      break;
  }
  if (!(g.reference_T > 0.0)) {
    const char* why = t.goal == Goal::uniform    ? "a uniform goal needs a non-zero 'field'"
                      : t.goal == Goal::gradient ? "a gradient goal needs a non-zero 'gradient' and a region with extent along the axis"
                                                 : "a null goal needs a non-zero ambient field ([target.ambient] or a survey)";
    throw InputError(SourceLocation{}, "target.goal", why);
  }
  g.tolerance_T = t.tolerance.relative ? t.tolerance.value * g.reference_T : t.tolerance.value;
  return g;
}

double GoalSpec::deviation_T(const Vec3& p, const Vec3& b) const {
  switch (goal) {
    case Goal::uniform: return (b - field_T).norm();
    case Goal::null: return b.norm();
    case Goal::gradient: {
      const double s = (p - centre_m).dot(axis);
      return std::abs(b.dot(axis) - field_T.dot(axis) - gradient_T_per_m * s);
    }
  }
  return 0.0;
}

Eigen::VectorXd currents_of(const Model& model) {
  Eigen::VectorXd I(static_cast<Eigen::Index>(model.circuits.size()));
  for (std::size_t c = 0; c < model.circuits.size(); ++c) I[static_cast<Eigen::Index>(c)] = model.circuits[c].current_A;
  return I;
}

double ampere_turns(const Model& model) {
  double total = 0.0;
  for (const Coil& c : model.coils)
    total += (c.is_pair() ? 2.0 : 1.0) * c.turns * std::abs(model.circuits[model.circuit_index(c.circuit)].current_A);
  return total;
}

std::vector<Vec3> total_field(const Model& model, const ResponseMatrix& A, const PointSet& pts, const GoalSpec& goal) {
  const Eigen::VectorXd b = A * currents_of(model);
  const std::size_t n = pts.size();
  std::vector<Vec3> out(n);
  for (std::size_t i = 0; i < n; ++i) out[i] = Vec3(b[i], b[n + i], b[2 * n + i]) + goal.ambient_at(pts[i]);
  return out;
}

Evaluator::Evaluator(const Model& model)
    : goal_(model.target ? GoalSpec::from(*model.target)
                         : throw InputError(SourceLocation{model.source_file}, "target", "the model has no [target] table")),
      samples_(sample_region(*model.target, detect_symmetry(model))),
      boundary_(samples_.boundary),
      volume_(samples_.volume) {
  // A winding that enters the region would put conductors among the samples.
  const auto bodies = bodies_of(model.coils);
  for (const PointSet* pts : {&samples_.boundary, &samples_.volume})
    for (std::size_t i = 0; i < pts->size(); ++i)
      for (std::size_t b = 0; b < bodies.size(); ++b)
        if (distance_to(bodies[b], (*pts)[i]) <= 0.0) {
          std::size_t coil = 0;
          for (std::size_t c = 0, k = 0; c < model.coils.size(); ++c) {
            k += model.coils[c].is_pair() ? 2 : 1;
            if (b < k) { coil = c; break; }
          }
          const Vec3 p = (*pts)[i];
          throw InputError(model.location_of("coil." + model.coils[coil].name), "target",
                           fmt::format("the target region reaches into the winding of coil '{}' (at {:.6g}, {:.6g}, {:.6g} m); "
                                       "the region must lie clear of every winding",
                                       model.coils[coil].name, p.x(), p.y(), p.z()));
        }
}

std::size_t Evaluator::coil_evaluations() const noexcept {
  return boundary_.coil_evaluations() + volume_.coil_evaluations();
}

void Evaluator::solve_currents(Model& model, const ResponseMatrix& A, const PointSet& pts,
                               const std::vector<double>* weights) {
  std::vector<Eigen::Index> solved;
  for (std::size_t c = 0; c < model.circuits.size(); ++c)
    if (model.circuits[c].solved) solved.push_back(static_cast<Eigen::Index>(c));
  if (solved.empty()) return;
  const auto n = static_cast<Eigen::Index>(pts.size());
  const bool scalar = goal_.goal == Goal::gradient;  // only B·a is prescribed
  const Eigen::Index rows = scalar ? n : 3 * n;
  Eigen::MatrixXd M(rows, static_cast<Eigen::Index>(solved.size()));
  Eigen::VectorXd rhs(rows);
  // The fixed circuits' field is part of the right-hand side.
  Eigen::VectorXd fixed_I = currents_of(model);
  for (Eigen::Index c : solved) fixed_I[c] = 0.0;
  const Eigen::VectorXd b_fixed = A * fixed_I;
  const Vec3& a = goal_.axis;
  for (Eigen::Index i = 0; i < n; ++i) {
    const Vec3 p = pts[static_cast<std::size_t>(i)];
    const double w = weights ? std::sqrt((*weights)[static_cast<std::size_t>(i)]) : 1.0;
    const Vec3 known = goal_.ambient_at(p) + Vec3(b_fixed[i], b_fixed[n + i], b_fixed[2 * n + i]);
    if (scalar) {
      const double s = (p - goal_.centre_m).dot(a);
      rhs[i] = w * (goal_.field_T.dot(a) + goal_.gradient_T_per_m * s - known.dot(a));
      for (std::size_t k = 0; k < solved.size(); ++k) {
        const Eigen::Index c = solved[k];
        M(i, static_cast<Eigen::Index>(k)) = w * (a.x() * A(i, c) + a.y() * A(n + i, c) + a.z() * A(2 * n + i, c));
      }
    } else {
      const Vec3 want = (goal_.goal == Goal::uniform ? goal_.field_T : Vec3::Zero()) - known;
      for (int d = 0; d < 3; ++d) {
        rhs[d * n + i] = w * want[d];
        for (std::size_t k = 0; k < solved.size(); ++k)
          M(d * n + i, static_cast<Eigen::Index>(k)) = w * A(d * n + i, solved[k]);
      }
    }
  }
  Eigen::VectorXd lo(static_cast<Eigen::Index>(solved.size())), hi(lo.size());
  for (std::size_t k = 0; k < solved.size(); ++k) {
    lo[static_cast<Eigen::Index>(k)] = model.circuits[solved[k]].min_current_A;
    hi[static_cast<Eigen::Index>(k)] = model.circuits[solved[k]].max_current_A;
  }
  const auto sol = solve_bounded_least_squares(M, rhs, lo, hi);
  for (std::size_t k = 0; k < solved.size(); ++k) model.circuits[solved[k]].current_A = sol.x[static_cast<Eigen::Index>(k)];
}

void Evaluator::choose_nulled_terms(const Model& model) {
  nulled_terms_chosen_ = true;
  nulled_terms_.clear();
  int searched = 0, solved = 0;
  for (const FreeParameter& f : model.free_parameters)
    if (!f.same_as) ++searched;
  for (const Circuit& c : model.circuits)
    if (c.solved) ++solved;
  const int wanted = searched + std::max(0, solved - 1);  // one current sets the scale
  // A term vanishes by symmetry when it is negligible at the start geometry and at a second one.
  Model other = model;
  for (const FreeParameter& f : model.free_parameters)
    if (!f.same_as) set(other.coils[f.coil], f.key, f.min + 0.377 * (f.max - f.min));
  for (const FreeParameter& f : model.free_parameters)
    if (f.same_as) set(other.coils[f.coil], f.key, get(other.coils[model.free_parameters[*f.same_as].coil], f.key));
  const AxialResponse r1 = axial_response(model, goal_.centre_m, goal_.axis, kZonalDegree);
  const AxialResponse r2 = axial_response(other, goal_.centre_m, goal_.axis, kZonalDegree);
  const int ref = reference_term(goal_);
  auto size_of = [&](const AxialResponse& r, int n) {
    return r.per_ampere.row(n).cwiseAbs().maxCoeff() * std::pow(2.0, n);  // b_n d^n, d = 2h
  };
  for (int n = 0; n <= kZonalDegree && static_cast<int>(nulled_terms_.size()) < wanted; ++n) {
    if (n == ref) continue;
    const bool zero1 = size_of(r1, n) <= kStructuralZero * size_of(r1, ref);
    const bool zero2 = size_of(r2, n) <= kStructuralZero * size_of(r2, ref);
    if (!(zero1 && zero2)) nulled_terms_.push_back(n);
  }
}

double Evaluator::order_objective(Model& model) {
  if (!nulled_terms_chosen_) choose_nulled_terms(model);
  const AxialResponse r = axial_response(model, goal_.centre_m, goal_.axis, kZonalDegree);
  const int ref = reference_term(goal_);
  const double d = 2.0 * r.scale_m;
  // Rows in tesla: b_n d^n for the reference term and each nulled term.
  std::vector<int> rows{ref};
  rows.insert(rows.end(), nulled_terms_.begin(), nulled_terms_.end());
  std::vector<Eigen::Index> solved;
  for (std::size_t c = 0; c < model.circuits.size(); ++c)
    if (model.circuits[c].solved) solved.push_back(static_cast<Eigen::Index>(c));
  Eigen::VectorXd fixed_I = currents_of(model);
  for (Eigen::Index c : solved) fixed_I[c] = 0.0;
  const auto m = static_cast<Eigen::Index>(rows.size());
  Eigen::MatrixXd M(m, static_cast<Eigen::Index>(solved.size()));
  Eigen::VectorXd rhs(m);
  for (Eigen::Index i = 0; i < m; ++i) {
    const int n = rows[static_cast<std::size_t>(i)];
    const double scale = std::pow(2.0, n);  // per_ampere holds b_n h^n; b_n d^n = 2^n of it
    const double known = r.per_ampere.row(n).dot(fixed_I) * scale + ambient_term(goal_, n) * std::pow(d, n);
    rhs[i] = goal_term(goal_, n) * std::pow(d, n) - known;
    for (std::size_t k = 0; k < solved.size(); ++k) M(i, static_cast<Eigen::Index>(k)) = r.per_ampere(n, solved[k]) * scale;
  }
  if (!solved.empty()) {
    Eigen::VectorXd lo(static_cast<Eigen::Index>(solved.size())), hi(lo.size());
    for (std::size_t k = 0; k < solved.size(); ++k) {
      lo[static_cast<Eigen::Index>(k)] = model.circuits[solved[k]].min_current_A;
      hi[static_cast<Eigen::Index>(k)] = model.circuits[solved[k]].max_current_A;
    }
    const auto sol = solve_bounded_least_squares(M, rhs, lo, hi);
    for (std::size_t k = 0; k < solved.size(); ++k) model.circuits[solved[k]].current_A = sol.x[static_cast<Eigen::Index>(k)];
  }
  // Residual of each row relative to the wanted reference term.
  const Eigen::VectorXd I = currents_of(model);
  const double want = std::abs(goal_term(goal_, ref)) * std::pow(d, ref);
  const double b_ref = want > 0 ? want : std::abs(ambient_term(goal_, ref)) * std::pow(d, ref);
  double sum = 0.0;
  for (Eigen::Index i = 0; i < m; ++i) {
    const int n = rows[static_cast<std::size_t>(i)];
    if (i == 0 && !solved.empty()) continue;  // the scale is met by the currents
    const double value = r.per_ampere.row(n).dot(I) * std::pow(2.0, n) + ambient_term(goal_, n) * std::pow(d, n) -
                         goal_term(goal_, n) * std::pow(d, n);
    sum += (value / b_ref) * (value / b_ref);
  }
  return sum;
}

double Evaluator::objective(Model& model, Objective objective, ConstraintReport* report) {
  double value = 0.0;
  switch (objective) {
    case Objective::worst: {
      const ResponseMatrix& A = boundary_.update(model);
      solve_currents(model, A, samples_.boundary, nullptr);
      const auto B = total_field(model, A, samples_.boundary, goal_);
      for (std::size_t i = 0; i < B.size(); ++i) value = std::max(value, goal_.deviation_T(samples_.boundary[i], B[i]));
      value /= goal_.reference_T;
      break;
    }
    case Objective::rms: {
      const ResponseMatrix& A = volume_.update(model);
      solve_currents(model, A, samples_.volume, &samples_.weights);
      const auto B = total_field(model, A, samples_.volume, goal_);
      for (std::size_t i = 0; i < B.size(); ++i) {
        const double dev = goal_.deviation_T(samples_.volume[i], B[i]);
        value += samples_.weights[i] * dev * dev;
      }
      value = std::sqrt(value) / goal_.reference_T;
      break;
    }
    case Objective::order: value = order_objective(model); break;
  }
  ConstraintReport c = constraints(model);
  const double penalised = c.feasible() ? value : 1.0 + value + 100.0 * c.violation;
  if (report) *report = std::move(c);
  return penalised;
}

ConstraintReport Evaluator::constraints(const Model& model) const {
  ConstraintReport r;
  const SearchOptions& s = model.search;
  const auto bodies = bodies_of(model.coils);
  const double min_gap = s.min_gap_m.value_or(0.0);
  for (std::size_t i = 0; i < bodies.size(); ++i)
    for (std::size_t j = i + 1; j < bodies.size(); ++j) {
      const double g = gap_m(bodies[i], bodies[j]);
      if (g < min_gap || g <= 0.0) {
        r.violation += std::max(min_gap - g, 1e-6);
        r.broken.push_back(fmt::format("windings {} and {} are {:.4g} mm apart (need at least {:.4g} mm and no overlap)", i + 1,
                                       j + 1, g * 1e3, min_gap * 1e3));
      }
    }
  const Extents e = extents(bodies, goal_.centre_m, goal_.axis);
  if (s.max_outer_radius_m && e.max_radial_m > *s.max_outer_radius_m) {
    r.violation += e.max_radial_m - *s.max_outer_radius_m;
    r.broken.push_back(fmt::format("outer radius {:.4g} mm exceeds max_outer_radius {:.4g} mm", e.max_radial_m * 1e3,
                                   *s.max_outer_radius_m * 1e3));
  }
  if (s.max_half_length_m && e.max_axial_m > *s.max_half_length_m) {
    r.violation += e.max_axial_m - *s.max_half_length_m;
    r.broken.push_back(fmt::format("half length {:.4g} mm exceeds max_half_length {:.4g} mm", e.max_axial_m * 1e3,
                                   *s.max_half_length_m * 1e3));
  }
  if (s.min_bore_radius_m && e.min_radial_m < *s.min_bore_radius_m) {
    r.violation += *s.min_bore_radius_m - e.min_radial_m;
    r.broken.push_back(fmt::format("clear bore {:.4g} mm is below min_bore_radius {:.4g} mm", e.min_radial_m * 1e3,
                                   *s.min_bore_radius_m * 1e3));
  }
  if (s.max_ampere_turns) {
    const double at = ampere_turns(model);
    if (at > *s.max_ampere_turns) {
      r.violation += (at - *s.max_ampere_turns) / *s.max_ampere_turns;
      r.broken.push_back(fmt::format("{:.6g} ampere-turns exceed max_ampere_turns {:.6g}", at, *s.max_ampere_turns));
    }
  }
  // A declared wire must fit the winding's space with the turns asked of it.
  for (const Coil& c : model.coils) {
    if (!c.wire) continue;
    try {
      (void)wind(c, *c.wire, model.hardware.packing);
    } catch (const InputError& misfit) {
      r.violation += 1e-3;  // a fixed step: the search moves away; by how much is not graded
      r.broken.push_back(misfit.what());
    }
  }
  const bool supplied = std::any_of(model.circuits.begin(), model.circuits.end(), [](const Circuit& c) { return c.supply.has_value(); });
  if (supplied) {
    const Eigen::VectorXd I = currents_of(model);
    const SupplyCheck check = check_supplies(model, std::span<const double>(I.data(), static_cast<std::size_t>(I.size())), model.hardware);
    if (check.worst_excess > 0.0) {
      r.violation += check.worst_excess;
      for (const SupplyViolation& v : check.violations) r.broken.push_back(v.message);
    }
  }
  if (!s.stray.empty()) {
    PointSet pts;
    for (const StrayLimit& l : s.stray) pts.push_back(l.point_m);
    const FieldSet b = field_of_model(model, pts);
    for (std::size_t i = 0; i < s.stray.size(); ++i) {
      const double mag = b[i].norm();
      if (mag > s.stray[i].max_field_T) {
        r.violation += (mag - s.stray[i].max_field_T) / s.stray[i].max_field_T;
        const Vec3 p = s.stray[i].point_m;
        r.broken.push_back(fmt::format("stray field {:.4g} uT at ({:.4g}, {:.4g}, {:.4g}) m exceeds {:.4g} uT", mag * 1e6, p.x(),
                                       p.y(), p.z(), s.stray[i].max_field_T * 1e6));
      }
    }
  }
  return r;
}

Metrics Evaluator::metrics(const Model& model) {
  Metrics m;
  m.reference_T = goal_.reference_T;
  m.tolerance_T = goal_.tolerance_T;
  const bool uniform = goal_.goal == Goal::uniform;
  const Vec3 ghat = uniform ? goal_.field_T.normalized() : goal_.axis;
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  double max_angle = 0.0;
  auto visit = [&](const PointSet& pts, const std::vector<Vec3>& B, const std::vector<double>* w) {
    double rms = 0.0, within = 0.0;
    for (std::size_t i = 0; i < pts.size(); ++i) {
      const Vec3 p = pts[i];
      const double dev = goal_.deviation_T(p, B[i]);
      m.worst_absolute_deviation_T = std::max(m.worst_absolute_deviation_T, dev);
      double along = goal_.goal == Goal::null ? B[i].norm() : B[i].dot(ghat);
      if (goal_.goal == Goal::gradient) along -= goal_.gradient_T_per_m * (p - goal_.centre_m).dot(goal_.axis);
      lo = std::min(lo, along);
      hi = std::max(hi, along);
      if (uniform && B[i].norm() > 0) max_angle = std::max(max_angle, std::acos(std::clamp(B[i].dot(ghat) / B[i].norm(), -1.0, 1.0)));
      if (w) {
        rms += (*w)[i] * dev * dev;
        if (dev <= goal_.tolerance_T) within += (*w)[i];
      }
    }
    if (w) {
      m.rms_relative_deviation = std::sqrt(rms) / goal_.reference_T;
      m.fraction_within_tolerance = within;
    }
  };
  visit(samples_.boundary, total_field(model, boundary_.update(model), samples_.boundary, goal_), nullptr);
  visit(samples_.volume, total_field(model, volume_.update(model), samples_.volume, goal_), &samples_.weights);
  m.worst_relative_deviation = m.worst_absolute_deviation_T / goal_.reference_T;
  m.peak_to_peak_T = hi - lo;
  m.peak_to_peak_relative = m.peak_to_peak_T / goal_.reference_T;
  if (uniform) m.direction_error_rad = max_angle;

  PointSet centre;
  centre.push_back(goal_.centre_m);
  m.centre_field_T = field_of_model(model, centre)[0] + goal_.ambient_at(goal_.centre_m);
  m.ampere_turns = ampere_turns(model);

  // On-axis expansion and the design's order.
  const AxialResponse r = axial_response(model, goal_.centre_m, goal_.axis, kZonalDegree);
  m.zonal_scale_m = 2.0 * r.scale_m;
  const Eigen::VectorXd I = currents_of(model);
  std::vector<double> b(kZonalDegree + 1);
  for (int n = 0; n <= kZonalDegree; ++n)
    b[n] = r.per_ampere.row(n).dot(I) * std::pow(2.0, n) + ambient_term(goal_, n) * std::pow(m.zonal_scale_m, n);
  const int ref = reference_term(goal_);
  const double central_gradient = b[1] / m.zonal_scale_m;
  const double b_ref = b[ref] != 0.0 ? std::abs(b[ref]) : 1.0;
  for (int n = 0; n <= kZonalDegree; ++n) {
    const double wanted = goal_term(goal_, n) * std::pow(m.zonal_scale_m, n);
    m.zonal.push_back(n == ref ? b[n] / b_ref : (b[n] - wanted) / b_ref);
  }
  if (on_target_axis(model, goal_.centre_m, goal_.axis))
    for (int n = 0; n <= kZonalDegree; ++n)
      if (n != ref && std::abs(m.zonal[n]) > kVanishingTerm) {
        m.order = n;
        break;
      }
  // Good-field sphere and cylinder: the homogeneity of the design's own field about its centre
  // value (and its own central gradient), as a builder measures it — the currents can always be
  // trimmed to the wanted value at the centre. Bisection on the size is valid because the worst
  // deviation over a region about the centre grows with the region (maximum principle).
  GoalSpec own = goal_;
  if (own.goal == Goal::uniform) own.field_T = m.centre_field_T;
  if (own.goal == Goal::gradient) {
    own.field_T = m.centre_field_T;
    own.gradient_T_per_m = central_gradient;
  }
  const Target& t = *model.target;
  const int res = t.resolution > 0 ? t.resolution : kDefaultResolution;
  const Frame frame = Frame::from_axis(goal_.axis, t.reference);
  const double d = nearest_conductor_m(model, goal_.centre_m);
  const Symmetry sym = samples_.symmetry;
  m.good_field_radius_m = largest_within(0.999 * d, goal_.tolerance_T, [&](double radius) {
    return max_deviation_on(model, own, sphere_surface(goal_.centre_m, frame, radius, res, sym));
  });
  const double aspect = t.region == RegionKind::cylinder ? t.length_m / (2.0 * t.radius_m) : 1.0;
  const double s_cyl = largest_within(0.999 * d / std::sqrt(1.0 + aspect * aspect), goal_.tolerance_T, [&](double s) {
    return max_deviation_on(model, own, cylinder_surface(goal_.centre_m, frame, s, 2.0 * aspect * s, res, sym));
  });
  m.good_field_cylinder_radius_m = s_cyl;
  m.good_field_cylinder_length_m = 2.0 * aspect * s_cyl;

  return m;
}

}  // namespace coilwright
