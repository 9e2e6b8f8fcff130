// coilwright calibrate: coupling matrix, field constants and offset of a built rig from readings.
#include <sstream>
#include <string>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "display.hpp"
#include "coilwright/calibration.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"

namespace coilwright::cli {

namespace {

struct CalibrateArgs {
  std::string rig;
  std::string readings;
  std::vector<double> sensor_mm;
  bool json = false;
};

}  // namespace

void add_calibrate_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<CalibrateArgs>();
  auto* cmd = app.add_subcommand("calibrate", "Field constants, coupling matrix and offset of a rig from sensor readings");
  cmd->footer(
      "Example:\n  coilwright calibrate configs/cage-null.toml --readings steps.csv\n"
      "Readings CSV: one column per circuit named <circuit>[A] (or mA), and Bx,By,Bz with units in brackets\n"
      "(+ optional sigma). Reports each circuit's field constant against the model's at the sensor, the angles\n"
      "between circuit field directions, and the currents that null the offset with the calibrated coupling.");
  cmd->add_option("rig", args->rig, "Rig config (TOML)")->required()->check(CLI::ExistingFile);
  cmd->add_option("--readings", args->readings, "Table of applied currents and measured fields (CSV)")->required()->check(CLI::ExistingFile);
  cmd->add_option("--sensor", args->sensor_mm, "Sensor position x y z in mm (default: the target centre)")->expected(3);
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the report");
  cmd->callback([args, &global] {
    (void)global;
    const Model model = load_model(args->rig);
    const CalibrationTable table = read_calibration_csv(args->readings);
    check_circuits(table, model);
    const Calibration cal = calibrate(table);
    const Vec3 sensor = args->sensor_mm.size() == 3 ? Vec3(args->sensor_mm[0], args->sensor_mm[1], args->sensor_mm[2]) * 1e-3
                                                    : (model.target ? model.target->centre_m : Vec3::Zero());
    PointSet at;
    at.push_back(sensor);
    try {
      check_clear_of_windings(model.coils, at);
    } catch (const DomainError& e) {
      throw InputError(fmt::format("{}: the sensor {}; accepted: a position outside every winding",
                                   args->sensor_mm.size() == 3 ? "--sensor" : "the target centre", e.what()));
    }
    const SensorNulling null = null_at_sensor(cal, model, cal.offset_T);
    const std::size_t k = cal.circuits.size();
    std::vector<Vec3> model_k(k);
    for (std::size_t c = 0; c < k; ++c) model_k[c] = field_per_ampere(model, model.circuit_index(cal.circuits[c]), at)[0];

    if (args->json) {
      nlohmann::json j;
      j["readings"] = cal.readings;
      j["weighted"] = cal.weighted;
      j["sensor"] = {sensor.x(), sensor.y(), sensor.z()};
      j["offset"] = {cal.offset_T.x(), cal.offset_T.y(), cal.offset_T.z()};
      j["offset_sigma"] = {cal.offset_sigma_T.x(), cal.offset_sigma_T.y(), cal.offset_sigma_T.z()};
      nlohmann::json circuits = nlohmann::json::object();
      for (std::size_t c = 0; c < k; ++c) {
        const auto col = static_cast<Eigen::Index>(c);
        nlohmann::json angles = nlohmann::json::object();
        for (std::size_t d = 0; d < k; ++d)
          if (d != c) angles[cal.circuits[d]] = {{"angle_deg", cal.angle_deg(col, static_cast<Eigen::Index>(d))},
                                                 {"sigma_deg", cal.angle_sigma_deg(col, static_cast<Eigen::Index>(d))}};
        circuits[cal.circuits[c]] = {
            {"coupling", {cal.coupling_T_per_A(0, col), cal.coupling_T_per_A(1, col), cal.coupling_T_per_A(2, col)}},
            {"coupling_sigma", cal.coupling_sigma_T_per_A(0, col)},
            {"field_constant", cal.field_constant_T_per_A[c]},
            {"field_constant_sigma", cal.field_constant_sigma_T_per_A[c]},
            {"model_field_constant", model_k[c].norm()},
            {"angles", angles}};
      }
      j["circuits"] = circuits;
      j["residual_rms"] = cal.residual_rms_T;
      j["residual_worst"] = cal.residual_worst_T;
      j["chi2_reduced"] = cal.chi2_reduced;
      nlohmann::json currents = nlohmann::json::object();
      for (std::size_t c = 0; c < model.circuits.size(); ++c) currents[model.circuits[c].name] = null.currents_A[c];
      j["null_currents"] = currents;
      j["null_residual"] = {null.residual_T.x(), null.residual_T.y(), null.residual_T.z()};
      fmt::print("{}\n", j.dump(2));
      return;
    }
    fmt::print("{}: calibration from {} ({} readings{})\n", model.project.name, args->readings, cal.readings,
               cal.weighted ? ", weighted by their sigma" : "");
    fmt::print("sensor at ({:.1f}, {:.1f}, {:.1f}) mm\n", sensor.x() * 1e3, sensor.y() * 1e3, sensor.z() * 1e3);
    fmt::print("coupling [uT/A] (columns: circuits; rows: sensor x, y, z):\n");
    fmt::print("       {}\n", [&] {
      std::string h;
      for (const auto& n : cal.circuits) h += fmt::format("{:>14}", n);
      return h;
    }());
    for (Eigen::Index a = 0; a < 3; ++a) {
      std::string row;
      for (std::size_t c = 0; c < k; ++c) row += fmt::format("{:>14.5f}", cal.coupling_T_per_A(a, static_cast<Eigen::Index>(c)) * 1e6);
      fmt::print("  B{}   {}\n", "xyz"[a], row);
    }
    fmt::print("field constants:\n");
    for (std::size_t c = 0; c < k; ++c) {
      const double km = model_k[c].norm();
      fmt::print("  {:<16} {:.6g} +- {:.2g} uT/A   model {:.6g} uT/A   ratio {:.5f}\n", cal.circuits[c],
                 cal.field_constant_T_per_A[c] * 1e6, cal.field_constant_sigma_T_per_A[c] * 1e6, km * 1e6,
                 km > 0 ? cal.field_constant_T_per_A[c] / km : 0.0);
    }
    if (k > 1) {
      fmt::print("angles between circuit field directions (deviation from 90 deg = non-orthogonality):\n");
      for (std::size_t c = 0; c < k; ++c)
        for (std::size_t d = c + 1; d < k; ++d) {
          const auto ci = static_cast<Eigen::Index>(c), di = static_cast<Eigen::Index>(d);
          fmt::print("  {} / {}: {:.4f} +- {:.2g} deg ({:+.4f} deg)\n", cal.circuits[c], cal.circuits[d], cal.angle_deg(ci, di),
                     cal.angle_sigma_deg(ci, di), cal.non_orthogonality_deg(c, d));
        }
    }
    fmt::print("offset (field at zero current): [{}, {}, {}] +- {}\n", with_prefix(cal.offset_T.x(), "T"), with_prefix(cal.offset_T.y(), "T"),
               with_prefix(cal.offset_T.z(), "T"), with_prefix(cal.offset_sigma_T.x(), "T", 2));
    fmt::print("fit residual: RMS {}, worst {} (line {}){}\n", with_prefix(cal.residual_rms_T, "T", 3), with_prefix(cal.residual_worst_T, "T", 3),
               table.lines[cal.worst_reading], cal.weighted ? fmt::format(", chi2/dof {:.3g}", cal.chi2_reduced) : std::string{});
    fmt::print("currents that null the offset at the sensor with the calibrated coupling:\n");
    for (std::size_t c = 0; c < model.circuits.size(); ++c)
      fmt::print("  {:<16} {}\n", model.circuits[c].name, with_prefix(null.currents_A[c], "A"));
    fmt::print("  residual at the sensor: {}\n", with_prefix(null.residual_T.norm(), "T", 3));
  });
}

}  // namespace coilwright::cli
