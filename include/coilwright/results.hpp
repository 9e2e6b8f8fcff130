#pragma once
// Writing a search's ranked designs: designs.csv, design-NN.toml (complete and reloadable) and
// summary.json. Writers only read finished designs; every file is written atomically.
#include <filesystem>
#include <string>

#include <nlohmann/json.hpp>

#include "coilwright/metrics.hpp"
#include "coilwright/model.hpp"
#include "coilwright/search.hpp"

namespace coilwright {

// The metrics of one design as JSON (keys in SI units; see README "Outputs").
[[nodiscard]] nlohmann::json metrics_json(const Metrics& m);

// The ranked table: rank, every metric, and each free parameter as <coil>.<key> in SI units.
[[nodiscard]] std::string designs_csv(const Model& config, const SearchSummary& summary);

// A machine-readable summary of the run.
[[nodiscard]] nlohmann::json summary_json(const Model& config, const SearchSummary& summary);

// The stem every file of a rank's design starts with (1-based): design-01, ...
[[nodiscard]] std::string design_stem(std::size_t rank);
// The file name of the design of a rank (1-based): design-01.toml, ...
[[nodiscard]] std::string design_file_name(std::size_t rank);
// Its winding schedule, electrical figures and cautions as text: design-01-schedule.txt, ...
[[nodiscard]] std::string schedule_file_name(std::size_t rank);

// Writes every result file into `dir` (created if missing). Only our own file names are
// written; nothing else in the folder is touched.
void write_results(const std::filesystem::path& dir, const Model& config, const SearchSummary& summary);

// True for the names write_results() and the report put in a results folder: designs.csv,
// summary.json, report.html, figures/, design-NN.toml, design-NN-schedule.txt and
// design-NN-<map>.csv/.vtk. Everything else in the folder belongs to the user.
[[nodiscard]] bool is_result_name(const std::string& name);

// Writes the result files and the report (figures/, report.html) as one unit: `dir` then holds
// either its previous complete contents or the new complete set, whatever happens meanwhile
// (see result_folder.hpp); the user's own files in it are kept.
void publish_results(const std::filesystem::path& dir, const Model& config, const SearchSummary& summary);

// Quotes a CSV field when it holds a comma, quote or line break (RFC 4180).
[[nodiscard]] std::string csv_field(std::string_view s);

}  // namespace coilwright
