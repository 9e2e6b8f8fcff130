// coilwright design: search a config's free parameters and write ranked designs.
#include <csignal>
#include <filesystem>
#include <string>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "display.hpp"
#include "progress.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/result_folder.hpp"
#include "coilwright/results.hpp"
#include "coilwright/search.hpp"

namespace coilwright::cli {

namespace {

std::atomic<bool> g_stop{false};

extern "C" void on_stop_signal(int) {
  g_stop.store(true);
  // A second Ctrl-C ends the process at once.
  std::signal(SIGINT, SIG_DFL);
  std::signal(SIGTERM, SIG_DFL);
}

struct DesignArgs {
  std::string config;
  std::string out;
  bool json = false;
};

void print_table(const Model& config, const SearchSummary& summary) {
  fmt::print("{:>4}  {:>9}  {:>12}  {:>12}  {:>12}  {:>5}  {:>12}", "rank", "feasible", "worst", "rms", "good r [mm]", "order",
             "ampere-turns");
  for (const FreeParameter& p : config.free_parameters) fmt::print("  {:>14}", p.label(config.coils));
  fmt::print("\n");
  for (std::size_t r = 0; r < summary.designs.size(); ++r) {
    const Design& d = summary.designs[r];
    const Metrics& m = d.metrics;
    fmt::print("{:>4}  {:>9}  {:>12.4e}  {:>12.4e}  {:>12.3f}  {:>5}  {:>12.5g}", r + 1, d.constraints.feasible() ? "yes" : "NO",
               m.worst_relative_deviation, m.rms_relative_deviation, m.good_field_radius_m * 1e3,
               m.order ? fmt::format("{}", *m.order) : "-", m.ampere_turns);
    for (const FreeParameter& p : config.free_parameters) fmt::print("  {:>14.8g}", get(d.model.coils[p.coil], p.key));
    fmt::print("\n");
  }
}

}  // namespace

void add_design_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<DesignArgs>();
  auto* cmd = app.add_subcommand("design", "Search a config's free parameters and write ranked designs");
  cmd->footer(
      "Example:\n  coilwright design configs/sensor-calibration-rig.toml --out results/sensor-calibration-rig\n"
      "Writes designs.csv, design-01.toml, ..., summary.json, figures/*.svg and report.html into the output folder\n"
      "(default: results/<project name>/) as one unit: the folder holds either the previous complete results or the new\n"
      "ones, never a mix, and files in it that coilwright does not write are kept. Ctrl-C or SIGTERM stops the search\n"
      "and writes the best designs so far.");
  cmd->add_option("config", args->config, "Config file (TOML)")->required()->check(CLI::ExistingFile);
  cmd->add_option("--out", args->out, "Output folder (default: results/<project name>)");
  cmd->add_flag("--json", args->json, "Print the run's summary (as in summary.json) instead of the table");
  cmd->callback([args, &global] {
    const Model config = load_model(args->config);
    // The project name is free text: only a safe form of it becomes a folder name.
    const std::filesystem::path out = args->out.empty() ? std::filesystem::path("results") / safe_folder_name(config.project.name)
                                                           : std::filesystem::path(args->out);
    probe_folder(out);  // an unwritable folder is reported now, not after a long search
    Progress progress("searching", global.quiet);
    SearchHooks hooks;
    hooks.stop = &g_stop;
    hooks.progress = [&progress](long done, long total, double best) {
      progress.update(static_cast<double>(done), static_cast<double>(total), fmt::format("best {:.4e}", best));
    };
    std::signal(SIGINT, on_stop_signal);
    std::signal(SIGTERM, on_stop_signal);
    const SearchSummary summary = run_search(config, hooks);
    progress.finish();
    publish_results(out, config, summary);  // designs, tables, maps, figures and report, as one unit
    std::signal(SIGINT, SIG_DFL);
    std::signal(SIGTERM, SIG_DFL);
    if (args->json)
      fmt::print("{}\n", summary_json(config, summary).dump(2));
    else
      print_table(config, summary);
    if (!global.quiet) fmt::print(stderr, "{}\nwritten to {}\n", summary.one_line(), out.string());
    if (summary.reason == StopReason::interrupted) throw Interrupted();
  });
}

}  // namespace coilwright::cli
