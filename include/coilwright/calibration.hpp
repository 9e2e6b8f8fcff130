#pragma once
// Calibrating a built rig from a magnetometer's readings at known circuit currents.
//
// Each reading r obeys B_r = K I_r + o + noise, with K the 3 x k coupling matrix [T/A] (column
// c: the field per ampere of circuit c along the sensor's axes), I_r the applied currents and o
// the field at zero current (ambient plus sensor offset). The rows share one design matrix
// X = [I | 1], so each sensor component is an ordinary (weighted) least-squares fit.
//
// Table format (CSV): one column per circuit current, named `<circuit>[<unit>]` with a current
// unit (A, mA, ...; the unit is required so that a stray column is never read as a circuit);
// Bx, By, Bz with the unit rules of the survey (survey.hpp); optionally `sigma`, one standard
// deviation of each field component of that reading. Comments (#), blank lines and CRLF as in
// the survey.
#include <cstddef>
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

struct CalibrationTable {
  std::string source_file;
  std::vector<std::string> circuits;  // in column order
  Eigen::MatrixXd currents_A;         // readings x circuits
  Eigen::MatrixXd field_T;            // readings x 3
  std::vector<double> sigma_T;        // per reading; empty without a sigma column
  std::vector<std::size_t> lines;     // file line of each reading
  std::size_t header_line = 0;         // for messages about a circuit column
  std::vector<std::size_t> circuit_columns;  // character column of each circuit's header cell
  [[nodiscard]] std::size_t size() const noexcept { return lines.size(); }
};

[[nodiscard]] CalibrationTable parse_calibration_csv(std::string_view text, std::string file);
[[nodiscard]] CalibrationTable read_calibration_csv(const std::filesystem::path& file);

// Throws InputError when the table names a circuit the model does not have (listing those it has).
void check_circuits(const CalibrationTable& table, const Model& model);

struct Calibration {
  std::vector<std::string> circuits;
  Eigen::Matrix<double, 3, Eigen::Dynamic> coupling_T_per_A;        // K
  Eigen::Matrix<double, 3, Eigen::Dynamic> coupling_sigma_T_per_A;  // one standard deviation of each entry
  Vec3 offset_T = Vec3::Zero();                                      // o
  Vec3 offset_sigma_T = Vec3::Zero();
  std::vector<double> field_constant_T_per_A;        // |K column c|
  std::vector<double> field_constant_sigma_T_per_A;
  Eigen::MatrixXd angle_deg;                         // between field directions of circuits c and d
  Eigen::MatrixXd angle_sigma_deg;                   // (linear propagation; NaN where undefined)
  std::size_t readings = 0;
  std::size_t dof = 0;            // 3 (readings - circuits - 1)
  bool weighted = false;
  double chi2_reduced = 0.0;      // as in the ambient fit (T^2 when unweighted)
  double residual_rms_T = 0.0;    // sqrt(mean |B - K I - o|^2)
  double residual_worst_T = 0.0;
  std::size_t worst_reading = 0;

  // Non-orthogonality of circuits c and d: their angle minus 90 degrees.
  [[nodiscard]] double non_orthogonality_deg(std::size_t c, std::size_t d) const { return angle_deg(c, d) - 90.0; }
};

// Fits K and o. Throws InputError when the readings cannot determine them: fewer readings than
// unknowns per component (circuits + 1, one more without sigma), a circuit whose current never
// varies (named, with its value), or circuits whose currents vary together (named).
[[nodiscard]] Calibration calibrate(const CalibrationTable& table);

// Currents that null `field_T` as the sensor sees it (e.g. the calibrated offset), using the
// calibrated coupling instead of the model's, within the model's limits for those circuits.
// Circuits not in the calibration keep their model current. One value per model circuit.
struct SensorNulling {
  std::vector<double> currents_A;
  Vec3 residual_T = Vec3::Zero();  // field_T + K I
};
[[nodiscard]] SensorNulling null_at_sensor(const Calibration& cal, const Model& model, const Vec3& field_T);

// Feeds the calibrated constants back into the model: the turns of every coil on a calibrated
// circuit are scaled so the model's field constant at `sensor_m` equals the calibrated one;
// null_ambient on the result then uses the calibrated strengths. `factors` receives the scale
// per calibrated circuit (calibrated / model).
[[nodiscard]] Model with_calibrated_constants(const Model& model, const Calibration& cal, const Vec3& sensor_m,
                                              std::vector<double>* factors = nullptr);

}  // namespace coilwright
