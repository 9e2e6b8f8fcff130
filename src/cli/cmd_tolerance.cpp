// coilwright tolerance: which dimensions of a design matter, and what fraction of builds meets spec.
#include <chrono>
#include <ctime>
#include <filesystem>
#include <limits>
#include <string>

#include <fmt/format.h>

#include "commands.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/tolerance_report.hpp"

namespace coilwright::cli {

namespace {

struct ToleranceArgs {
  std::string design;
  int samples = 1000;
  std::uint64_t seed = 1;
  bool trim = false;
  bool good_field = false;
  bool json = false;
  std::string out;
};

}  // namespace

void add_tolerance_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<ToleranceArgs>();
  auto* cmd = app.add_subcommand("tolerance", "Sensitivities to build tolerances and the Monte Carlo yield of a design");
  cmd->footer(
      "Example:\n  coilwright tolerance results/sensor-calibration-rig/design-01.toml --samples 2000 --seed 7 --trim\n"
      "Tolerances come from the design's [tolerance] table and each coil's `tolerance = { ... }`.\n"
      "Writes <design>-builds.csv (one row per build) and <design>-tolerance.json to --out\n"
      "(default: the design's folder). Results are the same for any --threads.");
  cmd->add_option("design", args->design, "Design or config file (TOML)")->required()->check(CLI::ExistingFile);
  // A range, not NonNegativeNumber, whose message printed the 309-digit largest double.
  cmd->add_option("--samples", args->samples, "Monte Carlo builds (0: sensitivities only)")
      ->check(CLI::Range(0, std::numeric_limits<int>::max()));
  cmd->add_option("--seed", args->seed, "Seed of the builds (build i depends on seed and i only)");
  cmd->add_flag("--trim", args->trim, "Re-solve the circuit currents on each build (a calibration trim)");
  cmd->add_flag("--good-field", args->good_field, "Also find each build's good-field radius (slower)");
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the tables");
  cmd->add_option("--out", args->out, "Output folder (default: the design's folder)");
  cmd->callback([args, &global] {
    using Clock = std::chrono::steady_clock;
    const Model design = design_for_tolerance(load_model(args->design));
    if (!design.tolerances.declared())
      throw InputError(SourceLocation{design.source_file}, "tolerance",
                       "the design declares no tolerances; add a [tolerance] table, e.g. position = \"0.5 mm\", tilt = \"0.1 deg\"");
    ToleranceStudy s;
    s.options.samples = args->samples;
    s.options.seed = args->seed;
    s.options.trim = args->trim;
    s.options.good_field = args->good_field;
    s.options.validate();
    {
      Evaluator ev(design);
      s.nominal = ev.metrics(design);
    }
    auto t0 = Clock::now();
    s.sensitivity = sensitivities(design, s.options);
    auto t1 = Clock::now();
    const std::clock_t c1 = std::clock();  // processor time of all threads: the cost behind the wall time
    s.builds = run_builds(design, s.options, 0, static_cast<std::uint64_t>(s.options.samples));
    auto t2 = Clock::now();
    s.cpu_seconds_monte_carlo = static_cast<double>(std::clock() - c1) / CLOCKS_PER_SEC;
    s.monte_carlo = summarise(s.builds, s.options.good_field);
    s.seconds_sensitivity = std::chrono::duration<double>(t1 - t0).count();
    s.seconds_monte_carlo = std::chrono::duration<double>(t2 - t1).count();

    const std::filesystem::path src(args->design);
    const std::filesystem::path dir = args->out.empty() ? src.parent_path() : std::filesystem::path(args->out);
    const std::string stem = src.stem().string();
    const auto csv = dir / (stem + "-builds.csv");
    const auto json_file = dir / (stem + "-tolerance.json");
    write_tolerance_files(dir, stem, s);
    if (args->json)
      fmt::print("{}\n", tolerance_json(s).dump(2));
    else
      fmt::print("{}", tolerance_text(design, s));
    if (!global.quiet)
      fmt::print(stderr, "sensitivities {:.2f} s, {} builds {:.2f} s ({:.0f} builds/s); written {} and {}\n", s.seconds_sensitivity,
                 s.options.samples, s.seconds_monte_carlo,
                 s.seconds_monte_carlo > 0 ? s.options.samples / s.seconds_monte_carlo : 0.0, csv.string(), json_file.string());
  });
}

}  // namespace coilwright::cli
