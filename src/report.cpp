// The HTML report of a design run, rebuilt from the written result files.
#include "coilwright/report.hpp"

#include <algorithm>
#include <charconv>
#include <chrono>
#include <cmath>
#include <cstdlib>
#include <ctime>
#include <fstream>
#include <iterator>
#include <optional>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "coilwright/atomic_file.hpp"
#include "coilwright/config.hpp"
#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"
#include "coilwright/hardware.hpp"
#include "coilwright/metrics.hpp"
#include "coilwright/text_lines.hpp"

namespace coilwright {

std::string html_escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: out += c;
    }
  }
  return out;
}

namespace detail {
namespace {

// A number with an SI prefix so that 1 <= |mantissa| < 1000.
std::string si(double v, std::string_view unit, int digits = 4) {
  static constexpr struct {
    double scale;
    const char* prefix;
  } kPrefixes[] = {{1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1.0, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}};
  if (v == 0.0 || !std::isfinite(v)) return fmt::format("{:.{}g} {}", v, digits, unit);
  for (const auto& p : kPrefixes)
    if (std::abs(v) >= p.scale * 0.9999999) return fmt::format("{:.{}g} {}{}", v / p.scale, digits, p.prefix, unit);
  return fmt::format("{:.{}g} {}", v, digits, unit);
}

std::string relative(double v) {
  if (!std::isfinite(v)) return "–";
  if (std::abs(v) < 1e-3) return fmt::format("{:.3g} ppm", v * 1e6);
  return fmt::format("{:.3g} %", v * 1e2);
}

double num(const nlohmann::json& j, const char* key, double otherwise = std::nan("")) {
  if (j.is_object() && j.contains(key) && j[key].is_number()) return j[key].get<double>();
  return otherwise;
}

std::string vec_text(const Vec3& v, std::string_view unit) {
  return fmt::format("({}, {}, {})", si(v.x(), unit), si(v.y(), unit), si(v.z(), unit));
}

std::string region_text(const Target& t) {
  switch (t.region) {
    case RegionKind::sphere: return fmt::format("sphere of radius {}", si(t.radius_m, "m"));
    case RegionKind::cylinder: return fmt::format("cylinder of radius {} and length {}", si(t.radius_m, "m"), si(t.length_m, "m"));
    case RegionKind::box:
      return fmt::format("box {} × {} × {}", si(t.size_m.x(), "m"), si(t.size_m.y(), "m"), si(t.size_m.z(), "m"));
    case RegionKind::plane: return fmt::format("plane {} × {}", si(t.size_m.x(), "m"), si(t.size_m.y(), "m"));
    case RegionKind::points: return fmt::format("{} listed points", t.points.size());
  }
  return "?";
}

std::string goal_text(const Target& t) {
  const std::string tol = t.tolerance.relative ? relative(t.tolerance.value) : si(t.tolerance.value, "T");
  switch (t.goal) {
    case Goal::uniform: return fmt::format("uniform field {} within {}", vec_text(t.field_T, "T"), tol);
    case Goal::gradient: return fmt::format("axial gradient {} within {}", si(t.gradient_T_per_m, "T/m"), tol);
    case Goal::null: return fmt::format("cancel the ambient field to within {}", tol);
  }
  return "?";
}

void row(std::string& out, std::string_view name, const std::string& value) {
  out += fmt::format("<tr><th>{}</th><td>{}</td></tr>\n", name, value);
}

std::string goal_section(const Model& m) {
  std::string out = "<section id=\"goal\"><h2>Goal and constraints</h2>\n<table class=\"kv\">\n";
  if (m.target) {
    const Target& t = *m.target;
    row(out, "Target region", html_escape(region_text(t)) + " centred at " + html_escape(vec_text(t.centre_m, "m")));
    row(out, "Goal", html_escape(goal_text(t)));
  } else {
    row(out, "Target", "none declared");
  }
  const SearchOptions& s = m.search;
  row(out, "Objective", html_escape(std::string(to_string(s.objective))));
  if (s.max_outer_radius_m) row(out, "Largest conductor radius", html_escape(si(*s.max_outer_radius_m, "m")));
  if (s.max_half_length_m) row(out, "Largest half-length", html_escape(si(*s.max_half_length_m, "m")));
  if (s.min_bore_radius_m) row(out, "Smallest clear bore radius", html_escape(si(*s.min_bore_radius_m, "m")));
  if (s.min_gap_m) row(out, "Smallest gap between windings", html_escape(si(*s.min_gap_m, "m")));
  if (s.max_ampere_turns) row(out, "Most ampere-turns", html_escape(fmt::format("{:.6g}", *s.max_ampere_turns)));
  for (const StrayLimit& l : s.stray)
    row(out, "Stray-field limit", html_escape(fmt::format("{} at {}", si(l.max_field_T, "T"), vec_text(l.point_m, "m"))));
  out += "</table></section>\n";
  return out;
}

std::string ranked_table(const nlohmann::json& summary) {
  std::string out = "<section id=\"ranking\"><h2>Ranked designs</h2>\n<table class=\"grid\"><thead><tr><th>rank</th><th>feasible</th>"
                    "<th>worst deviation</th><th>RMS deviation</th><th>good-field radius</th><th>order</th><th>ampere-turns</th>";
  std::vector<std::string> params;
  const nlohmann::json& designs = summary.at("designs");
  if (!designs.empty() && designs[0].contains("parameters"))
    for (const auto& [k, v] : designs[0]["parameters"].items()) params.push_back(k);
  for (const std::string& p : params) out += "<th>" + html_escape(p) + "</th>";
  out += "</tr></thead><tbody>\n";
  for (const nlohmann::json& d : designs) {
    const nlohmann::json& m = d.value("metrics", nlohmann::json::object());
    out += fmt::format("<tr><td><a href=\"#design-{0}\">{0}</a></td><td>{1}</td><td>{2}</td><td>{3}</td><td>{4}</td><td>{5}</td>"
                       "<td>{6:.5g}</td>",
                       d.value("rank", 0), d.value("feasible", false) ? "yes" : "<strong>no</strong>",
                       relative(num(m, "worst_relative_deviation")), relative(num(m, "rms_relative_deviation")),
                       si(num(m, "good_field_radius"), "m"), m.contains("order") ? fmt::format("{}", m["order"].get<int>()) : "–",
                       num(m, "ampere_turns"));
    for (const std::string& p : params) {
      const double v = d.contains("parameters") && d["parameters"].contains(p) && d["parameters"][p].is_number()
                           ? d["parameters"][p].get<double>()
                           : std::nan("");
      out += fmt::format("<td>{:.6g}</td>", v);
    }
    out += "</tr>\n";
  }
  out += "</tbody></table>\n<p class=\"note\">Parameters in SI units (metres; turns as counts).</p></section>\n";
  return out;
}

std::string metrics_table(const nlohmann::json& d, const Model& model) {
  const nlohmann::json& m = d.value("metrics", nlohmann::json::object());
  std::string out = "<table class=\"kv\">\n";
  row(out, "Feasible", d.value("feasible", false) ? "yes" : "<strong>no</strong>");
  if (d.contains("broken_constraints"))
    for (const auto& b : d["broken_constraints"]) row(out, "Constraint broken", html_escape(b.get<std::string>()));
  row(out, "Worst deviation", fmt::format("{} ({})", relative(num(m, "worst_relative_deviation")),
                                          html_escape(si(num(m, "worst_absolute_deviation"), "T"))));
  row(out, "RMS deviation", relative(num(m, "rms_relative_deviation")));
  row(out, "Peak to peak", html_escape(si(num(m, "peak_to_peak"), "T")));
  if (m.contains("direction_error")) row(out, "Direction error", fmt::format("{:.4g} mrad", 1e3 * num(m, "direction_error")));
  row(out, "Tolerance", fmt::format("{} — {}", html_escape(si(num(m, "tolerance"), "T")), m.value("meets_tolerance", false) ? "met" : "<strong>not met</strong>"));
  row(out, "Region within tolerance", fmt::format("{:.2f} %", 100 * num(m, "fraction_within_tolerance")));
  row(out, "Good-field sphere radius", html_escape(si(num(m, "good_field_radius"), "m")));
  if (m.contains("good_field_cylinder"))
    row(out, "Good-field cylinder", html_escape(fmt::format("radius {}, length {}", si(num(m["good_field_cylinder"], "radius"), "m"),
                                                            si(num(m["good_field_cylinder"], "length"), "m"))));
  if (m.contains("centre_field") && m["centre_field"].is_array() && m["centre_field"].size() == 3) {
    const Vec3 c(m["centre_field"][0].get<double>(), m["centre_field"][1].get<double>(), m["centre_field"][2].get<double>());
    row(out, "Centre field", html_escape(vec_text(c, "T")));
  }
  if (m.contains("order")) row(out, "Order (first remaining on-axis term)", fmt::format("{}", m["order"].get<int>()));
  row(out, "Ampere-turns", fmt::format("{:.6g}", num(m, "ampere_turns")));
  for (const Circuit& c : model.circuits) row(out, "Current of " + html_escape(c.name), html_escape(si(c.current_A, "A")));
  out += "</table>\n";
  return out;
}

std::string opt_si(const std::optional<double>& v, std::string_view unit) { return v ? html_escape(si(*v, unit)) : "–"; }

std::string hardware_section(const Model& model) {
  bool wired = false;
  for (const Coil& c : model.coils) wired = wired || c.wire.has_value();
  std::string out = "<h4>Winding, electrical and thermal figures</h4>\n";
  if (!wired) return out + "<p>No wire declared: the design is given in ampere-turns only, so resistance, heat and inductance are not computed.</p>\n";
  const HardwareReport hw = hardware_report(model);
  out += "<table class=\"grid\"><thead><tr><th>circuit</th><th>current</th><th>R (20 °C)</th><th>R (hot)</th><th>voltage</th>"
         "<th>power</th><th>inductance</th><th>L/R</th><th>stored energy</th><th>voltage if cut in 1 ms</th></tr></thead><tbody>\n";
  for (const CircuitHardware& c : hw.circuits)
    out += fmt::format("<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>\n",
                       html_escape(c.name), html_escape(si(c.current_A, "A")), opt_si(c.resistance_20C_ohm, "Ω"),
                       opt_si(c.resistance_hot_ohm, "Ω"), opt_si(c.voltage_V, "V"), opt_si(c.power_W, "W"), opt_si(c.inductance_H, "H"),
                       opt_si(c.time_constant_s, "s"), opt_si(c.stored_energy_J, "J"), opt_si(c.switch_off_voltage_1ms_V, "V"));
  out += "</tbody></table>\n<table class=\"grid\"><thead><tr><th>winding</th><th>wire</th><th>temperature rise</th><th>self-inductance</th><th>note</th></tr></thead><tbody>\n";
  for (const CoilHardware& c : hw.coils)
    out += fmt::format("<tr><td>{} ({})</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>\n", html_escape(c.name), c.winding,
                       c.wire ? html_escape(c.wire->label) : "–", c.temperature_rise_K ? fmt::format("{:.3g} K", *c.temperature_rise_K) : "–",
                       opt_si(c.self_inductance_H, "H"), html_escape(c.error.value_or("")));
  out += "</tbody></table>\n";
  if (hw.stored_energy_J) out += fmt::format("<p>Total stored energy: {}.</p>\n", html_escape(si(*hw.stored_energy_J, "J")));
  if (!hw.cautions.empty()) {
    out += "<ul class=\"cautions\">\n";
    for (const Caution& c : hw.cautions)
      out += fmt::format("<li class=\"{}\">{}</li>\n", c.level == Caution::Level::warning ? "warning" : "note", html_escape(c.text));
    out += "</ul>\n";
  }
  out += "<h4>Winding schedule</h4>\n<pre>" + html_escape(format_winding_schedule(hw)) + "</pre>\n";
  return out;
}

std::string figure_html(const Figure& f, const std::string& id) {
  return fmt::format("<figure id=\"{}\" class=\"plot\">{}<figcaption>{}</figcaption></figure>\n", html_escape(id), inline_svg(f.svg),
                     html_escape(f.caption));
}

// The worst_relative_deviation column of a tolerance study's builds CSV; empty without the file.
std::vector<double> worst_deviation_of_builds(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  std::vector<double> out;
  if (!in) return out;
  // Read with the CSV readers' rules (BOM, CRLF, quoting, binary refused), a block at a time.
  LineReader lines(in, file.string());
  constexpr std::string_view kKey = "worst_relative_deviation";
  std::string_view line;
  std::optional<std::size_t> column;
  while (lines.next(line)) {
    if (line.empty() || line.front() == '#') continue;
    std::vector<detail::CsvField> fields;
    try {
      fields = detail::split_csv_fields(line);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{file.string(), lines.line_number(), e.where().column}, "", e.what());
    }
    if (!column) {
      for (std::size_t k = 0; k < fields.size() && !column; ++k)
        if (fields[k].text == kKey) column = k;
      if (!column)
        throw InputError(SourceLocation{file.string(), lines.line_number(), 1}, std::string(kKey),
                         "the builds CSV has no such column; accepted: the file 'coilwright tolerance' writes");
      continue;
    }
    const std::string text = *column < fields.size() ? fields[*column].text : std::string();
    double v = 0.0;
    const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
    if (text.empty() || ec != std::errc{} || end != text.data() + text.size() || !std::isfinite(v))
      throw InputError(SourceLocation{file.string(), lines.line_number(), *column < fields.size() ? fields[*column].column : line.size() + 1},
                       std::string(kKey), fmt::format("found \"{}\"; accepted: a finite number", text));
    out.push_back(v);
  }
  return out;
}

constexpr const char* kStyle = R"(
body{font-family:system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;max-width:64rem;margin:2rem auto;padding:0 1rem;color:#1b1b1b;line-height:1.45}
h1{font-size:1.6rem;margin-bottom:.2rem}h2{border-bottom:1px solid #ccd;padding-bottom:.2rem;margin-top:2.2rem}
table{border-collapse:collapse;margin:.6rem 0;font-size:.92rem}th,td{padding:.25rem .6rem;text-align:left;vertical-align:top}
table.grid th,table.grid td{border:1px solid #d4d8e0}table.grid thead th{background:#eef2f8}
table.kv th{font-weight:600;padding-right:1.2rem;color:#334}
figure.plot{display:inline-block;margin:.6rem 1rem .6rem 0;max-width:100%;vertical-align:top}
figure.plot svg{width:300pt;max-width:100%;height:auto;border:1px solid #e2e5ea}
figcaption{font-size:.85rem;color:#444;max-width:300pt}
pre{background:#f6f7f9;border:1px solid #e2e5ea;padding:.6rem;overflow-x:auto;font-size:.8rem}
.cautions li.warning{color:#8a1020;font-weight:600}.note{color:#555;font-size:.88rem}
section.safety{background:#fff7e8;border:1px solid #e8c77a;padding:.2rem 1rem 1rem;margin-top:2rem}
@media print{figure.plot{page-break-inside:avoid}}
)";

}  // namespace
}  // namespace detail

using namespace detail;

std::string report_html(const nlohmann::json& summary, const std::vector<Model>& designs,
                        const std::vector<std::vector<Figure>>& figures, const Figure* comparison) {
  const std::string project = summary.value("project", designs.empty() ? std::string("coilwright") : designs[0].project.name);
  // SOURCE_DATE_EPOCH (the reproducible-builds.org convention) fixes the date, so regenerated
  // results can be byte-identical.
  std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  if (const char* epoch = std::getenv("SOURCE_DATE_EPOCH"); epoch && *epoch) {
    char* end = nullptr;
    const long long v = std::strtoll(epoch, &end, 10);
    if (end && *end == '\0' && v >= 0) now = static_cast<std::time_t>(v);
  }
  char date[32];
  std::strftime(date, sizeof date, "%Y-%m-%d %H:%M UTC", std::gmtime(&now));
  std::string out = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
                    "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
  out += fmt::format("<title>{} — coilwright report</title>\n<style>{}</style>\n</head>\n<body>\n", html_escape(project), kStyle);
  out += fmt::format("<header><h1 id=\"project\">{}</h1>\n", html_escape(project));
  if (!designs.empty() && !designs[0].project.description.empty())
    out += fmt::format("<p class=\"description\">{}</p>\n", html_escape(designs[0].project.description));
  out += fmt::format("<p class=\"note\">coilwright {} ({}); config {}; seed {}; search stopped: {}; {} evaluations; page made {}.</p></header>\n",
                     html_escape(COILWRIGHT_VERSION), html_escape(COILWRIGHT_GIT_REVISION), html_escape(summary.value("config", std::string("?"))),
                     summary.contains("seed") ? summary["seed"].dump() : "?", html_escape(summary.value("stop_reason", std::string("?"))),
                     summary.contains("evaluations") ? summary["evaluations"].dump() : "?", date);
  if (!designs.empty()) out += goal_section(designs[0]);
  out += ranked_table(summary);
  if (comparison) out += figure_html(*comparison, "figure-compare");
  const nlohmann::json& listed = summary.at("designs");
  for (std::size_t r = 0; r < designs.size(); ++r) {
    out += fmt::format("<section class=\"design\" id=\"design-{0}\"><h2>Design {0}</h2>\n", r + 1);
    out += "<h4>Metrics</h4>\n" + metrics_table(r < listed.size() ? listed[r] : nlohmann::json::object(), designs[r]);
    out += "<h4>Figures</h4>\n<div class=\"figures\">\n";
    if (r < figures.size())
      for (const Figure& f : figures[r]) out += figure_html(f, fmt::format("figure-{}-{}", r + 1, f.name));
    out += "</div>\n" + hardware_section(designs[r]) + "</section>\n";
  }
  out += R"(<section class="safety" id="cautions"><h2>Cautions</h2>
<ul>
<li>Windings carrying these currents heat up: check the predicted temperature rise against the insulation class of the wire, allow for poor cooling, and watch the winding temperature on first power-up.</li>
<li>An inductive winding stores energy (figures above). Breaking its current suddenly makes a high voltage spike: give every circuit a freewheel path or a controlled ramp-down, and never open a live circuit.</li>
<li>Strong fields can disturb pacemakers and other implanted medical devices and can pull ferromagnetic tools and parts; mark the area and keep such items away while the coils are energised.</li>
<li>These figures are design aids computed from an idealised model, not a safety certification: follow your local electrical codes and licensed practice for supplies, wiring and protection.</li>
</ul></section>
</body>
</html>
)";
  return out;
}

ReportSummary write_report(const std::filesystem::path& dir, const FigureOptions& options) {
  const std::filesystem::path summary_file = dir / "summary.json";
  std::ifstream in(summary_file, std::ios::binary);
  if (!in)
    throw InputError(SourceLocation{summary_file.string()}, "",
                     "cannot read the file; accepted: a results folder written by 'coilwright design' (it holds summary.json)");
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  nlohmann::json summary;
  try {
    summary = nlohmann::json::parse(text);
  } catch (const nlohmann::json::parse_error& e) {
    // nlohmann's byte is 1-based and points at the character that broke the parse.
    const std::size_t at = std::min<std::size_t>(e.byte > 0 ? e.byte - 1 : 0, text.size());
    const std::size_t line = 1 + static_cast<std::size_t>(std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(at), '\n'));
    const std::size_t line_start = text.rfind('\n', at == 0 ? 0 : at - 1);
    const std::size_t column = at == 0 || line_start == std::string::npos ? at + 1 : at - line_start;
    std::string why = e.what();
    if (const auto colon = why.find(": "); colon != std::string::npos) why = why.substr(colon + 2);  // drop nlohmann's own location
    throw InputError(SourceLocation{summary_file.string(), line, column}, "",
                     fmt::format("not valid JSON: {}; accepted: the summary.json that 'coilwright design' writes", why));
  }
  if (!summary.is_object() || !summary.contains("designs") || !summary["designs"].is_array())
    throw InputError(SourceLocation{summary_file.string(), 0, 0}, "designs",
                     "summary.json has no 'designs' list; accepted: the summary.json that 'coilwright design' writes");
  std::vector<Model> designs;
  for (const nlohmann::json& d : summary["designs"]) {
    if (!d.is_object() || !d.contains("file") || !d["file"].is_string())
      throw InputError(SourceLocation{summary_file.string(), 0, 0}, "designs.file",
                       "a design entry names no file; accepted: {\"file\": \"design-01.toml\", ...}");
    const std::string name = d["file"].get<std::string>();
    if (name.find('/') != std::string::npos || name.find("..") != std::string::npos)
      throw InputError(SourceLocation{summary_file.string(), 0, 0}, "designs.file",
                       fmt::format("'{}' is not a plain file name; accepted: a file in the results folder, e.g. design-01.toml", name));
    if (!std::filesystem::exists(dir / name))
      throw InputError(SourceLocation{summary_file.string(), 0, 0}, "designs.file",
                       fmt::format("'{}' is listed but not in the folder; accepted: the results folder as 'coilwright design' wrote it",
                                   name));
    designs.push_back(load_model(dir / name));
  }
  ReportSummary result;
  result.designs = designs.size();
  std::vector<std::vector<Figure>> figures;
  for (std::size_t r = 0; r < designs.size(); ++r) {
    figures.push_back(design_figures(designs[r], options));
    // A tolerance study written next to the design (coilwright tolerance design-NN.toml --out dir).
    const std::vector<double> worst = worst_deviation_of_builds(dir / fmt::format("design-{:02}-builds.csv", r + 1));
    if (!worst.empty() && designs[r].target) {
      const GoalSpec goal = GoalSpec::from(*designs[r].target);
      figures.back().push_back(worst_deviation_histogram(worst, goal.tolerance_T / goal.reference_T, options));
    }
    for (const Figure& f : figures.back()) {
      const auto path = dir / "figures" / fmt::format("design-{:02}-{}.svg", r + 1, f.name);
      write_file_atomic(path, f.svg);
      result.figures.push_back(path);
    }
  }
  std::optional<Figure> comparison;
  if (!designs.empty() && designs[0].target) {
    comparison = profile_comparison_figure(designs, options);
    const auto path = dir / "figures" / "compare.svg";
    write_file_atomic(path, comparison->svg);
    result.figures.push_back(path);
  }
  result.report = dir / "report.html";
  write_file_atomic(result.report, report_html(summary, designs, figures, comparison ? &*comparison : nullptr));
  return result;
}

}  // namespace coilwright
