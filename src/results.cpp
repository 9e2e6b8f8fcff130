#include "coilwright/results.hpp"

#include <cctype>
#include <string_view>

#include <fmt/format.h>

#include "coilwright/atomic_file.hpp"
#include "coilwright/config.hpp"
#include "coilwright/design_writer.hpp"
#include "coilwright/field_map.hpp"
#include "coilwright/hardware.hpp"
#include "coilwright/report.hpp"
#include "coilwright/result_folder.hpp"

namespace coilwright {

namespace {

struct Column {
  const char* name;
  double (*get)(const Metrics&);
};

// The metric columns of designs.csv, in order; units in the names where they have one.
const Column kMetricColumns[] = {
    {"worst_relative_deviation", [](const Metrics& m) { return m.worst_relative_deviation; }},
    {"worst_absolute_deviation_T", [](const Metrics& m) { return m.worst_absolute_deviation_T; }},
    {"rms_relative_deviation", [](const Metrics& m) { return m.rms_relative_deviation; }},
    {"peak_to_peak_T", [](const Metrics& m) { return m.peak_to_peak_T; }},
    {"peak_to_peak_relative", [](const Metrics& m) { return m.peak_to_peak_relative; }},
    {"direction_error_rad", [](const Metrics& m) { return m.direction_error_rad.value_or(0.0); }},
    {"fraction_within_tolerance", [](const Metrics& m) { return m.fraction_within_tolerance; }},
    {"good_field_radius_m", [](const Metrics& m) { return m.good_field_radius_m; }},
    {"good_field_cylinder_radius_m", [](const Metrics& m) { return m.good_field_cylinder_radius_m; }},
    {"good_field_cylinder_length_m", [](const Metrics& m) { return m.good_field_cylinder_length_m; }},
    {"centre_field_T", [](const Metrics& m) { return m.centre_field_T.norm(); }},
    {"ampere_turns", [](const Metrics& m) { return m.ampere_turns; }},
};

}  // namespace

std::string csv_field(std::string_view s) {
  if (s.find_first_of(",\"\r\n") == std::string_view::npos) return std::string(s);
  std::string out = "\"";
  for (char c : s) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + "\"";
}

nlohmann::json metrics_json(const Metrics& m) {
  nlohmann::json j;
  j["worst_relative_deviation"] = m.worst_relative_deviation;
  j["worst_absolute_deviation"] = m.worst_absolute_deviation_T;
  j["rms_relative_deviation"] = m.rms_relative_deviation;
  j["peak_to_peak"] = m.peak_to_peak_T;
  j["peak_to_peak_relative"] = m.peak_to_peak_relative;
  if (m.direction_error_rad) j["direction_error"] = *m.direction_error_rad;
  j["fraction_within_tolerance"] = m.fraction_within_tolerance;
  j["good_field_radius"] = m.good_field_radius_m;
  j["good_field_cylinder"] = {{"radius", m.good_field_cylinder_radius_m}, {"length", m.good_field_cylinder_length_m}};
  j["centre_field"] = {m.centre_field_T.x(), m.centre_field_T.y(), m.centre_field_T.z()};
  j["reference_field"] = m.reference_T;
  j["tolerance"] = m.tolerance_T;
  j["meets_tolerance"] = m.meets_tolerance();
  j["ampere_turns"] = m.ampere_turns;
  j["zonal_coefficients"] = m.zonal;
  j["zonal_scale"] = m.zonal_scale_m;
  if (m.order) j["order"] = *m.order;
  return j;
}

std::string design_stem(std::size_t rank) { return fmt::format("design-{:02}", rank); }
std::string design_file_name(std::size_t rank) { return design_stem(rank) + ".toml"; }
std::string schedule_file_name(std::size_t rank) { return fmt::format("design-{:02}-schedule.txt", rank); }

std::string designs_csv(const Model& config, const SearchSummary& summary) {
  std::string out = "rank,feasible,objective,order";
  for (const Column& c : kMetricColumns) out += fmt::format(",{}", c.name);
  for (const FreeParameter& p : config.free_parameters) out += "," + csv_field(p.label(config.coils));
  for (const Circuit& c : config.circuits) out += "," + csv_field(c.name + ".current");
  const bool yields = !summary.designs.empty() && summary.designs.front().yield.has_value();  // rank_by = "yield"
  if (yields) out += ",yield,yield_standard_error";
  out += "\n";
  for (std::size_t r = 0; r < summary.designs.size(); ++r) {
    const Design& d = summary.designs[r];
    out += fmt::format("{},{},{:.17g},{}", r + 1, d.constraints.feasible() ? 1 : 0, d.objective,
                       d.metrics.order ? fmt::format("{}", *d.metrics.order) : "");
    for (const Column& c : kMetricColumns) out += fmt::format(",{:.17g}", c.get(d.metrics));
    for (const FreeParameter& p : config.free_parameters) out += fmt::format(",{:.17g}", get(d.model.coils[p.coil], p.key));
    for (const Circuit& c : d.model.circuits) out += fmt::format(",{:.17g}", c.current_A);
    if (yields) out += fmt::format(",{:.17g},{:.17g}", d.yield.value_or(0.0), d.yield_standard_error.value_or(0.0));
    out += "\n";
  }
  return out;
}

nlohmann::json summary_json(const Model& config, const SearchSummary& summary) {
  nlohmann::json j;
  j["tool"] = {{"name", "coilwright"}, {"version", COILWRIGHT_VERSION}, {"revision", COILWRIGHT_GIT_REVISION}};
  j["format_version"] = 1;
  j["project"] = config.project.name;
  j["config"] = config.source_file;
  j["objective"] = std::string(to_string(config.search.objective));
  j["seed"] = config.search.seed;
  j["stop_reason"] = std::string(to_string(summary.reason));
  j["evaluations"] = summary.evaluations;
  j["designs"] = nlohmann::json::array();
  for (std::size_t r = 0; r < summary.designs.size(); ++r) {
    const Design& d = summary.designs[r];
    nlohmann::json e;
    e["rank"] = r + 1;
    e["file"] = design_file_name(r + 1);
    e["maps"] = nlohmann::json::array();
    for (const MapRequest& m : d.model.maps)
      for (const MapFormat f : m.formats) e["maps"].push_back(map_file_name(design_stem(r + 1), m, f));
    e["feasible"] = d.constraints.feasible();
    e["broken_constraints"] = d.constraints.broken;
    e["objective"] = d.objective;
    e["rounding_cost"] = d.rounding_cost();
    if (d.yield) e["yield"] = {{"value", *d.yield}, {"standard_error", d.yield_standard_error.value_or(0.0)}};
    e["metrics"] = metrics_json(d.metrics);
    nlohmann::json params = nlohmann::json::object();
    for (const FreeParameter& p : config.free_parameters) params[p.label(config.coils)] = get(d.model.coils[p.coil], p.key);
    e["parameters"] = params;
    nlohmann::json currents = nlohmann::json::object();
    for (const Circuit& c : d.model.circuits) currents[c.name] = c.current_A;
    e["currents"] = currents;
    j["designs"].push_back(e);
  }
  return j;
}

void write_results(const std::filesystem::path& dir, const Model& config, const SearchSummary& summary) {
  // Designs first, the table and summary last: a reader that finds summary.json finds the rest.
  for (std::size_t r = 0; r < summary.designs.size(); ++r) {
    const Model& design = summary.designs[r].model;
    write_file_atomic(dir / design_file_name(r + 1), write_model_toml(design));
    // The winding schedule (with its cautions) travels with every design.
    write_file_atomic(dir / schedule_file_name(r + 1), format_winding_schedule(hardware_report(design)));
    (void)write_config_maps(dir, design_stem(r + 1), design);
  }
  write_file_atomic(dir / "designs.csv", designs_csv(config, summary));
  write_file_atomic(dir / "summary.json", summary_json(config, summary).dump(2) + "\n");
}

bool is_result_name(const std::string& name) {
  if (name == "designs.csv" || name == "summary.json" || name == "report.html" || name == "figures") return true;
  // design-NN followed by ".toml", "-schedule.txt" or "-<map name>.csv|.vtk"
  if (name.size() < 9 || name.rfind("design-", 0) != 0) return false;
  std::size_t i = 7;
  while (i < name.size() && std::isdigit(static_cast<unsigned char>(name[i]))) ++i;
  if (i < 9) return false;
  const std::string rest = name.substr(i);
  const auto ends_with = [&rest](std::string_view tail) { return rest.size() > tail.size() + 1 && rest.compare(rest.size() - tail.size(), tail.size(), tail) == 0; };
  return rest == ".toml" || rest == "-schedule.txt" || (rest[0] == '-' && (ends_with(".csv") || ends_with(".vtk")));
}

void publish_results(const std::filesystem::path& dir, const Model& config, const SearchSummary& summary) {
  publish_folder(
      dir,
      [&](const std::filesystem::path& staging) {
        write_results(staging, config, summary);
        (void)write_report(staging);  // figures/*.svg and report.html, from the files just written
      },
      is_result_name);
}

}  // namespace coilwright
