#include "coilwright/evaluator.hpp"

#include <algorithm>
#include <cmath>
#include <cstring>
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

// The per-evaluation sums below are compiled for AVX-512, AVX2+FMA and the baseline like the
// kernels (see kernels_loop.cpp). Each keeps kLanes independent partial sums, combined in a fixed
// order, so that the compiler may vectorise without -ffast-math and the result does not depend
// on the thread count (only, through FMA contraction, on the instruction set).
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__) && !defined(__AVX512F__) && \
    !defined(COILWRIGHT_NO_MULTIVERSION)
#define COILWRIGHT_CLONES __attribute__((target_clones("arch=x86-64-v4", "arch=x86-64-v3", "default")))
#else
#define COILWRIGHT_CLONES
#endif

constexpr std::size_t kLanes = 8;  // partial sums per entry: one AVX-512 register
// kLanes doubles as one value (GCC vector extension): one register in the AVX-512 clone, split
// into narrower ones by the compiler in the others.
using Lanes = double __attribute__((vector_size(kLanes * sizeof(double))));

// Unaligned load; by reference, as a vector return value would have no fixed ABI across clones.
[[gnu::always_inline]] inline void load(Lanes& v, const double* p) { std::memcpy(&v, p, sizeof v); }
inline double sum_lanes(const Lanes& a) { return ((a[0] + a[4]) + (a[1] + a[5])) + ((a[2] + a[6]) + (a[3] + a[7])); }

// G = CᵀC (k x k, column-major) and c = Cᵀb for k columns C of length n, in one pass over
// memory. K > 0 fixes k at compile time, so that the k(k+3)/2 sums stay in registers as
// independent chains (a single chain would wait on the adder's latency).
template <std::size_t K>
[[gnu::always_inline]] inline void gram_pass(std::size_t k, const double* const* col, const double* b, std::size_t n,
                                             double* G, double* c) {
  constexpr std::size_t kEntries = K > 0 ? K * (K + 3) / 2 : kMaxGramColumns * (kMaxGramColumns + 3) / 2;
  const std::size_t kk = K > 0 ? K : k;
  Lanes acc[kEntries] = {};  // G's lower triangle row by row, then c
  const std::size_t full = n - n % kLanes;
  for (std::size_t i = 0; i < full; i += kLanes) {
    Lanes x[K > 0 ? K : kMaxGramColumns];
    for (std::size_t j = 0; j < kk; ++j) load(x[j], col[j] + i);
    Lanes y;
    load(y, b + i);
    std::size_t e = 0;
    for (std::size_t j = 0; j < kk; ++j)
      for (std::size_t l = 0; l <= j; ++l, ++e) acc[e] += x[j] * x[l];
    for (std::size_t j = 0; j < kk; ++j, ++e) acc[e] += x[j] * y;
  }
  for (std::size_t i = full; i < n; ++i) {  // the last rows, one lane each
    std::size_t e = 0;
    for (std::size_t j = 0; j < kk; ++j)
      for (std::size_t l = 0; l <= j; ++l, ++e) acc[e][i - full] += col[j][i] * col[l][i];
    for (std::size_t j = 0; j < kk; ++j, ++e) acc[e][i - full] += col[j][i] * b[i];
  }
  std::size_t e = 0;
  for (std::size_t j = 0; j < kk; ++j)
    for (std::size_t l = 0; l <= j; ++l, ++e) G[j + l * kk] = G[l + j * kk] = sum_lanes(acc[e]);
  for (std::size_t j = 0; j < kk; ++j, ++e) c[j] = sum_lanes(acc[e]);
}

COILWRIGHT_CLONES
void gram(std::size_t k, const double* const* col, const double* b, std::size_t n, double* G, double* c) {
  switch (k) {
    case 1: gram_pass<1>(k, col, b, n, G, c); break;
    case 2: gram_pass<2>(k, col, b, n, G, c); break;
    case 3: gram_pass<3>(k, col, b, n, G, c); break;
    default: gram_pass<0>(k, col, b, n, G, c); break;
  }
}

// The coils' field f = A I (A: 3n x k, column-major) against the wanted field at n samples:
// max_i |f_i - want_i|^2 into worst2 and, with weights, sum_i w_i |f_i - want_i|^2 into sum.
// For a gradient goal (axis given) the deviation is a·f_i - want_i and want has n rows.
template <std::size_t K, bool Scalar, bool Weighted>
[[gnu::always_inline]] inline void deviation_pass(std::size_t n, std::size_t k, const double* A, const double* I,
                                                  const double* want, const double* axis, const double* weight,
                                                  double* worst2, double* sum) {
  const std::size_t kk = K > 0 ? K : k;
  Lanes m = {}, s = {};
  const std::size_t full = n - n % kLanes;
  for (std::size_t i = 0; i < full; i += kLanes) {
    Lanes fx = {}, fy = {}, fz = {}, ax, ay, az;
    for (std::size_t c = 0; c < kk; ++c) {
      const double* a = A + c * 3 * n + i;
      load(ax, a);
      load(ay, a + n);
      load(az, a + 2 * n);
      fx += ax * I[c];
      fy += ay * I[c];
      fz += az * I[c];
    }
    Lanes d2, wx, wy, wz;
    if constexpr (Scalar) {
      load(wx, want + i);
      const Lanes e = axis[0] * fx + axis[1] * fy + axis[2] * fz - wx;
      d2 = e * e;
    } else {
      load(wx, want + i);
      load(wy, want + n + i);
      load(wz, want + 2 * n + i);
      const Lanes dx = fx - wx, dy = fy - wy, dz = fz - wz;
      d2 = dx * dx + dy * dy + dz * dz;
    }
    m = m < d2 ? d2 : m;
    if constexpr (Weighted) {
      Lanes w;
      load(w, weight + i);
      s += w * d2;
    }
  }
  for (std::size_t i = full; i < n; ++i) {  // the last rows, one lane each
    double fx = 0.0, fy = 0.0, fz = 0.0;
    for (std::size_t c = 0; c < kk; ++c) {
      const double* a = A + c * 3 * n + i;
      fx += a[0] * I[c];
      fy += a[n] * I[c];
      fz += a[2 * n] * I[c];
    }
    double d2;
    if constexpr (Scalar) {
      const double e = axis[0] * fx + axis[1] * fy + axis[2] * fz - want[i];
      d2 = e * e;
    } else {
      const double dx = fx - want[i], dy = fy - want[n + i], dz = fz - want[2 * n + i];
      d2 = dx * dx + dy * dy + dz * dz;
    }
    const std::size_t t = i - full;
    m[t] = m[t] < d2 ? d2 : m[t];
    if constexpr (Weighted) s[t] += weight[i] * d2;
  }
  double worst = 0.0;
  for (std::size_t t = 0; t < kLanes; ++t) worst = worst < m[t] ? m[t] : worst;
  *worst2 = worst;
  *sum = sum_lanes(s);
}

template <std::size_t K>
[[gnu::always_inline]] inline void deviation_case(std::size_t n, std::size_t k, const double* A, const double* I,
                                                  const double* want, const double* axis, const double* weight,
                                                  double* worst2, double* sum) {
  if (axis)
    weight ? deviation_pass<K, true, true>(n, k, A, I, want, axis, weight, worst2, sum)
           : deviation_pass<K, true, false>(n, k, A, I, want, axis, weight, worst2, sum);
  else
    weight ? deviation_pass<K, false, true>(n, k, A, I, want, axis, weight, worst2, sum)
           : deviation_pass<K, false, false>(n, k, A, I, want, axis, weight, worst2, sum);
}

COILWRIGHT_CLONES
void deviations(std::size_t n, std::size_t k, const double* A, const double* I, const double* want, const double* axis,
                const double* weight, double* worst2, double* sum) {
  switch (k) {
    case 1: deviation_case<1>(n, k, A, I, want, axis, weight, worst2, sum); break;
    case 2: deviation_case<2>(n, k, A, I, want, axis, weight, worst2, sum); break;
    case 3: deviation_case<3>(n, k, A, I, want, axis, weight, worst2, sum); break;
    default: deviation_case<0>(n, k, A, I, want, axis, weight, worst2, sum); break;
  }
}

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

GoalSpec GoalSpec::from(const Target& t, const SourceLocation& where) {
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
    throw InputError(where, "target.goal", why);
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
    : goal_(model.target ? GoalSpec::from(*model.target, model.location_of("target.goal"))
                         : throw InputError(SourceLocation{model.source_file}, "target", "the model has no [target] table")),
      samples_(sample_region(*model.target, detect_symmetry(model))),
      boundary_(samples_.boundary),
      volume_(samples_.volume),
      boundary_goal_(sample_goal(samples_.boundary, nullptr)),
      volume_goal_(sample_goal(samples_.volume, &samples_.weights)),
      field_symmetry_(detect_symmetry(model)) {
  // A winding that enters the region would put conductors among the samples.
  const auto bodies = bodies_of(model.coils, Paths::when_needed);
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

Evaluator::SampleGoal Evaluator::sample_goal(const PointSet& pts, const std::vector<double>* weights) const {
  SampleGoal g;
  const auto n = static_cast<Eigen::Index>(pts.size());
  const Vec3& a = goal_.axis;
  if (goal_.goal == Goal::gradient) {  // only B·a is prescribed
    g.want.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
      const Vec3 p = pts[static_cast<std::size_t>(i)];
      const double s = (p - goal_.centre_m).dot(a);
      g.want[i] = goal_.field_T.dot(a) + goal_.gradient_T_per_m * s - goal_.ambient_at(p).dot(a);
    }
  } else {
    g.want.resize(3 * n);
    for (Eigen::Index i = 0; i < n; ++i) {
      const Vec3 p = pts[static_cast<std::size_t>(i)];
      const Vec3 want = (goal_.goal == Goal::uniform ? goal_.field_T : Vec3::Zero()) - goal_.ambient_at(p);
      for (int d = 0; d < 3; ++d) g.want[d * n + i] = want[d];
    }
  }
  g.rhs = g.want;
  if (weights) {
    g.weight = Eigen::Map<const Eigen::VectorXd>(weights->data(), n);
    g.sqrt_weight = g.weight.cwiseSqrt();
    for (Eigen::Index d = 0; d < g.want.size() / std::max<Eigen::Index>(n, 1); ++d)
      g.rhs.segment(d * n, n).array() *= g.sqrt_weight.array();
  }
  g.rhs_norm = g.rhs.norm();
  return g;
}

void Evaluator::solve_currents(Model& model, const ResponseMatrix& A, const SampleGoal& g) {
  Workspace& w = work_;
  w.solved.clear();
  for (std::size_t c = 0; c < model.circuits.size(); ++c)
    if (model.circuits[c].solved) w.solved.push_back(static_cast<Eigen::Index>(c));
  if (w.solved.empty()) return;
  const auto k = static_cast<Eigen::Index>(w.solved.size());
  const bool scalar = goal_.goal == Goal::gradient;
  const bool weighted = g.sqrt_weight.size() > 0;
  const Eigen::Index n = scalar ? g.want.size() : g.want.size() / 3;
  const Vec3& a = goal_.axis;
  // B·a of column c at sample i (gradient goal).
  auto along = [&](Eigen::Index i, Eigen::Index c) { return a.x() * A(i, c) + a.y() * A(n + i, c) + a.z() * A(2 * n + i, c); };
  // Right-hand side: the (weighted) wanted field, less the fixed circuits' field if they carry current.
  const Eigen::VectorXd* rhs = &g.rhs;
  double rhs_norm = g.rhs_norm;
  for (std::size_t c = 0; c < model.circuits.size(); ++c) {
    const double I = model.circuits[c].current_A;
    if (model.circuits[c].solved || I == 0.0) continue;
    if (rhs != &w.rhs) {
      w.rhs = g.rhs;
      rhs = &w.rhs;
    }
    const auto col = static_cast<Eigen::Index>(c);
    for (Eigen::Index i = 0; i < n; ++i) {
      const double sw = weighted ? g.sqrt_weight[i] : 1.0;
      if (scalar) {
        w.rhs[i] -= sw * I * along(i, col);
      } else {
        for (Eigen::Index d = 0; d < 3; ++d) w.rhs[d * n + i] -= sw * I * A(d * n + i, col);
      }
    }
    rhs_norm = w.rhs.norm();
  }
  // The solved columns: A's own when unweighted (no copy), else weighted or projected on a.
  const bool own = !scalar && !weighted;
  if (!own) {
    w.columns.resize(rhs->size(), k);
    for (Eigen::Index j = 0; j < k; ++j) {
      const Eigen::Index c = w.solved[static_cast<std::size_t>(j)];
      if (scalar) {
        for (Eigen::Index i = 0; i < n; ++i) w.columns(i, j) = (weighted ? g.sqrt_weight[i] : 1.0) * along(i, c);
      } else {
        for (Eigen::Index d = 0; d < 3; ++d)
          w.columns.col(j).segment(d * n, n) = A.col(c).segment(d * n, n).cwiseProduct(g.sqrt_weight);
      }
    }
  }
  auto write = [&](const auto& x) {
    for (Eigen::Index j = 0; j < k; ++j) model.circuits[static_cast<std::size_t>(w.solved[static_cast<std::size_t>(j)])].current_A = x[j];
  };
  w.lo.resize(k);
  w.hi.resize(k);
  for (Eigen::Index j = 0; j < k; ++j) {
    const Circuit& c = model.circuits[static_cast<std::size_t>(w.solved[static_cast<std::size_t>(j)])];
    w.lo[j] = c.min_current_A;
    w.hi[j] = c.max_current_A;
  }
  // Normal equations of the few solved circuits (see currents.hpp for when they are accurate).
  if (k <= kMaxGramColumns) {
    const double* cols[kMaxGramColumns];
    for (Eigen::Index j = 0; j < k; ++j) cols[j] = own ? A.col(w.solved[static_cast<std::size_t>(j)]).data() : w.columns.col(j).data();
    GramMatrix G(k, k);
    GramVector c(k), x(k);
    gram(static_cast<std::size_t>(k), cols, rhs->data(), static_cast<std::size_t>(rhs->size()), G.data(), c.data());
    if (solve_bounded_normal_equations(G, c, rhs_norm, w.lo, w.hi, x)) {
      write(x);
      return;
    }
  }
  // Ill-conditioned (or many circuits): QR of the columns themselves.
  if (own) {
    w.columns.resize(rhs->size(), k);
    for (Eigen::Index j = 0; j < k; ++j) w.columns.col(j) = A.col(w.solved[static_cast<std::size_t>(j)]);
  }
  write(solve_bounded_least_squares(w.columns, *rhs, w.lo, w.hi).x);
}

double Evaluator::deviation_sum(const Model& model, const ResponseMatrix& A, const SampleGoal& g, bool weighted) {
  Workspace& w = work_;
  w.currents.resize(static_cast<Eigen::Index>(model.circuits.size()));
  for (std::size_t c = 0; c < model.circuits.size(); ++c) w.currents[static_cast<Eigen::Index>(c)] = model.circuits[c].current_A;
  const bool scalar = goal_.goal == Goal::gradient;
  const auto n = static_cast<std::size_t>(scalar ? g.want.size() : g.want.size() / 3);
  double worst2 = 0.0, sum = 0.0;
  deviations(n, static_cast<std::size_t>(A.cols()), A.data(), w.currents.data(), g.want.data(),
             scalar ? goal_.axis.data() : nullptr, weighted ? g.weight.data() : nullptr, &worst2, &sum);
  // The maximum is taken over squares: the square root is monotonic.
  return weighted ? sum : std::sqrt(worst2);
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
      solve_currents(model, A, boundary_goal_);
      value = deviation_sum(model, A, boundary_goal_, false) / goal_.reference_T;
      break;
    }
    case Objective::rms: {
      const ResponseMatrix& A = volume_.update(model);
      solve_currents(model, A, volume_goal_);
      value = std::sqrt(deviation_sum(model, A, volume_goal_, true)) / goal_.reference_T;
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
  const auto bodies = bodies_of(model.coils, Paths::when_needed);  // coaxial rings need no path
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
  const Symmetry sym = field_symmetry_;
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
