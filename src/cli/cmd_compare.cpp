// coilwright compare: a measured field map against the design's model, and the cage's headroom.
#include <algorithm>
#include <filesystem>
#include <iterator>
#include <string>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "display.hpp"
#include "coilwright/ambient_fit.hpp"
#include "coilwright/atomic_file.hpp"
#include "coilwright/comparison.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/nulling.hpp"
#include "coilwright/survey.hpp"

namespace coilwright::cli {

namespace {

struct CompareArgs {
  std::string design;
  std::string measured;
  std::string background;
  std::string limits;
  std::string out;
  int degree = 2;
  bool json = false;
};

std::string comparison_csv(const CompareArgs& args, const MapComparison& c) {
  std::string out = fmt::format(
      "# coilwright {} ({}) compare: {} against the map {}{}\n"
      "# difference = measured - model\n"
      "x[m],y[m],z[m],model_Bx[T],model_By[T],model_Bz[T],measured_Bx[T],measured_By[T],measured_Bz[T],"
      "dBx[T],dBy[T],dBz[T],dB[T]\n",
      COILWRIGHT_VERSION, COILWRIGHT_GIT_REVISION, args.design, args.measured,
      args.background.empty() ? std::string{} : fmt::format(" (background {} subtracted)", args.background));
  for (std::size_t i = 0; i < c.points.size(); ++i) {
    const Vec3 p = c.points[i], m = c.model_T[i], s = c.measured_T[i], d = c.difference_T[i];
    fmt::format_to(std::back_inserter(out), "{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g},{:.9g}\n",
                   p.x(), p.y(), p.z(), m.x(), m.y(), m.z(), s.x(), s.y(), s.z(), d.x(), d.y(), d.z(), d.norm());
  }
  return out;
}

// The design file holds fixed currents; the limits come from the rig config when given.
Model with_limits(Model design, const std::string& limits_file) {
  if (limits_file.empty()) return design;
  const Model rig = load_model(limits_file);
  for (auto& c : design.circuits) {
    const auto it = std::find_if(rig.circuits.begin(), rig.circuits.end(), [&](const Circuit& r) { return r.name == c.name; });
    if (it == rig.circuits.end() || !it->solved) continue;
    c.solved = true;
    c.min_current_A = it->min_current_A;
    c.max_current_A = it->max_current_A;
  }
  return design;
}

std::string limit_text(double v) { return std::abs(v) >= 1e299 ? std::string("unlimited") : with_prefix(v, "T", 4); }

}  // namespace

void add_compare_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<CompareArgs>();
  auto* cmd = app.add_subcommand("compare", "A measured field map against the design's model; headroom of a cage");
  cmd->footer(
      "Example:\n  coilwright compare configs/cage-null-null.toml --measured map.csv --background configs/survey-demo.csv \\\n"
      "      --limits configs/cage-null.toml\n"
      "The map has the survey's format (x,y,z,Bx,By,Bz with units in brackets). With --background, a fit of that\n"
      "survey (the field with the coils off) is subtracted from the map before comparing with the coils' field.\n"
      "Writes <map>-compare.csv next to the map (or --out).");
  cmd->add_option("design", args->design, "Design file (TOML) at the currents the map was measured with")->required()->check(CLI::ExistingFile);
  cmd->add_option("--measured", args->measured, "Measured field map (CSV)")->required()->check(CLI::ExistingFile);
  cmd->add_option("--background", args->background, "Survey of the field with the coils off (CSV)")->check(CLI::ExistingFile);
  cmd->add_option("--degree", args->degree, "Degree of the background fit")->check(CLI::Range(1, 8))->capture_default_str();
  cmd->add_option("--limits", args->limits, "Rig config whose circuit limits give the headroom")->check(CLI::ExistingFile);
  cmd->add_option("--out", args->out, "Where to write the point-by-point CSV");
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the report");
  cmd->callback([args, &global] {
    (void)global;
    const Model design = with_limits(load_model(args->design), args->limits);
    const Survey map = read_survey_csv(args->measured);
    std::optional<AmbientFit> bg;
    if (!args->background.empty()) {
      AmbientFitOptions opt;
      opt.degree = args->degree;
      bg = fit_ambient(read_survey_csv(args->background), opt);
    }
    const MapComparison c = compare_with_map(design, map, bg ? &*bg : nullptr);
    const std::filesystem::path m(args->measured);
    const std::filesystem::path out =
        args->out.empty() ? std::filesystem::path((m.parent_path() / m.stem()).string() + "-compare.csv") : std::filesystem::path(args->out);
    write_file_atomic(out, comparison_csv(*args, c));
    const Vec3 centre = design.target ? design.target->centre_m : Vec3::Zero();
    const std::vector<Headroom> room = headroom(design, centre);

    if (args->json) {
      nlohmann::json j;
      j["points"] = c.points.size();
      j["worst"] = c.worst_T;
      j["rms"] = c.rms_T;
      j["relative_rms"] = c.relative_rms;
      j["relative_worst"] = c.relative_worst;
      j["worst_point"] = {c.points[c.worst_point].x(), c.points[c.worst_point].y(), c.points[c.worst_point].z()};
      nlohmann::json h = nlohmann::json::object();
      for (const auto& e : room)
        h[e.circuit] = {{"current", e.current_A}, {"up", e.up_T}, {"down", e.down_T},
                        {"field_per_ampere", {e.field_per_ampere_T_per_A.x(), e.field_per_ampere_T_per_A.y(), e.field_per_ampere_T_per_A.z()}}};
      j["headroom"] = h;
      j["file"] = out.string();
      fmt::print("{}\n", j.dump(2));
      return;
    }
    fmt::print("{} against {} ({} points){}\n", args->design, args->measured, c.points.size(),
               bg ? fmt::format(", background {} (degree {}) subtracted", args->background, args->degree) : std::string{});
    const Vec3 wp = c.points[c.worst_point];
    fmt::print("  worst difference  {} at ({:.1f}, {:.1f}, {:.1f}) mm ({:.3g} of the largest model field)\n", with_prefix(c.worst_T, "T", 4),
               wp.x() * 1e3, wp.y() * 1e3, wp.z() * 1e3, c.relative_worst);
    fmt::print("  RMS difference    {} ({:.3g} of the model's RMS field)\n", with_prefix(c.rms_T, "T", 4), c.relative_rms);
    if (room.empty()) {
      fmt::print("headroom: no circuit has limits (pass --limits <rig.toml> for the rig's supply ranges)\n");
    } else {
      fmt::print("headroom at ({:.1f}, {:.1f}, {:.1f}) mm, on top of the present currents:\n", centre.x() * 1e3, centre.y() * 1e3, centre.z() * 1e3);
      for (const auto& e : room)
        fmt::print("  {:<16} at {:>12}: +{} / -{} along its field direction\n", e.circuit, with_prefix(e.current_A, "A", 4),
                   limit_text(e.up_T), limit_text(e.down_T));
    }
    fmt::print("wrote {}\n", out.string());
  });
}

}  // namespace coilwright::cli
