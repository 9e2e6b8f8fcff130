#pragma once
// Will a design still meet its target once built? Builds scatter: each winding (each half of a
// pair separately) is shifted, tilted, made larger or smaller and wound with a turn more or
// less, and each circuit's current is off by a fraction. This header gives
//  - the toleranced dimensions of a design (one per winding and dimension, one per circuit),
//  - the sensitivity of each metric to each of them (central differences), ranked by the
//    change one standard deviation makes,
//  - a Monte Carlo study of seeded random builds: the distribution of the metrics, the yield
//    (fraction meeting the target tolerance) with its binomial standard error, percentiles.
// Builds break the design's symmetry, so the region is sampled in full (no symmetry reduction).
#include <array>
#include <cstdint>
#include <optional>
#include <random>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "coilwright/metrics.hpp"
#include "coilwright/model.hpp"
#include "coilwright/response.hpp"
#include "coilwright/sampling.hpp"

namespace coilwright {

// One toleranced dimension of a design.
enum class ToleranceKind { shift_x, shift_y, shift_z, tilt_u, tilt_v, radius, width, height, turns, current };
[[nodiscard]] std::string_view to_string(ToleranceKind k) noexcept;

struct ToleranceParameter {
  ToleranceKind kind = ToleranceKind::shift_x;
  std::size_t index = 0;       // winding (index into the expanded model's coils) or circuit (current)
  std::string label;           // "outer#2.z", "inner#1.tilt_u", "circuit main.current"
  std::string unit;            // SI unit of the dimension: "m", "rad", "turn", "1" (relative current)
  double value = 0.0;          // declared tolerance: sigma (normal) or half-width (uniform)
  Distribution distribution = Distribution::normal;
  [[nodiscard]] double sigma() const;  // standard deviation: value, or half-width/sqrt(3) for uniform
};

// The metrics of one build (a cheaper set than Metrics, for thousands of builds).
struct BuildMetrics {
  double worst_relative_deviation = 0.0;  // max |B - B_goal| / reference over the region's boundary
  double worst_absolute_deviation_T = 0.0;
  double rms_relative_deviation = 0.0;    // volume-weighted
  double centre_field_T = 0.0;            // B(centre) along the goal direction (|B| for a null goal)
  double inhomogeneity = 0.0;             // max |B - B(centre)| / reference: what no current trim removes
  double good_field_radius_m = 0.0;       // largest sphere about the centre within tolerance of B(centre); NaN if not computed
  bool meets_tolerance = false;           // worst_absolute_deviation_T <= target tolerance
};

// The names of BuildMetrics' figures, as used in tables, CSV and JSON, and a getter.
inline constexpr std::array<std::string_view, 6> kBuildMetricNames{
    "worst_relative_deviation", "rms_relative_deviation", "centre_field", "inhomogeneity", "good_field_radius",
    "worst_absolute_deviation"};
[[nodiscard]] double metric_value(const BuildMetrics& m, std::string_view name);
[[nodiscard]] std::string_view metric_unit(std::string_view name);  // SI unit: "1", "T", "m"

// The design with every mirrored pair split into its two windings ("<name>#1", "<name>#2"),
// the reversed half of an opposed pair turned round, so that each winding can move alone.
// Its field equals the design's to rounding.
// `declared_coil_of`, if given, receives the declared coil name of each expanded coil.
[[nodiscard]] Model expand_windings(const Model& design, std::vector<std::string>* declared_coil_of = nullptr);

// The toleranced dimensions of an expanded model under `tolerances` (keyed by the declared
// coil names; "<name>#k" windings take their coil's tolerances). Zero tolerances are left out.
[[nodiscard]] std::vector<ToleranceParameter> tolerance_parameters(const Model& expanded, const Tolerances& tolerances,
                                                                   const std::vector<std::string>& declared_coil_of);

// Applies a change `delta` (SI: m, rad, turns, or a fraction of the current) of one dimension.
void perturb(Model& build, const ToleranceParameter& p, double delta);

struct ToleranceOptions {
  int samples = 1000;          // Monte Carlo builds
  std::uint64_t seed = 1;      // build i draws from a generator seeded by (seed, i) alone
  bool trim = false;           // re-solve every circuit's current on each build (a calibration trim)
  bool good_field = false;     // also find each build's good-field radius (about 40 field maps a build)
  double step_fraction = 1e-4; // central-difference step h = step_fraction * sigma (see tolerance.cpp)
  void validate() const;       // throws InputError naming the field
};

// Evaluates builds of one design on its target; one per thread (it caches coil responses).
class BuildEvaluator {
 public:
  explicit BuildEvaluator(const Model& expanded);
  // Metrics of `build` (an expanded model). With `trim`, its circuits' currents are re-solved
  // first (written into build.circuits).
  [[nodiscard]] BuildMetrics evaluate(Model& build, bool trim, bool good_field);
  [[nodiscard]] const GoalSpec& goal() const noexcept { return goal_; }

 private:
  void trim_currents(Model& build);
  GoalSpec goal_;
  SampleSet samples_;
  ResponseCache boundary_;
  ResponseCache volume_;
  Objective objective_;
};

struct Sensitivity {
  std::string parameter;       // ToleranceParameter::label
  std::string metric;          // one of kBuildMetricNames
  double derivative = 0.0;     // d metric / d parameter, SI per SI (central difference)
  double sigma = 0.0;          // the parameter's standard deviation
  double effect_at_sigma = 0.0;  // largest metric change for a change of +-1 sigma (direct evaluation)
};

struct SensitivityStudy {
  BuildMetrics nominal;
  std::vector<ToleranceParameter> parameters;
  std::vector<Sensitivity> sensitivities;  // ranked by |effect_at_sigma| on the worst relative deviation, then metric
};

// Sensitivities of every BuildMetrics figure to every toleranced dimension of `design`.
[[nodiscard]] SensitivityStudy sensitivities(const Model& design, const ToleranceOptions& options);

// The same in parts, so that the evaluations can be spread over processes: job 0 is the nominal
// design, job 1 + 4i + k parameter i at +h, -h, +sigma, -sigma. Each job's result depends only
// on its index. sensitivities_from() takes all sensitivity_jobs() results in job order.
[[nodiscard]] std::size_t sensitivity_jobs(const Model& design);
[[nodiscard]] std::vector<BuildMetrics> run_sensitivity_jobs(const Model& design, const ToleranceOptions& options,
                                                             std::size_t begin, std::size_t end);
[[nodiscard]] SensitivityStudy sensitivities_from(const Model& design, const ToleranceOptions& options,
                                                  const std::vector<BuildMetrics>& jobs);

// Draws build `index` of `design`'s tolerance study (its deltas, one per parameter, in order).
[[nodiscard]] std::vector<double> draw_build(const std::vector<ToleranceParameter>& parameters, std::uint64_t seed,
                                             std::uint64_t index);

// Evaluates builds [begin, end) of the study (parallel over builds; each result depends only
// on its index, so any split over threads or processes gives the same numbers).
[[nodiscard]] std::vector<BuildMetrics> run_builds(const Model& design, const ToleranceOptions& options, std::uint64_t begin,
                                                   std::uint64_t end);

struct Percentiles {
  double p50 = 0.0, p90 = 0.0, p99 = 0.0;
};
struct MetricSpread {
  std::string metric;
  double mean = 0.0, standard_deviation = 0.0, min = 0.0, max = 0.0;
};
struct MonteCarloSummary {
  std::size_t samples = 0;
  double yield = 0.0;                 // fraction of builds meeting the target tolerance
  double yield_standard_error = 0.0;  // sqrt(p (1 - p) / N), binomial
  Percentiles worst;                  // of the worst relative deviation (nearest-rank)
  std::vector<MetricSpread> spread;   // one per metric computed
};
// Statistics of builds in index order (sequential sums: identical for any thread count).
[[nodiscard]] MonteCarloSummary summarise(const std::vector<BuildMetrics>& builds, bool good_field);

// The per-build table: index, every metric and meets_tolerance; 17 significant digits.
[[nodiscard]] std::string builds_csv(const std::vector<BuildMetrics>& builds, bool good_field);

// The nearest-rank percentile q in (0, 100] of values (copied and sorted).
[[nodiscard]] double percentile(std::vector<double> values, double q);

}  // namespace coilwright
