#include "coilwright/tolerance.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <stdexcept>

#include <Eigen/Geometry>
#include <fmt/format.h>

#include "coilwright/currents.hpp"
#include "coilwright/error.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/field.hpp"
#include "coilwright/parallel.hpp"
#include "coilwright/zonal.hpp"

namespace coilwright {

namespace detail {
namespace {

// The good-field radius is found to 1e-12 of the search interval, so that it is smooth enough
// in the geometry for a central difference (see sensitivities).
constexpr double kGoodFieldRelativeTolerance = 1e-12;
constexpr int kGoodFieldMaxSteps = 100;

// Largest r in [0, r_max] with worst(r) <= tolerance, for worst(r) non-decreasing with worst(0) = 0
// (maximum principle). Regula falsi with the Illinois modification (M. Dowell and P. Jarratt,
// BIT 11, 1971): superlinear, so about ten field maps instead of forty halvings; the bracket
// always holds the answer.
template <class Worst>
double largest_within(double r_max, double tolerance, Worst&& worst) {
  if (!(r_max > 0.0)) return 0.0;
  double hi = r_max, g_hi = worst(hi) - tolerance;
  if (g_hi <= 0.0) return r_max;
  double lo = 0.0, g_lo = -tolerance;
  int side = 0;
  for (int i = 0; i < kGoodFieldMaxSteps && hi - lo > kGoodFieldRelativeTolerance * r_max; ++i) {
    double r = (lo * g_hi - hi * g_lo) / (g_hi - g_lo);
    if (!(r > lo && r < hi)) r = 0.5 * (lo + hi);
    const double g = worst(r) - tolerance;
    if (g <= 0.0) {
      lo = r, g_lo = g;
      if (side == -1) g_hi *= 0.5;
      side = -1;
    } else {
      hi = r, g_hi = g;
      if (side == 1) g_lo *= 0.5;
      side = 1;
    }
  }
  return lo;
}

// The field a builder compares with: the build's own centre value (a uniform or gradient goal
// can always be met at the centre by trimming the current); a null goal stays absolute.
GoalSpec own_goal(const GoalSpec& goal, const Vec3& centre_field) {
  GoalSpec own = goal;
  if (own.goal != Goal::null) own.field_T = centre_field;
  return own;
}

double max_deviation(const GoalSpec& g, const PointSet& pts, const std::vector<Vec3>& b) {
  double worst = 0.0;
  for (std::size_t i = 0; i < pts.size(); ++i) worst = std::max(worst, g.deviation_T(pts[i], b[i]));
  return worst;
}

std::vector<Vec3> field_with_ambient(const Model& model, const GoalSpec& g, const PointSet& pts) {
  const FieldSet f = field_of_model(model, pts);
  std::vector<Vec3> out(pts.size());
  for (std::size_t i = 0; i < pts.size(); ++i) out[i] = f[i] + g.ambient_at(pts[i]);
  return out;
}

std::uint32_t low(std::uint64_t v) { return static_cast<std::uint32_t>(v & 0xffffffffu); }
std::uint32_t high(std::uint64_t v) { return static_cast<std::uint32_t>(v >> 32); }

}  // namespace
}  // namespace detail

std::string_view to_string(Distribution d) noexcept { return d == Distribution::uniform ? "uniform" : "normal"; }
std::optional<Distribution> distribution_from_string(std::string_view s) noexcept {
  if (s == "normal") return Distribution::normal;
  if (s == "uniform") return Distribution::uniform;
  return std::nullopt;
}
std::string_view to_string(RankBy r) noexcept { return r == RankBy::yield ? "yield" : "objective"; }
std::optional<RankBy> rank_by_from_string(std::string_view s) noexcept {
  if (s == "objective") return RankBy::objective;
  if (s == "yield") return RankBy::yield;
  return std::nullopt;
}

std::string_view to_string(ToleranceKind k) noexcept {
  switch (k) {
    case ToleranceKind::shift_x: return "x";
    case ToleranceKind::shift_y: return "y";
    case ToleranceKind::shift_z: return "z";
    case ToleranceKind::tilt_u: return "tilt_u";
    case ToleranceKind::tilt_v: return "tilt_v";
    case ToleranceKind::radius: return "radius";
    case ToleranceKind::width: return "width";
    case ToleranceKind::height: return "height";
    case ToleranceKind::turns: return "turns";
    case ToleranceKind::current: return "current";
  }
  return "?";
}

double ToleranceParameter::sigma() const {
  // A uniform distribution on [-h, h] has standard deviation h / sqrt(3).
  return distribution == Distribution::uniform ? value / std::numbers::sqrt3 : value;
}

double metric_value(const BuildMetrics& m, std::string_view name) {
  if (name == "worst_relative_deviation") return m.worst_relative_deviation;
  if (name == "rms_relative_deviation") return m.rms_relative_deviation;
  if (name == "centre_field") return m.centre_field_T;
  if (name == "inhomogeneity") return m.inhomogeneity;
  if (name == "good_field_radius") return m.good_field_radius_m;
  if (name == "worst_absolute_deviation") return m.worst_absolute_deviation_T;
  throw std::invalid_argument(fmt::format("unknown build metric '{}'", name));
}

std::string_view metric_unit(std::string_view name) {
  if (name == "centre_field" || name == "worst_absolute_deviation") return "T";
  if (name == "good_field_radius") return "m";
  return "1";
}

void ToleranceOptions::validate() const {
  if (samples < 0) throw InputError(fmt::format("tolerance: samples must be >= 0, found {}", samples));
  if (!(step_fraction > 0.0 && step_fraction <= 1.0))
    throw InputError(fmt::format("tolerance: step_fraction must lie in (0, 1], found {}", step_fraction));
}

Model expand_windings(const Model& design, std::vector<std::string>* declared_coil_of) {
  Model out = design;
  out.coils.clear();
  out.free_parameters.clear();  // indices would no longer match; a design has none left
  std::vector<std::string> declared;
  for (const Coil& c : design.coils) {
    if (!c.is_pair()) {
      out.coils.push_back(c);
      declared.push_back(c.name);
      continue;
    }
    // The same centres as windings(c), so the expanded field equals the pair's bit for bit.
    const Vec3 half = 0.5 * *c.separation_m * c.axis;
    for (int k = 0; k < 2; ++k) {
      Coil w = c;
      w.name = fmt::format("{}#{}", c.name, k + 1);
      w.separation_m.reset();
      w.opposed = false;
      w.centre_m = k == 0 ? Vec3(c.centre_m - half) : Vec3(c.centre_m + half);
      if (k == 1 && c.opposed) {
        // Reversed current: a polygon runs its vertices backwards; the other shapes are
        // symmetric about their own plane, so turning the axis round reverses the circulation.
        if (w.shape == Shape::polygon)
          std::reverse(w.vertices_m.begin(), w.vertices_m.end());
        else
          w.axis = -w.axis;
      }
      out.coils.push_back(std::move(w));
      declared.push_back(c.name);
    }
  }
  if (declared_coil_of) *declared_coil_of = std::move(declared);
  return out;
}

std::vector<ToleranceParameter> tolerance_parameters(const Model& expanded, const Tolerances& tolerances,
                                                     const std::vector<std::string>& declared_coil_of) {
  std::vector<ToleranceParameter> out;
  auto add = [&](ToleranceKind kind, std::size_t index, std::string label, std::string unit, const std::optional<double>& v,
                 Distribution d) {
    if (!v || !(*v > 0.0)) return;
    out.push_back(ToleranceParameter{kind, index, std::move(label), std::move(unit), *v, d});
  };
  for (std::size_t i = 0; i < expanded.coils.size(); ++i) {
    const Coil& c = expanded.coils[i];
    const ToleranceSpec t = tolerances.effective(i < declared_coil_of.size() ? declared_coil_of[i] : c.name);
    const Distribution d = t.distribution.value_or(Distribution::normal);
    add(ToleranceKind::shift_x, i, c.name + ".x", "m", t.position_m, d);
    add(ToleranceKind::shift_y, i, c.name + ".y", "m", t.position_m, d);
    add(ToleranceKind::shift_z, i, c.name + ".z", "m", t.position_m, d);
    add(ToleranceKind::tilt_u, i, c.name + ".tilt_u", "rad", t.tilt_rad, d);
    add(ToleranceKind::tilt_v, i, c.name + ".tilt_v", "rad", t.tilt_rad, d);
    if (c.shape == Shape::rectangle) {
      add(ToleranceKind::width, i, c.name + ".width", "m", t.radius_m, d);
      add(ToleranceKind::height, i, c.name + ".height", "m", t.radius_m, d);
    } else if (c.shape != Shape::polygon) {
      add(ToleranceKind::radius, i, c.name + ".radius", "m", t.radius_m, d);
    }
    add(ToleranceKind::turns, i, c.name + ".turns", "turn", t.turns, d);
  }
  // A circuit's current error: the largest declared by the coils it drives.
  for (std::size_t k = 0; k < expanded.circuits.size(); ++k) {
    std::optional<double> rel;
    Distribution d = Distribution::normal;
    for (std::size_t i = 0; i < expanded.coils.size(); ++i) {
      if (expanded.coils[i].circuit != expanded.circuits[k].name) continue;
      const ToleranceSpec t = tolerances.effective(i < declared_coil_of.size() ? declared_coil_of[i] : expanded.coils[i].name);
      if (t.current_relative && (!rel || *t.current_relative > *rel)) {
        rel = t.current_relative;
        d = t.distribution.value_or(Distribution::normal);
      }
    }
    add(ToleranceKind::current, k, "circuit " + expanded.circuits[k].name + ".current", "1", rel, d);
  }
  return out;
}

void perturb(Model& build, const ToleranceParameter& p, double delta) {
  if (p.kind == ToleranceKind::current) {
    build.circuits[p.index].current_A *= 1.0 + delta;
    return;
  }
  Coil& c = build.coils[p.index];
  switch (p.kind) {
    case ToleranceKind::shift_x: c.centre_m.x() += delta; break;
    case ToleranceKind::shift_y: c.centre_m.y() += delta; break;
    case ToleranceKind::shift_z: c.centre_m.z() += delta; break;
    case ToleranceKind::tilt_u:
    case ToleranceKind::tilt_v: {
      // Rotate the winding about its centre, about one of two axes across its own axis.
      const Frame f = Frame::from_axis(c.axis, c.width_axis);
      const Vec3 about = p.kind == ToleranceKind::tilt_u ? f.u : f.v;
      const Eigen::AngleAxisd r(delta, about);
      c.axis = (r * c.axis).normalized();
      c.width_axis = (r * c.width_axis).normalized();
      for (Vec3& v : c.vertices_m) v = r * v;
      break;
    }
    case ToleranceKind::radius:
      if (c.shape == Shape::pack || c.multilayer()) {
        c.inner_radius_m += delta;  // the former is off; the winding depth stays
        c.outer_radius_m += delta;
      } else {
        c.radius_m += delta;
      }
      break;
    case ToleranceKind::width: c.width_m += delta; break;
    case ToleranceKind::height: c.height_m += delta; break;
    case ToleranceKind::turns: c.turns += delta; break;
    case ToleranceKind::current: break;
  }
}

// ---- evaluating one build ---------------------------------------------------------------

BuildEvaluator::BuildEvaluator(const Model& expanded)
    : goal_(expanded.target ? GoalSpec::from(*expanded.target, expanded.location_of("target.goal"))
                            : throw InputError(SourceLocation{expanded.source_file}, "target", "the design has no [target] table")),
      samples_(sample_region(*expanded.target, Symmetry{})),
      boundary_(samples_.boundary),
      volume_(samples_.volume),
      objective_(expanded.search.objective) {}

void BuildEvaluator::trim_currents(Model& build) {
  // Every circuit is re-solved within its supply's current limit: the builder's calibration.
  const bool rms = objective_ != Objective::worst;
  const ResponseMatrix& A = rms ? volume_.update(build) : boundary_.update(build);
  const PointSet& pts = rms ? samples_.volume : samples_.boundary;
  const auto n = static_cast<Eigen::Index>(pts.size());
  const auto k = static_cast<Eigen::Index>(build.circuits.size());
  const bool scalar = goal_.goal == Goal::gradient;  // only B·a is prescribed
  Eigen::MatrixXd M(scalar ? n : 3 * n, k);
  Eigen::VectorXd rhs(M.rows());
  const Vec3& a = goal_.axis;
  for (Eigen::Index i = 0; i < n; ++i) {
    const Vec3 p = pts[static_cast<std::size_t>(i)];
    const double w = rms ? std::sqrt(samples_.weights[static_cast<std::size_t>(i)]) : 1.0;
    if (scalar) {
      rhs[i] = w * (goal_.field_T.dot(a) + goal_.gradient_T_per_m * (p - goal_.centre_m).dot(a) - goal_.ambient_at(p).dot(a));
      for (Eigen::Index c = 0; c < k; ++c) M(i, c) = w * (a.x() * A(i, c) + a.y() * A(n + i, c) + a.z() * A(2 * n + i, c));
    } else {
      const Vec3 want = (goal_.goal == Goal::uniform ? goal_.field_T : Vec3::Zero()) - goal_.ambient_at(p);
      for (int d = 0; d < 3; ++d) {
        rhs[d * n + i] = w * want[d];
        for (Eigen::Index c = 0; c < k; ++c) M(d * n + i, c) = w * A(d * n + i, c);
      }
    }
  }
  Eigen::VectorXd lo(k), hi(k);
  for (Eigen::Index c = 0; c < k; ++c) {
    const auto& sup = build.circuits[static_cast<std::size_t>(c)].supply;
    const double limit = sup && sup->max_current_A ? *sup->max_current_A : 1e300;
    lo[c] = -limit;
    hi[c] = limit;
  }
  const auto sol = solve_bounded_least_squares(M, rhs, lo, hi);
  for (Eigen::Index c = 0; c < k; ++c) build.circuits[static_cast<std::size_t>(c)].current_A = sol.x[c];
}

BuildMetrics BuildEvaluator::evaluate(Model& build, bool trim, bool good_field) {
  if (trim) trim_currents(build);
  BuildMetrics m;
  PointSet centre;
  centre.push_back(goal_.centre_m);
  const Vec3 bc = field_of_model(build, centre)[0] + goal_.ambient_at(goal_.centre_m);
  const bool null_goal = goal_.goal == Goal::null;
  const Vec3 dir = goal_.goal == Goal::uniform ? Vec3(goal_.field_T.normalized()) : goal_.axis;
  m.centre_field_T = null_goal ? bc.norm() : bc.dot(dir);
  const GoalSpec own = detail::own_goal(goal_, bc);

  const auto Bb = total_field(build, boundary_.update(build), samples_.boundary, goal_);
  double inhomogeneity = 0.0;
  for (std::size_t i = 0; i < Bb.size(); ++i) {
    m.worst_absolute_deviation_T = std::max(m.worst_absolute_deviation_T, goal_.deviation_T(samples_.boundary[i], Bb[i]));
    inhomogeneity = std::max(inhomogeneity, own.deviation_T(samples_.boundary[i], Bb[i]));
  }
  const auto Bv = total_field(build, volume_.update(build), samples_.volume, goal_);
  double sum = 0.0;
  for (std::size_t i = 0; i < Bv.size(); ++i) {
    const double d = goal_.deviation_T(samples_.volume[i], Bv[i]);
    sum += samples_.weights[i] * d * d;
  }
  m.worst_relative_deviation = m.worst_absolute_deviation_T / goal_.reference_T;
  m.rms_relative_deviation = std::sqrt(sum) / goal_.reference_T;
  m.inhomogeneity = inhomogeneity / goal_.reference_T;
  m.meets_tolerance = m.worst_absolute_deviation_T <= goal_.tolerance_T;
  m.good_field_radius_m = std::numeric_limits<double>::quiet_NaN();
  if (good_field) {
    // Largest sphere about the centre within tolerance of the build's own centre field; the
    // worst deviation grows with the sphere (maximum principle), so bisection is valid.
    const Target& t = *build.target;
    const int res = t.resolution > 0 ? t.resolution : kDefaultResolution;
    const Frame frame = Frame::from_axis(goal_.axis, t.reference);
    const double s_max = 0.999 * nearest_conductor_m(build, goal_.centre_m);
    auto worst = [&](double r) {
      const PointSet pts = sphere_surface(goal_.centre_m, frame, r, res, Symmetry{});
      return detail::max_deviation(own, pts, detail::field_with_ambient(build, goal_, pts));
    };
    m.good_field_radius_m = detail::largest_within(s_max, goal_.tolerance_T, worst);
  }
  return m;
}

// ---- sensitivities ------------------------------------------------------------------------

// Central differences f'(x) ≈ (f(x+h) - f(x-h)) / 2h have truncation error h² f'''/6 and a
// rounding error about ε |f| / h (ε ≈ 1e-15: the field sums' relative rounding). With
// h = 1e-4 σ and σ a workshop tolerance (1e-5 to 1e-3 of the coil size L), h is 1e-9 to 1e-7
// of L: the truncation term (relative (h/L)² ≤ 1e-14) and the rounding term (relative
// ε L / h ≤ 1e-6) both stay far below the figures' meaning. The worst deviation is a maximum
// over points and has kinks; there the central difference gives the mean of the one-sided
// slopes, which is why the direct change at ±1σ is reported beside it.
std::size_t sensitivity_jobs(const Model& design) {
  std::vector<std::string> declared;
  const Model expanded = expand_windings(design, &declared);
  return 1 + 4 * tolerance_parameters(expanded, design.tolerances, declared).size();
}

std::vector<BuildMetrics> run_sensitivity_jobs(const Model& design, const ToleranceOptions& options, std::size_t begin,
                                               std::size_t end) {
  options.validate();
  std::vector<std::string> declared;
  const Model expanded = expand_windings(design, &declared);
  const auto parameters = tolerance_parameters(expanded, design.tolerances, declared);
  end = std::min(end, 1 + 4 * parameters.size());
  std::vector<BuildMetrics> out(end > begin ? end - begin : 0);
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp parallel if (out.size() > 1)
#endif
  {
    BuildEvaluator ev(expanded);
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp for schedule(dynamic, 1)
#endif
    for (std::size_t j = begin; j < end; ++j) {
      Model build = expanded;
      if (j > 0) {
        // Job 1 + 4i + k: parameter i at +h, -h, +sigma, -sigma.
        const ToleranceParameter& p = parameters[(j - 1) / 4];
        const double sd = p.sigma();
        const double h = options.step_fraction * sd;
        perturb(build, p, std::array<double, 4>{h, -h, sd, -sd}[(j - 1) % 4]);
      }
      out[j - begin] = ev.evaluate(build, options.trim, true);
    }
  }
  return out;
}

SensitivityStudy sensitivities(const Model& design, const ToleranceOptions& options) {
  return sensitivities_from(design, options, run_sensitivity_jobs(design, options, 0, sensitivity_jobs(design)));
}

SensitivityStudy sensitivities_from(const Model& design, const ToleranceOptions& options, const std::vector<BuildMetrics>& jobs) {
  std::vector<std::string> declared;
  const Model expanded = expand_windings(design, &declared);
  SensitivityStudy study;
  study.parameters = tolerance_parameters(expanded, design.tolerances, declared);
  const std::size_t P = study.parameters.size();
  if (jobs.size() != 1 + 4 * P)
    throw DomainError(fmt::format("sensitivities: {} evaluations given for {} parameters (expected {})", jobs.size(), P, 1 + 4 * P));
  study.nominal = jobs[0];
  // For each parameter: f(+h), f(-h), f(+σ), f(-σ).
  std::vector<std::array<BuildMetrics, 4>> at(P);
  for (std::size_t j = 1; j < jobs.size(); ++j) at[(j - 1) / 4][(j - 1) % 4] = jobs[j];
  for (std::size_t i = 0; i < P; ++i) {
    const ToleranceParameter& p = study.parameters[i];
    const double h = options.step_fraction * p.sigma();
    for (std::string_view name : kBuildMetricNames) {
      Sensitivity s;
      s.parameter = p.label;
      s.metric = std::string(name);
      s.sigma = p.sigma();
      s.derivative = (metric_value(at[i][0], name) - metric_value(at[i][1], name)) / (2.0 * h);
      const double f0 = metric_value(study.nominal, name);
      const double up = metric_value(at[i][2], name) - f0, down = metric_value(at[i][3], name) - f0;
      s.effect_at_sigma = std::abs(up) >= std::abs(down) ? up : down;
      study.sensitivities.push_back(std::move(s));
    }
  }
  // Rank parameters by what one sigma does to the worst relative deviation.
  std::vector<double> key(P);
  for (std::size_t i = 0; i < P; ++i) key[i] = std::abs(study.sensitivities[i * kBuildMetricNames.size()].effect_at_sigma);
  std::vector<std::size_t> order(P);
  for (std::size_t i = 0; i < P; ++i) order[i] = i;
  std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return key[a] > key[b]; });
  std::vector<Sensitivity> ranked;
  std::vector<ToleranceParameter> params;
  for (std::size_t i : order) {
    params.push_back(study.parameters[i]);
    for (std::size_t k = 0; k < kBuildMetricNames.size(); ++k)
      ranked.push_back(study.sensitivities[i * kBuildMetricNames.size() + k]);
  }
  study.parameters = std::move(params);
  study.sensitivities = std::move(ranked);
  return study;
}

// ---- Monte Carlo ----------------------------------------------------------------------------

std::vector<double> draw_build(const std::vector<ToleranceParameter>& parameters, std::uint64_t seed, std::uint64_t index) {
  // The generator of build i is seeded from (seed, i) alone: any split of the builds over
  // threads or processes draws the same numbers.
  std::seed_seq seq{detail::low(seed), detail::high(seed), detail::low(index), detail::high(index)};
  std::mt19937_64 rng(seq);
  std::vector<double> deltas;
  deltas.reserve(parameters.size());
  for (const ToleranceParameter& p : parameters) {
    double x = 0.0;
    if (p.distribution == Distribution::uniform) {
      x = std::uniform_real_distribution<double>(-1.0, 1.0)(rng) * p.value;
    } else {
      x = std::normal_distribution<double>(0.0, 1.0)(rng) * p.value;
    }
    if (p.kind == ToleranceKind::turns) x = std::round(x);  // a build has whole turns
    deltas.push_back(x);
  }
  return deltas;
}

std::vector<BuildMetrics> run_builds(const Model& design, const ToleranceOptions& options, std::uint64_t begin,
                                     std::uint64_t end) {
  options.validate();
  std::vector<std::string> declared;
  const Model expanded = expand_windings(design, &declared);
  const auto parameters = tolerance_parameters(expanded, design.tolerances, declared);
  const std::size_t n = end > begin ? static_cast<std::size_t>(end - begin) : 0;
  std::vector<BuildMetrics> out(n);
  if (n == 0) return out;
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp parallel
#endif
  {
    BuildEvaluator ev(expanded);
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp for schedule(dynamic, 4)
#endif
    for (std::size_t i = 0; i < n; ++i) {
      const auto deltas = draw_build(parameters, options.seed, begin + i);
      Model build = expanded;
      for (std::size_t k = 0; k < parameters.size(); ++k) perturb(build, parameters[k], deltas[k]);
      out[i] = ev.evaluate(build, options.trim, options.good_field);
    }
  }
  return out;
}

double percentile(std::vector<double> values, double q) {
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(values.begin(), values.end());
  const double rank = std::ceil(q / 100.0 * static_cast<double>(values.size()));
  const auto r = static_cast<std::size_t>(std::clamp(rank, 1.0, static_cast<double>(values.size())));
  return values[r - 1];
}

MonteCarloSummary summarise(const std::vector<BuildMetrics>& builds, bool good_field) {
  MonteCarloSummary s;
  s.samples = builds.size();
  if (builds.empty()) return s;
  const double N = static_cast<double>(builds.size());
  std::size_t met = 0;
  for (const BuildMetrics& b : builds) met += b.meets_tolerance ? 1 : 0;
  s.yield = static_cast<double>(met) / N;
  s.yield_standard_error = std::sqrt(s.yield * (1.0 - s.yield) / N);
  std::vector<double> worst;
  worst.reserve(builds.size());
  for (const BuildMetrics& b : builds) worst.push_back(b.worst_relative_deviation);
  s.worst = {percentile(worst, 50), percentile(worst, 90), percentile(worst, 99)};
  for (std::string_view name : kBuildMetricNames) {
    if (name == "good_field_radius" && !good_field) continue;
    MetricSpread m;
    m.metric = std::string(name);
    double sum = 0.0;
    m.min = std::numeric_limits<double>::infinity();
    m.max = -m.min;
    for (const BuildMetrics& b : builds) {
      const double v = metric_value(b, name);
      sum += v;
      m.min = std::min(m.min, v);
      m.max = std::max(m.max, v);
    }
    m.mean = sum / N;
    double ss = 0.0;
    for (const BuildMetrics& b : builds) ss += (metric_value(b, name) - m.mean) * (metric_value(b, name) - m.mean);
    m.standard_deviation = builds.size() > 1 ? std::sqrt(ss / (N - 1.0)) : 0.0;
    s.spread.push_back(std::move(m));
  }
  return s;
}

std::string builds_csv(const std::vector<BuildMetrics>& builds, bool good_field) {
  std::string out = "build,worst_relative_deviation,rms_relative_deviation,centre_field_T,inhomogeneity,";
  out += good_field ? "good_field_radius_m," : "";
  out += "worst_absolute_deviation_T,meets_tolerance\n";
  for (std::size_t i = 0; i < builds.size(); ++i) {
    const BuildMetrics& b = builds[i];
    out += fmt::format("{},{:.17g},{:.17g},{:.17g},{:.17g},", i, b.worst_relative_deviation, b.rms_relative_deviation,
                       b.centre_field_T, b.inhomogeneity);
    if (good_field) out += fmt::format("{:.17g},", b.good_field_radius_m);
    out += fmt::format("{:.17g},{}\n", b.worst_absolute_deviation_T, b.meets_tolerance ? 1 : 0);
  }
  return out;
}

}  // namespace coilwright
