#pragma once
// The command-line front end: each command parses its arguments, calls the library and prints.
#include <CLI/CLI.hpp>

namespace coilwright::cli {

// Options every command shares.
struct GlobalOptions {
  bool quiet = false;  // no progress or chatter on stderr
  int threads = 0;     // 0 = all cores
};

void add_field_command(CLI::App& app, const GlobalOptions& global);
void add_evaluate_command(CLI::App& app, const GlobalOptions& global);
void add_design_command(CLI::App& app, const GlobalOptions& global);
void add_null_command(CLI::App& app, const GlobalOptions& global);
void add_compare_command(CLI::App& app, const GlobalOptions& global);
void add_calibrate_command(CLI::App& app, const GlobalOptions& global);
void add_tolerance_command(CLI::App& app, const GlobalOptions& global);
void add_report_command(CLI::App& app, const GlobalOptions& global);
void add_map_command(CLI::App& app, const GlobalOptions& global);

}  // namespace coilwright::cli
