#pragma once
// A tolerance study as text and JSON, shared by `coilwright tolerance` and its MPI twin.
#include <filesystem>
#include <string>

#include <nlohmann/json.hpp>

#include "coilwright/metrics.hpp"
#include "coilwright/tolerance.hpp"

namespace coilwright {

struct ToleranceStudy {
  Metrics nominal;                 // the full metrics of the design as drawn
  SensitivityStudy sensitivity;
  std::vector<BuildMetrics> builds;  // in build-index order
  MonteCarloSummary monte_carlo;
  ToleranceOptions options;
  double seconds_sensitivity = 0.0;
  double seconds_monte_carlo = 0.0;
  double cpu_seconds_monte_carlo = 0.0;  // processor time of all threads (0 where not measured)
};

// The model ready for a study: any solved currents are solved on its target and then fixed.
[[nodiscard]] Model design_for_tolerance(Model model);

// JSON: nominal, sensitivities [{parameter, metric, derivative, sigma, effect_at_sigma}],
// yield, yield_standard_error, percentiles {p50, p90, p99}, samples, seed, trim, spread.
[[nodiscard]] nlohmann::json tolerance_json(const ToleranceStudy& s);

// Writes <stem>-builds.csv and <stem>-tolerance.json into `dir`, each atomically.
void write_tolerance_files(const std::filesystem::path& dir, const std::string& stem, const ToleranceStudy& s);

// The ranked sensitivity table and the Monte Carlo summary, for the terminal.
[[nodiscard]] std::string tolerance_text(const Model& design, const ToleranceStudy& s);

}  // namespace coilwright
