// coilwright report: rebuild the figures and the HTML report of a results folder.
// coilwright map: the field of a design on a line, a plane or a 3-D grid, as CSV or VTK.
#include <filesystem>
#include <string>
#include <vector>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field_map.hpp"
#include "coilwright/report.hpp"
#include "coilwright/units.hpp"

namespace coilwright::cli {

namespace {

struct ReportArgs {
  std::string dir;
  bool json = false;
};

struct MapArgs {
  std::string design;
  std::vector<std::string> line;  // two points
  std::string plane;              // xy | xz | yz
  bool grid = false;
  std::string centre = "0,0,0";
  std::string size;
  std::string from, to;
  std::string n;
  std::string out;
  bool json = false;
};

// "a,b,c": each a number in metres or a length with its unit ("120 mm").
std::vector<double> lengths(const std::string& text, std::size_t expected, const char* option) {
  std::vector<double> out;
  std::size_t start = 0;
  while (true) {
    const std::size_t comma = text.find(',', start);
    std::string part = text.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
    const auto b = part.find_first_not_of(' '), e = part.find_last_not_of(' ');
    part = b == std::string::npos ? "" : part.substr(b, e - b + 1);
    std::size_t used = 0;
    double v = 0.0;
    try {
      v = std::stod(part, &used);
    } catch (const std::exception&) {
      used = 0;
    }
    if (used != part.size() || part.empty()) {
      try {
        v = parse_quantity(part, Dimension::length);
      } catch (const InputError&) {
        throw;
      } catch (const std::exception& why) {
        throw InputError(fmt::format("{} '{}': {}", option, text, why.what()));
      }
    }
    if (std::abs(v) > kMaxLengthM)
      throw InputError(fmt::format("{} '{}': {} is {:g} m; accepted: lengths up to {:g} m", option, text, part, v, kMaxLengthM));
    out.push_back(v);
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  if (out.size() != expected)
    throw InputError(fmt::format("{} '{}': found {} comma-separated value(s); accepted: {} lengths in metres or with a unit, "
                                 "e.g. {}", option, text, out.size(), expected, expected == 3 ? "0,0,120mm" : "300mm,300mm"));
  return out;
}

std::vector<int> counts(const std::string& text, std::size_t expected) {
  std::vector<int> out;
  std::size_t start = 0;
  while (true) {
    const std::size_t comma = text.find(',', start);
    const std::string part = text.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
    std::size_t used = 0;
    int v = 0;
    try {
      v = std::stoi(part, &used);
    } catch (const std::exception&) {
      used = 0;
    }
    if (used == 0 || used != part.size())
      throw InputError(fmt::format("--n '{}': '{}' is not a whole number; accepted: counts of at least 1, e.g. 21 or 21,41", text, part));
    if (v < 1) throw InputError(fmt::format("--n '{}': {} is below 1; accepted: counts of at least 1, e.g. 21 or 21,41", text, v));
    out.push_back(v);
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  if (out.size() == 1 && expected > 1) out.resize(expected, out[0]);
  if (out.size() != expected)
    throw InputError(fmt::format("--n '{}': found {} counts; accepted: one count, or {} comma-separated counts", text, out.size(), expected));
  return out;
}

Vec3 vec(const std::vector<double>& v) { return {v[0], v[1], v[2]}; }

}  // namespace

void add_report_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<ReportArgs>();
  auto* cmd = app.add_subcommand("report", "Rebuild the figures and report.html of a results folder");
  cmd->footer("Example:\n  coilwright report results/sensor-calibration-rig\n"
              "Reads summary.json and the design files it lists; writes figures/*.svg and report.html there.");
  cmd->add_option("dir", args->dir, "Results folder written by 'coilwright design'")->required()->check(CLI::ExistingDirectory);
  cmd->add_flag("--json", args->json, "Print one JSON object listing the files written");
  cmd->callback([args, &global] {
    const ReportSummary r = write_report(args->dir);
    if (args->json) {
      nlohmann::json j;
      j["report"] = r.report.string();
      j["designs"] = r.designs;
      j["figures"] = nlohmann::json::array();
      for (const auto& f : r.figures) j["figures"].push_back(f.string());
      fmt::print("{}\n", j.dump(2));
    } else if (!global.quiet) {
      fmt::print("{} ({} designs, {} figures)\n", r.report.string(), r.designs, r.figures.size());
    }
  });
}

namespace {

// The design's own [[map]] tables, written next to it (or into --out) as <stem>-<name>.<format>.
void write_declared_maps(const MapArgs& args, const Model& model, const GlobalOptions& global) {
  if (model.maps.empty())
    throw InputError(fmt::format("map: give one of --line, --plane or --grid; '{}' declares no [[map]] tables", args.design));
  const std::filesystem::path design(args.design);
  const std::filesystem::path dir = args.out.empty() ? design.parent_path() : std::filesystem::path(args.out);
  if (!args.out.empty() && std::filesystem::exists(dir) && !std::filesystem::is_directory(dir))
    throw InputError(fmt::format("map: --out '{}' must be a folder when writing the design's [[map]] tables", args.out));
  const auto files = write_config_maps(dir, design.stem().string(), model);
  if (args.json) {
    nlohmann::json j;
    j["files"] = nlohmann::json::array();
    for (const auto& f : files) j["files"].push_back(f.string());
    fmt::print("{}\n", j.dump(2));
  } else if (!global.quiet) {
    for (const auto& f : files) fmt::print("{}\n", f.string());
  }
}

}  // namespace

void add_map_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<MapArgs>();
  auto* cmd = app.add_subcommand("map", "The field of a design on a line, plane or 3-D grid, as CSV or VTK");
  cmd->footer(
      "Examples:\n"
      "  coilwright map results/sensor-calibration-rig/design-01.toml --line 0,0,-120mm 0,0,120mm --n 241 --out axis.csv\n"
      "  coilwright map results/sensor-calibration-rig/design-01.toml --plane xz --size 300mm,300mm --n 121 --out xz.vtk\n"
      "  coilwright map results/sensor-calibration-rig/design-01.toml --grid --from -0.1,-0.1,-0.1 --to 0.1,0.1,0.1 --n 21 --out box.vtk\n"
      "  coilwright map results/sensor-calibration-rig/design-01.toml   (the design's own [[map]] tables)\n"
      "Without --line, --plane or --grid, every [[map]] of the design is written as <design>-<name>.csv/.vtk into\n"
      "--out (a folder; default: the design's folder).\n"
      "Coordinates are in metres unless a unit is given. Columns: x,y,z [m], Bx,By,Bz,|B| [T], deviation = |B - B_goal| / reference.\n"
      "VTK files are legacy ASCII STRUCTURED_GRID with the vector B and the scalars B_magnitude and deviation.");
  cmd->add_option("design", args->design, "Design or config file (TOML)")->required()->check(CLI::ExistingFile);
  auto* line = cmd->add_option("--line", args->line, "A line from point A to point B: --line x,y,z x,y,z")->expected(2);
  auto* plane = cmd->add_option("--plane", args->plane, "A plane through --centre spanned by two axes")->check(CLI::IsMember({"xy", "xz", "yz"}));
  auto* grid = cmd->add_flag("--grid", args->grid, "An axis-aligned 3-D grid from --from to --to");
  line->excludes(plane)->excludes(grid);
  plane->excludes(grid);
  cmd->add_option("--centre", args->centre, "Plane centre x,y,z (default 0,0,0)");
  cmd->add_option("--size", args->size, "Plane size along its two axes: a,b");
  cmd->add_option("--from", args->from, "Grid corner x,y,z");
  cmd->add_option("--to", args->to, "Opposite grid corner x,y,z");
  cmd->add_option("--n", args->n, "Points per direction: n (all directions) or n1,n2[,n3]");
  cmd->add_option("--out", args->out, "Output file (.csv or .vtk); for the design's [[map]] tables, a folder");
  cmd->add_flag("--json", args->json, "Print one JSON object describing the map");
  cmd->callback([args, &global] {
    const Model model = load_model(args->design);
    if (args->line.empty() && args->plane.empty() && !args->grid) {
      write_declared_maps(*args, model, global);
      return;
    }
    if (args->n.empty()) throw InputError("map: --n is required with --line, --plane or --grid");
    if (args->out.empty()) throw InputError("map: --out is required with --line, --plane or --grid");
    MapLattice lattice;
    if (!args->line.empty()) {
      lattice = line_lattice(vec(lengths(args->line[0], 3, "--line")), vec(lengths(args->line[1], 3, "--line")), counts(args->n, 1)[0]);
    } else if (!args->plane.empty()) {
      if (args->size.empty()) throw InputError("--plane needs --size a,b");
      const auto s = lengths(args->size, 2, "--size");
      const auto n = counts(args->n, 2);
      lattice = plane_lattice(args->plane, vec(lengths(args->centre, 3, "--centre")), s[0], s[1], n[0], n[1]);
    } else if (args->grid) {
      if (args->from.empty() || args->to.empty()) throw InputError("--grid needs --from x,y,z and --to x,y,z");
      const auto n = counts(args->n, 3);
      lattice = grid_lattice(vec(lengths(args->from, 3, "--from")), vec(lengths(args->to, 3, "--to")), {n[0], n[1], n[2]});
    }
    const FieldMap map = compute_field_map(model, lattice);
    write_field_map(args->out, map, model.project.name);
    std::size_t inside = 0;
    double worst = 0.0;
    for (std::size_t i = 0; i < map.points.size(); ++i) {
      inside += map.in_winding[i] ? 1 : 0;
      if (std::isfinite(map.deviation[i])) worst = std::max(worst, map.deviation[i]);
    }
    if (args->json) {
      nlohmann::json j;
      j["file"] = args->out;
      j["kind"] = std::string(to_string(lattice.kind));
      j["points"] = map.points.size();
      j["dimensions"] = lattice.count;
      j["points_in_windings"] = inside;
      j["largest_deviation"] = map.reference_T > 0 ? nlohmann::json(worst) : nlohmann::json(nullptr);  // null without a target
      fmt::print("{}\n", j.dump(2));
    } else if (!global.quiet) {
      fmt::print("{}: {} points ({} on or inside windings, written as nan); largest relative deviation {:.4g}\n", args->out,
                 map.points.size(), inside, worst);
    }
  });
}

}  // namespace coilwright::cli
