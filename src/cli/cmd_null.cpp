// coilwright null: the currents that cancel a surveyed ambient field over the target region.
#include <cmath>
#include <filesystem>
#include <iterator>
#include <string>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "coilwright/figures.hpp"
#include "display.hpp"
#include "coilwright/ambient_fit.hpp"
#include "coilwright/atomic_file.hpp"
#include "coilwright/config.hpp"
#include "coilwright/design_writer.hpp"
#include "coilwright/error.hpp"
#include "coilwright/nulling.hpp"
#include "coilwright/survey.hpp"

namespace coilwright::cli {

namespace {

struct NullArgs {
  std::string rig;
  std::string survey;
  std::string out_dir;
  int degree = 2;
  bool json = false;
};

// Millimetres rounded to 0.1 mm, without a "-0.0" for rounding noise about zero.
double mm(double metres) { return std::round(metres * 1e4) / 10.0 + 0.0; }

nlohmann::json vec_json(const Vec3& v) { return nlohmann::json::array({v.x(), v.y(), v.z()}); }
nlohmann::json mat_json(const Mat3& m) {
  nlohmann::json rows = nlohmann::json::array();
  for (int i = 0; i < 3; ++i) rows.push_back(nlohmann::json::array({m(i, 0), m(i, 1), m(i, 2)}));
  return rows;
}

std::string residual_csv(const NullArgs& args, const AmbientFit& fit, const NullingResult& r) {
  std::string out = fmt::format(
      "# coilwright {} ({}) null: residual field over the target of {}\n"
      "# ambient: degree-{} fit of {}; residual = ambient + coils at the nulling currents\n"
      "# weight: volume fraction of the point (0 = boundary point, used for the worst case only)\n"
      "x[m],y[m],z[m],weight,ambient_Bx[T],ambient_By[T],ambient_Bz[T],Bx[T],By[T],Bz[T],B[T]\n",
      COILWRIGHT_VERSION, COILWRIGHT_GIT_REVISION, args.rig, fit.degree, args.survey);
  for (std::size_t i = 0; i < r.points.size(); ++i) {
    const Vec3 p = r.points[i], a = r.ambient_T[i], b = r.residual_T[i];
    fmt::format_to(std::back_inserter(out), "{:.7g},{:.7g},{:.7g},{:.7g},{:.7g},{:.7g},{:.7g},{:.7g},{:.7g},{:.7g},{:.7g}\n",
                   p.x(), p.y(), p.z(), r.weights[i], a.x(), a.y(), a.z(), b.x(), b.y(), b.z(), b.norm());
  }
  return out;
}

void print_report(const Model& model, const NullArgs& args, const AmbientFit& fit, const NullingResult& r,
                  const std::filesystem::path& toml_out, const std::filesystem::path& csv_out) {
  fmt::print("{}: nulling the field surveyed in {}\n", model.project.name, args.survey);
  fmt::print("ambient fit: degree {} ({} terms) from {} readings{}, about ({:.1f}, {:.1f}, {:.1f}) mm\n", fit.degree,
             fit.terms.size(), fit.readings, fit.weighted ? " weighted by their sigma" : "", mm(fit.centre_m.x()),
             mm(fit.centre_m.y()), mm(fit.centre_m.z()));
  const char* axes = "xyz";
  for (int i = 0; i < 3; ++i)
    fmt::print("  B{}        {:>14} +- {}\n", axes[i], with_prefix(fit.uniform_T[i], "T"), with_prefix(fit.uniform_sigma_T[i], "T", 3));
  fmt::print("  |B|       {:>14}\n", with_prefix(fit.uniform_T.norm(), "T"));
  if (fit.degree >= 2) {
    fmt::print("  gradient [nT/m], row i = dB_i/d(x, y, z):\n");
    for (int i = 0; i < 3; ++i)
      fmt::print("    dB{}  {:>9.1f} {:>9.1f} {:>9.1f}   (+- {:.1f}, {:.1f}, {:.1f})\n", axes[i], fit.gradient_T_per_m(i, 0) * 1e9,
                 fit.gradient_T_per_m(i, 1) * 1e9, fit.gradient_T_per_m(i, 2) * 1e9, fit.gradient_sigma_T_per_m(i, 0) * 1e9,
                 fit.gradient_sigma_T_per_m(i, 1) * 1e9, fit.gradient_sigma_T_per_m(i, 2) * 1e9);
  }
  fmt::print("  fit residual: RMS {}, worst {}{}\n", with_prefix(fit.residual_rms_T, "T", 3), with_prefix(fit.residual_worst_T, "T", 3),
             fit.weighted ? fmt::format(", chi2/dof {:.3g}", fit.chi2_reduced) : std::string{});
  // chi2/dof above 2 with dof >= 20 is beyond 3 standard deviations of its distribution.
  if (fit.weighted && fit.dof >= 20 && fit.chi2_reduced > 2.0)
    fmt::print("  (the readings scatter more than their sigma: the field may need a higher --degree than {})\n", fit.degree);
  fmt::print("currents:\n");
  for (std::size_t c = 0; c < model.circuits.size(); ++c) {
    const Circuit& circ = model.circuits[c];
    fmt::print("  {:<16} {:>14}{}{}\n", circ.name, with_prefix(r.currents_A[c], "A"),
               circ.solved ? fmt::format("   (limits {} .. {})", with_prefix(circ.min_current_A, "A", 4), with_prefix(circ.max_current_A, "A", 4))
                           : std::string("   (fixed)"),
               r.at_limit[c] ? "  AT LIMIT" : "");
  }
  fmt::print("over the target ({} points):\n", r.points.size());
  fmt::print("  ambient before   worst {}, RMS {}\n", with_prefix(r.ambient_worst_T, "T", 4), with_prefix(r.ambient_rms_T, "T", 4));
  fmt::print("  residual         worst {}, RMS {}\n", with_prefix(r.residual_worst_T, "T", 4), with_prefix(r.residual_rms_T, "T", 4));
  if (model.target)
    fmt::print("  tolerance        {} -> {}\n", with_prefix(r.tolerance_T, "T", 4), r.within_tolerance ? "met" : "NOT met");
  fmt::print("wrote {} and {}\n", toml_out.string(), csv_out.string());
}

}  // namespace

void add_null_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<NullArgs>();
  auto* cmd = app.add_subcommand("null", "Currents that cancel a surveyed ambient field over the target region");
  cmd->footer(
      "Example:\n  coilwright null configs/cage-null.toml --survey configs/survey-demo.csv\n"
      "Survey CSV: header x,y,z,Bx,By,Bz (+ optional sigma), units in brackets (x[mm], Bx[uT]); no unit = m, T.\n"
      "Writes <rig>-null.toml (the design at the nulling currents, with the fitted ambient) and\n"
      "<rig>-null.csv (the residual field over the target) and <rig>-null-residual.svg (its map)\n"
      "next to the rig file, or into --out-dir.");
  cmd->add_option("rig", args->rig, "Rig config (TOML) with solved circuits and a target region")->required()->check(CLI::ExistingFile);
  cmd->add_option("--survey", args->survey, "Survey of the ambient field (CSV)")->required()->check(CLI::ExistingFile);
  cmd->add_option("--degree", args->degree, "Ambient model degree: 1 uniform, 2 + gradient, 3.. higher harmonics")
      ->check(CLI::Range(1, 8))
      ->capture_default_str();
  cmd->add_option("--out-dir", args->out_dir, "Folder for the two output files (default: the rig's folder)");
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the report");
  cmd->callback([args, &global] {
    Model model = load_model(args->rig);
    const Survey survey = read_survey_csv(args->survey);
    AmbientFitOptions opt;
    opt.degree = args->degree;
    const AmbientFit fit = fit_ambient(survey, opt);
    const NullingResult r = null_ambient(model, fit);

    if (!global.quiet && model.target) {
      // The fit is an expansion about the survey: beyond its farthest reading it extrapolates.
      std::size_t outside = 0;
      for (std::size_t i = 0; i < r.points.size(); ++i)
        if ((r.points[i] - fit.centre_m).norm() > fit.reference_radius_m * (1.0 + 1e-9)) ++outside;
      if (outside > 0)
        fmt::print(stderr, "note: {} of {} target points lie beyond the survey's reach ({:.1f} mm from its centre); "
                           "the ambient there is extrapolated\n", outside, r.points.size(), fit.reference_radius_m * 1e3);
    }

    Model design = with_currents(model, r.currents_A);
    if (design.target) design.target->ambient = fit.linearised_at(design.target->centre_m);
    const std::filesystem::path rig(args->rig);
    const std::filesystem::path stem = (args->out_dir.empty() ? rig.parent_path() : std::filesystem::path(args->out_dir)) / rig.stem();
    const std::filesystem::path toml_out = stem.string() + "-null.toml";
    const std::filesystem::path csv_out = stem.string() + "-null.csv";
    write_file_atomic(toml_out, write_model_toml(design));
    write_file_atomic(csv_out, residual_csv(*args, fit, r));
    // The residual on the plane through the target's axis (ambient linearised at the centre).
    if (design.target && design.target->ambient)
      write_file_atomic(stem.string() + "-null-residual.svg",
                        residual_map_figure(design, *design.target->ambient, design.target->centre_m, r.tolerance_T).svg);

    if (args->json) {
      nlohmann::json j;
      j["project"] = model.project.name;
      j["ambient"] = {{"degree", fit.degree},
                      {"centre", vec_json(fit.centre_m)},
                      {"uniform", vec_json(fit.uniform_T)},
                      {"uniform_sigma", vec_json(fit.uniform_sigma_T)},
                      {"gradient", mat_json(fit.gradient_T_per_m)},
                      {"gradient_sigma", mat_json(fit.gradient_sigma_T_per_m)},
                      {"readings", fit.readings},
                      {"weighted", fit.weighted},
                      {"chi2_reduced", fit.chi2_reduced},
                      {"fit_residual_rms", fit.residual_rms_T},
                      {"fit_residual_worst", fit.residual_worst_T}};
      nlohmann::json coeffs = nlohmann::json::object();
      for (std::size_t t = 0; t < fit.terms.size(); ++t)
        coeffs[fit.terms[t].label()] = {{"value", fit.coefficients_T[static_cast<Eigen::Index>(t)]}, {"sigma", fit.coefficient_sigma_T(t)}};
      j["ambient"]["coefficients"] = coeffs;
      j["ambient"]["reference_radius"] = fit.reference_radius_m;
      nlohmann::json currents = nlohmann::json::object();
      nlohmann::json at_limit = nlohmann::json::array();
      for (std::size_t c = 0; c < model.circuits.size(); ++c) {
        currents[model.circuits[c].name] = r.currents_A[c];
        if (r.at_limit[c]) at_limit.push_back(model.circuits[c].name);
      }
      j["currents"] = currents;
      j["at_limit"] = at_limit;
      j["residual_worst"] = r.residual_worst_T;
      j["residual_rms"] = r.residual_rms_T;
      j["ambient_worst"] = r.ambient_worst_T;
      j["tolerance"] = r.tolerance_T;
      j["within_tolerance"] = r.within_tolerance;
      j["points"] = r.points.size();
      j["files"] = {toml_out.string(), csv_out.string()};
      fmt::print("{}\n", j.dump(2));
    } else {
      print_report(model, *args, fit, r, toml_out, csv_out);
    }
  });
}

}  // namespace coilwright::cli
