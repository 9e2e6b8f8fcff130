#include "coilwright/design_writer.hpp"

#include <algorithm>
#include <cmath>
#include <iterator>
#include <vector>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "coilwright/config.hpp"

namespace coilwright {

std::string toml_quoted(std::string_view s) {
  std::string out = "\"";
  for (const char ch : s) {
    const auto c = static_cast<unsigned char>(ch);
    switch (ch) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\b': out += "\\b"; break;
      case '\t': out += "\\t"; break;
      case '\n': out += "\\n"; break;
      case '\f': out += "\\f"; break;
      case '\r': out += "\\r"; break;
      default:
        if (c < 0x20 || c == 0x7f)
          out += fmt::format("\\u{:04X}", static_cast<unsigned>(c));
        else
          out.push_back(ch);  // UTF-8 passes through unchanged
    }
  }
  return out + "\"";
}

namespace detail {
namespace {

// A quantity as a unit string in the SI unit, exact to the last bit.
std::string q(double v, std::string_view unit) { return toml_quoted(fmt::format("{:.17g} {}", v, unit)); }
std::string num(double v) { return fmt::format("{:.17g}", v); }

std::string vec(const Vec3& v, std::string_view unit) {
  return fmt::format("[{}, {}, {}]", q(v.x(), unit), q(v.y(), unit), q(v.z(), unit));
}
std::string dir(const Vec3& v) { return fmt::format("[{}, {}, {}]", num(v.x()), num(v.y()), num(v.z())); }

void write_coil(std::string& out, const Coil& c) {
  auto line = [&out](std::string_view key, const std::string& value) { out += fmt::format("{} = {}\n", key, value); };
  out += "\n[[coil]]\n";
  line("name", toml_quoted(c.name));
  line("shape", toml_quoted(to_string(c.shape)));
  line("circuit", toml_quoted(c.circuit));
  line("centre", vec(c.centre_m, "m"));
  line("axis", dir(c.axis));
  line("turns", fmt::format("{}", std::llround(c.turns)));
  switch (c.shape) {
    case Shape::loop: line("radius", q(c.radius_m, "m")); break;
    case Shape::pack:
      line("inner_radius", q(c.inner_radius_m, "m"));
      line("outer_radius", q(c.outer_radius_m, "m"));
      line("width", q(c.width_m, "m"));
      break;
    case Shape::solenoid:
      if (c.multilayer()) {
        line("inner_radius", q(c.inner_radius_m, "m"));
        line("outer_radius", q(c.outer_radius_m, "m"));
      } else {
        line("radius", q(c.radius_m, "m"));
      }
      line("length", q(c.length_m, "m"));
      break;
    case Shape::rectangle:
      line("width", q(c.width_m, "m"));
      line("height", q(c.height_m, "m"));
      line("width_axis", dir(c.width_axis));
      if (c.thick_rectangle()) line("cross_section", fmt::format("[{}, {}]", q(c.depth_m, "m"), q(c.thickness_m, "m")));
      break;
    case Shape::polygon: {
      out += "vertices = [\n";
      for (const auto& v : c.vertices_m) out += fmt::format("  {},\n", vec(v, "m"));
      out += "]\n";
      break;
    }
  }
  if (c.is_pair()) {
    line("separation", q(*c.separation_m, "m"));
    line("opposed", c.opposed ? "true" : "false");
  }
  if (c.wire) line("wire", wire_toml(*c.wire));
}

// The keys of a tolerance set, "key = value" each, in config order.
std::vector<std::string> tolerance_entries(const ToleranceSpec& t) {
  std::vector<std::string> e;
  if (t.position_m) e.push_back("position = " + q(*t.position_m, "m"));
  if (t.tilt_rad) e.push_back("tilt = " + q(*t.tilt_rad, "rad"));
  if (t.radius_m) e.push_back("radius = " + q(*t.radius_m, "m"));
  if (t.turns) e.push_back("turns = " + num(*t.turns));
  if (t.current_relative) e.push_back("current = " + toml_quoted(num(*t.current_relative)));
  if (t.wire_diameter_m) e.push_back("wire_diameter = " + q(*t.wire_diameter_m, "m"));
  if (t.distribution) e.push_back("distribution = " + toml_quoted(to_string(*t.distribution)));
  return e;
}

void write_target(std::string& out, const Target& t) {
  auto line = [&out](std::string_view key, const std::string& value) { out += fmt::format("{} = {}\n", key, value); };
  out += "\n[target]\n";
  line("region", toml_quoted(to_string(t.region)));
  line("centre", vec(t.centre_m, "m"));
  line("axis", dir(t.axis));
  switch (t.region) {
    case RegionKind::sphere: line("radius", q(t.radius_m, "m")); break;
    case RegionKind::cylinder:
      line("radius", q(t.radius_m, "m"));
      line("length", q(t.length_m, "m"));
      break;
    case RegionKind::box:
      line("reference", dir(t.reference));
      line("size", vec(t.size_m, "m"));
      break;
    case RegionKind::plane:
      line("reference", dir(t.reference));
      line("size", fmt::format("[{}, {}]", q(t.size_m.x(), "m"), q(t.size_m.y(), "m")));
      break;
    case RegionKind::points: line("file", toml_quoted(t.points_file)); break;
  }
  line("goal", toml_quoted(to_string(t.goal)));
  if (t.goal == Goal::uniform) line("field", vec(t.field_T, "T"));
  if (t.goal == Goal::gradient) line("gradient", q(t.gradient_T_per_m, "T/m"));
  line("tolerance", t.tolerance.relative ? toml_quoted(num(t.tolerance.value)) : q(t.tolerance.value, "T"));
  if (t.resolution > 0) line("resolution", fmt::format("{}", t.resolution));
  if (t.ambient) {
    out += "\n[target.ambient]\n";
    line("uniform", vec(t.ambient->uniform_T, "T"));
    out += "gradient = [\n";
    for (Eigen::Index i = 0; i < 3; ++i) out += fmt::format("  {},\n", vec(t.ambient->gradient_T_per_m.row(i).transpose(), "T/m"));
    out += "]\n";
  }
}

void write_search(std::string& out, const SearchOptions& s) {
  auto line = [&out](std::string_view key, const std::string& value) { out += fmt::format("{} = {}\n", key, value); };
  out += "\n[search]\n";
  line("objective", toml_quoted(to_string(s.objective)));
  line("seed", fmt::format("{}", s.seed));
  line("global", toml_quoted(s.global_algorithm));
  line("local", toml_quoted(s.local_algorithm));
  line("starts", fmt::format("{}", s.starts));
  line("max_evaluations", fmt::format("{}", s.max_evaluations));
  line("max_time", q(s.max_time_s, "s"));
  line("designs", fmt::format("{}", s.designs));
  if (s.max_outer_radius_m) line("max_outer_radius", q(*s.max_outer_radius_m, "m"));
  if (s.max_half_length_m) line("max_half_length", q(*s.max_half_length_m, "m"));
  if (s.min_bore_radius_m) line("min_bore_radius", q(*s.min_bore_radius_m, "m"));
  if (s.min_gap_m) line("min_gap", q(*s.min_gap_m, "m"));
  if (s.max_ampere_turns) line("max_ampere_turns", q(*s.max_ampere_turns, "A"));
  if (s.rank_by != RankBy::objective) line("rank_by", toml_quoted(to_string(s.rank_by)));
  if (s.rank_by != RankBy::objective || s.yield_samples != SearchOptions{}.yield_samples)
    line("yield_samples", fmt::format("{}", s.yield_samples));
  for (const auto& st : s.stray) {
    out += "\n[[search.stray]]\n";
    line("point", vec(st.point_m, "m"));
    line("max_field", q(st.max_field_T, "T"));
  }
}

void write_map(std::string& out, const MapRequest& r) {
  auto line = [&out](std::string_view key, const std::string& value) { out += fmt::format("{} = {}\n", key, value); };
  out += "\n[[map]]\n";
  line("name", toml_quoted(r.name));
  line("kind", toml_quoted(to_string(r.kind)));
  int dims = 3;
  if (r.kind == MapKind::plane) {
    dims = 2;
    line("plane", toml_quoted(r.plane));
    line("centre", vec(r.centre_m, "m"));
    line("size", fmt::format("[{}, {}]", q(r.size_m[0], "m"), q(r.size_m[1], "m")));
  } else {
    dims = r.kind == MapKind::line ? 1 : 3;
    line("from", vec(r.from_m, "m"));
    line("to", vec(r.to_m, "m"));
  }
  std::vector<std::string> counts;
  for (int d = 0; d < dims; ++d) counts.push_back(fmt::format("{}", r.points[static_cast<std::size_t>(d)]));
  line("points", dims == 1 ? counts[0] : fmt::format("[{}]", fmt::join(counts, ", ")));
  std::vector<std::string> formats;
  for (const MapFormat f : r.formats) formats.push_back(toml_quoted(to_string(f)));
  line("format", fmt::format("[{}]", fmt::join(formats, ", ")));
}

}  // namespace
}  // namespace detail

std::string write_model_toml(const Model& model) {
  using detail::q;
  std::string out;
  out += fmt::format("# coilwright design file, format version {}\n", design_format_version);
  out += fmt::format("# written by coilwright {} (git {})\n", COILWRIGHT_VERSION, COILWRIGHT_GIT_REVISION);
  if (!model.source_file.empty()) out += fmt::format("# from {}\n", model.source_file);
  out += "# Every quantity is in SI units with 17 significant digits; free parameters and solved\n"
         "# currents are written as the fixed values of this design.\n";
  out += "\n[project]\n";
  out += fmt::format("name = {}\n", toml_quoted(model.project.name));
  out += fmt::format("description = {}\n", toml_quoted(model.project.description));
  for (const auto& c : model.circuits) {
    out += "\n[[circuit]]\n";
    out += fmt::format("name = {}\n", toml_quoted(c.name));
    out += fmt::format("current = {}\n", q(c.current_A, "A"));
    if (c.supply) out += fmt::format("supply = {}\n", supply_toml(*c.supply));
  }
  for (const auto& c : model.coils) {
    detail::write_coil(out, c);
    if (const auto it = model.tolerances.per_coil.find(c.name); it != model.tolerances.per_coil.end()) {
      std::string inline_table;
      for (const auto& e : detail::tolerance_entries(it->second)) inline_table += (inline_table.empty() ? "" : ", ") + e;
      out += fmt::format("tolerance = {{ {} }}\n", inline_table);
    }
  }
  if (model.target) detail::write_target(out, *model.target);
  detail::write_search(out, model.search);
  // [hardware] when it matters: any coil has a wire, or a setting differs from its default.
  const std::string hardware = hardware_toml(model.hardware);
  const bool wired = std::any_of(model.coils.begin(), model.coils.end(), [](const Coil& c) { return c.wire.has_value(); });
  if (wired || hardware != hardware_toml(HardwareOptions{})) out += "\n[hardware]\n" + hardware;
  if (model.tolerances.global) {
    out += "\n[tolerance]\n";
    for (const auto& e : detail::tolerance_entries(*model.tolerances.global)) out += e + "\n";
  }
  for (const MapRequest& r : model.maps) detail::write_map(out, r);
  return out;
}

}  // namespace coilwright
