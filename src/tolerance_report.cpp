#include "coilwright/tolerance_report.hpp"

#include <cmath>

#include <fmt/format.h>

#include "coilwright/atomic_file.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/results.hpp"

namespace coilwright {

Model design_for_tolerance(Model model) {
  Evaluator ev(model);
  (void)ev.objective(model, model.search.objective);  // solves any free currents
  for (Circuit& c : model.circuits) c.solved = false;
  return model;
}

nlohmann::json tolerance_json(const ToleranceStudy& s) {
  nlohmann::json j;
  j["nominal"] = metrics_json(s.nominal);
  nlohmann::json sens = nlohmann::json::array();
  for (const Sensitivity& x : s.sensitivity.sensitivities)
    sens.push_back({{"parameter", x.parameter},
                    {"metric", x.metric},
                    {"derivative", x.derivative},
                    {"sigma", x.sigma},
                    {"effect_at_sigma", x.effect_at_sigma},
                    {"unit", fmt::format("{}/{}", metric_unit(x.metric), [&] {
                       for (const auto& p : s.sensitivity.parameters)
                         if (p.label == x.parameter) return p.unit;
                       return std::string("1");
                     }())}});
  j["sensitivities"] = sens;
  j["samples"] = s.monte_carlo.samples;
  j["seed"] = s.options.seed;
  j["trim"] = s.options.trim;
  j["yield"] = s.monte_carlo.yield;
  j["yield_standard_error"] = s.monte_carlo.yield_standard_error;
  j["percentiles"] = {{"p50", s.monte_carlo.worst.p50}, {"p90", s.monte_carlo.worst.p90}, {"p99", s.monte_carlo.worst.p99}};
  nlohmann::json spread = nlohmann::json::object();
  for (const MetricSpread& m : s.monte_carlo.spread)
    spread[m.metric] = {{"mean", m.mean}, {"standard_deviation", m.standard_deviation}, {"min", m.min}, {"max", m.max}};
  j["spread"] = spread;
  j["seconds"] = {{"sensitivity", s.seconds_sensitivity},
                  {"monte_carlo", s.seconds_monte_carlo},
                  {"monte_carlo_cpu", s.cpu_seconds_monte_carlo}};
  return j;
}

void write_tolerance_files(const std::filesystem::path& dir, const std::string& stem, const ToleranceStudy& s) {
  write_file_atomic(dir / (stem + "-builds.csv"), builds_csv(s.builds, s.options.good_field));
  write_file_atomic(dir / (stem + "-tolerance.json"), tolerance_json(s).dump(2) + "\n");
}

namespace {
std::string dimension_text(const ToleranceParameter& p, double v) {
  if (p.unit == "m") return fmt::format("{:.4g} mm", v * 1e3);
  if (p.unit == "rad") return fmt::format("{:.4g} deg", v * 180.0 / 3.14159265358979323846);
  if (p.unit == "turn") return fmt::format("{:.4g} turn", v);
  return fmt::format("{:.4g} %", v * 100.0);
}
}  // namespace

std::string tolerance_text(const Model& design, const ToleranceStudy& s) {
  std::string out;
  const BuildMetrics& n = s.sensitivity.nominal;
  out += fmt::format("{} — {}\n", design.project.name, design.source_file);
  out += fmt::format("  nominal: worst deviation {:.2f} ppm, rms {:.2f} ppm, inhomogeneity {:.2f} ppm, good-field radius {:.2f} mm "
                     "(target tolerance {:.2f} ppm)\n",
                     n.worst_relative_deviation * 1e6, n.rms_relative_deviation * 1e6, n.inhomogeneity * 1e6,
                     n.good_field_radius_m * 1e3, s.nominal.tolerance_T / s.nominal.reference_T * 1e6);
  out += fmt::format("\n  Sensitivities ({} toleranced dimensions), ranked by the change one sigma makes to the worst deviation:\n",
                     s.sensitivity.parameters.size());
  out += fmt::format("  {:>4}  {:<28} {:>12}  {:>14}  {:>14}  {:>14}  {:>14}\n", "rank", "dimension", "1 sigma", "worst [ppm]",
                     "inhomog. [ppm]", "centre [ppm]", "good r [mm]");
  const std::size_t M = kBuildMetricNames.size();
  for (std::size_t i = 0; i < s.sensitivity.parameters.size(); ++i) {
    const ToleranceParameter& p = s.sensitivity.parameters[i];
    const auto effect = [&](std::string_view metric) {
      for (std::size_t k = 0; k < M; ++k) {
        const Sensitivity& x = s.sensitivity.sensitivities[i * M + k];
        if (x.metric == metric) return x.effect_at_sigma;
      }
      return 0.0;
    };
    const double centre_ref = n.centre_field_T != 0.0 ? std::abs(n.centre_field_T) : 1.0;
    out += fmt::format("  {:>4}  {:<28} {:>12}  {:>+14.3f}  {:>+14.3f}  {:>+14.3f}  {:>+14.3f}\n", i + 1, p.label,
                       dimension_text(p, p.sigma()), effect("worst_relative_deviation") * 1e6, effect("inhomogeneity") * 1e6,
                       effect("centre_field") / centre_ref * 1e6, effect("good_field_radius") * 1e3);
  }
  if (!s.sensitivity.parameters.empty()) {
    const ToleranceParameter& p = s.sensitivity.parameters.front();
    out += fmt::format("  The largest: {} of {} changes the worst deviation by {:+.3g} ppm.\n", dimension_text(p, p.sigma()),
                       p.label, s.sensitivity.sensitivities.front().effect_at_sigma * 1e6);
  }
  const MonteCarloSummary& mc = s.monte_carlo;
  if (mc.samples > 0) {
    out += fmt::format("\n  Monte Carlo: {} builds (seed {}, currents {}):\n", mc.samples, s.options.seed,
                       s.options.trim ? "trimmed on each build" : "as built");
    out += fmt::format("    yield {:.2f} % +- {:.2f} % (fraction of builds within the target tolerance, binomial standard error)\n",
                       mc.yield * 100.0, mc.yield_standard_error * 100.0);
    out += fmt::format("    worst deviation p50 {:.2f} ppm, p90 {:.2f} ppm, p99 {:.2f} ppm\n", mc.worst.p50 * 1e6, mc.worst.p90 * 1e6,
                       mc.worst.p99 * 1e6);
    for (const MetricSpread& m : mc.spread)
      out += fmt::format("    {:<26} mean {:.6g}  sd {:.3g}  min {:.6g}  max {:.6g} [{}]\n", m.metric, m.mean, m.standard_deviation,
                         m.min, m.max, metric_unit(m.metric));
  }
  return out;
}

}  // namespace coilwright
