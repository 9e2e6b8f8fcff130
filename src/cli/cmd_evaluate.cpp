// coilwright evaluate: the metrics of a fixed design on its target.
#include <string>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "display.hpp"
#include "coilwright/config.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/hardware.hpp"
#include "coilwright/results.hpp"

namespace coilwright::cli {

namespace {

struct EvaluateArgs {
  std::string design;
  bool json = false;
};

void print_metrics(const Model& model, const Metrics& m, const ConstraintReport& c) {
  fmt::print("{} — {}\n", model.project.name, model.source_file);
  fmt::print("  centre field            [{}, {}, {}]  |B| = {}\n", with_prefix(m.centre_field_T.x(), "T"),
             with_prefix(m.centre_field_T.y(), "T"), with_prefix(m.centre_field_T.z(), "T"), with_prefix(m.centre_field_T.norm(), "T"));
  fmt::print("  worst deviation         {:.4e} relative ({})\n", m.worst_relative_deviation, with_prefix(m.worst_absolute_deviation_T, "T"));
  fmt::print("  RMS deviation           {:.4e} relative (volume-weighted)\n", m.rms_relative_deviation);
  fmt::print("  peak to peak            {}\n", with_prefix(m.peak_to_peak_T, "T"));
  if (m.direction_error_rad) fmt::print("  direction error         {:.4g} mrad\n", *m.direction_error_rad * 1e3);
  fmt::print("  tolerance               {} -> {}\n", with_prefix(m.tolerance_T, "T"), m.meets_tolerance() ? "met" : "NOT met");
  fmt::print("  within tolerance        {:.2f} % of the region\n", 100 * m.fraction_within_tolerance);
  fmt::print("  good-field sphere       radius {:.3f} mm\n", m.good_field_radius_m * 1e3);
  fmt::print("  good-field cylinder     radius {:.3f} mm, length {:.3f} mm\n", m.good_field_cylinder_radius_m * 1e3,
             m.good_field_cylinder_length_m * 1e3);
  if (m.order) fmt::print("  order                   {} (first non-vanishing on-axis error term)\n", *m.order);
  fmt::print("  ampere-turns            {:.6g}\n", m.ampere_turns);
  for (std::size_t i = 0; i < model.circuits.size(); ++i)
    fmt::print("  circuit {:<15} {}\n", model.circuits[i].name, with_prefix(model.circuits[i].current_A, "A"));
  for (const auto& line : c.broken) fmt::print("  constraint broken: {}\n", line);
}

}  // namespace

void add_evaluate_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<EvaluateArgs>();
  auto* cmd = app.add_subcommand("evaluate", "Metrics of a fixed design on its target");
  cmd->footer("Example:\n  coilwright evaluate results/sensor-calibration-rig/design-01.toml --json\n"
              "Circuits with a current range are solved first (bounded least squares on the target).");
  cmd->add_option("design", args->design, "Design or config file (TOML)")->required()->check(CLI::ExistingFile);
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the table");
  cmd->callback([args, &global] {
    (void)global;
    Model model = load_model(args->design);
    Evaluator evaluator(model);
    ConstraintReport constraints;
    evaluator.objective(model, model.search.objective, &constraints);  // solves any free currents
    const Metrics m = evaluator.metrics(model);
    if (args->json) {
      nlohmann::json j = metrics_json(m);
      j["project"] = model.project.name;
      j["feasible"] = constraints.feasible();
      j["broken_constraints"] = constraints.broken;
      nlohmann::json currents = nlohmann::json::object();
      for (const Circuit& c : model.circuits) currents[c.name] = c.current_A;
      j["currents"] = currents;
      j.update(hardware_json(hardware_report(model)));
      fmt::print("{}\n", j.dump(2));
    } else {
      print_metrics(model, m, constraints);
      fmt::print("\n{}", format_winding_schedule(hardware_report(model)));
    }
  });
}

}  // namespace coilwright::cli
