#include "coilwright/calibration.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <numbers>
#include <utility>

#include <Eigen/QR>
#include <Eigen/SVD>
#include <fmt/format.h>

#include "coilwright/currents.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/unit_table.hpp"

namespace coilwright {

namespace detail {
namespace {

CalibrationTable calibration_from_table(const UnitTable& t) {
  const SourceLocation header{t.file, t.header_line, 0};
  CalibrationTable out;
  out.source_file = t.file;
  out.header_line = t.header_line;
  std::array<std::size_t, 3> bcol{t.find("Bx"), t.find("By"), t.find("Bz")};
  std::array<double, 3> bscale{};
  for (std::size_t a = 0; a < 3; ++a) {
    if (bcol[a] == UnitTable::npos)
      throw InputError(SourceLocation{t.file, t.header_line, 1}, fmt::format("B{}", "xyz"[a]),
                       fmt::format("the header has no column 'B{}'; accepted: Bx, By, Bz and one column per circuit current, "
                                   "e.g. \"x-pair[A],Bx[uT],By[uT],Bz[uT]\"", "xyz"[a]));
    bscale[a] = column_scale(t, bcol[a], Dimension::flux_density);
  }
  const std::size_t sigma_col = t.find("sigma");
  const double sigma_scale = sigma_col == UnitTable::npos ? 1.0 : column_scale(t, sigma_col, Dimension::flux_density);
  std::vector<std::size_t> icol;
  std::vector<double> iscale;
  for (std::size_t i = 0; i < t.columns.size(); ++i) {
    if (i == bcol[0] || i == bcol[1] || i == bcol[2] || i == sigma_col) continue;
    if (t.columns[i].unit.empty())
      throw InputError(SourceLocation{t.file, t.header_line, t.columns[i].column}, t.columns[i].header,
                       fmt::format("a circuit current column needs its unit; accepted: <circuit>[<unit>], e.g. \"{}[A]\", "
                                   "and the columns Bx, By, Bz and sigma", t.columns[i].name));
    icol.push_back(i);
    iscale.push_back(column_scale(t, i, Dimension::current));
    out.circuits.push_back(t.columns[i].name);
    out.circuit_columns.push_back(t.columns[i].column);
  }
  if (icol.empty())
    throw InputError(header, "", "the table has no circuit current column (<circuit>[A])");
  const auto n = static_cast<Eigen::Index>(t.rows.size());
  const auto k = static_cast<Eigen::Index>(icol.size());
  out.currents_A.resize(n, k);
  out.field_T.resize(n, 3);
  for (Eigen::Index r = 0; r < n; ++r) {
    const TableRow& row = t.rows[static_cast<std::size_t>(r)];
    for (Eigen::Index c = 0; c < k; ++c)
      out.currents_A(r, c) = cell_value(t, row, icol[static_cast<std::size_t>(c)], iscale[static_cast<std::size_t>(c)]);
    for (Eigen::Index a = 0; a < 3; ++a)
      out.field_T(r, a) = cell_value(t, row, bcol[static_cast<std::size_t>(a)], bscale[static_cast<std::size_t>(a)]);
    if (sigma_col != UnitTable::npos) {
      const double sg = cell_value(t, row, sigma_col, sigma_scale);
      if (!(sg > 0.0))
        throw InputError(SourceLocation{t.file, row.line, row.columns[sigma_col]}, t.columns[sigma_col].header,
                         fmt::format("found \"{}\"; accepted: a positive uncertainty", row.cells[sigma_col]));
      out.sigma_T.push_back(sg);
    }
    out.lines.push_back(row.line);
  }
  if (n == 0) throw InputError(header, "", "the table has a header but no readings");
  return out;
}

std::string quoted_list(const std::vector<std::string>& names) {
  std::string s;
  for (std::size_t i = 0; i < names.size(); ++i)
    s += fmt::format("{}'{}'", i == 0 ? "" : (i + 1 == names.size() ? " and " : ", "), names[i]);
  return s;
}

}  // namespace
}  // namespace detail

CalibrationTable parse_calibration_csv(std::string_view text, std::string file) {
  return detail::calibration_from_table(parse_unit_table(text, std::move(file)));
}

CalibrationTable read_calibration_csv(const std::filesystem::path& file) {
  return detail::calibration_from_table(read_unit_table(file));
}

void check_circuits(const CalibrationTable& table, const Model& model) {
  for (std::size_t i = 0; i < table.circuits.size(); ++i) {
    const std::string& name = table.circuits[i];
    const bool found = std::any_of(model.circuits.begin(), model.circuits.end(), [&](const Circuit& c) { return c.name == name; });
    if (!found) {
      std::vector<std::string> have;
      for (const auto& c : model.circuits) have.push_back(c.name);
      const std::size_t column = i < table.circuit_columns.size() ? table.circuit_columns[i] : 0;
      throw InputError(SourceLocation{table.source_file, column == 0 ? 0 : table.header_line, column}, name,
                       fmt::format("the table names circuit '{}', which {} does not have; accepted: its circuits {}", name,
                                   model.source_file.empty() ? "the model" : model.source_file, detail::quoted_list(have)));
    }
  }
}

Calibration calibrate(const CalibrationTable& table) {
  const SourceLocation where{table.source_file, 0, 0};
  const auto n = static_cast<Eigen::Index>(table.size());
  const auto k = static_cast<Eigen::Index>(table.circuits.size());
  const Eigen::Index p = k + 1;
  Calibration cal;
  cal.circuits = table.circuits;
  cal.readings = table.size();
  cal.weighted = !table.sigma_T.empty();

  const Eigen::Index needed = p + (cal.weighted ? 0 : 1);
  if (n < needed)
    throw InputError(where, "", fmt::format("the table has {} reading(s); fitting {} circuit(s) and an offset has {} unknowns "
                                            "per field component and needs at least {} readings{}",
                                            n, k, p, needed,
                                            cal.weighted ? "" : " (one spare to estimate the scatter, as no sigma column is given)"));
  for (Eigen::Index c = 0; c < k; ++c) {
    const double lo = table.currents_A.col(c).minCoeff();
    const double hi = table.currents_A.col(c).maxCoeff();
    if (hi - lo <= 1e-12 * std::max(std::abs(lo), std::abs(hi)))
      throw InputError(where, "", fmt::format("circuit '{}' is never varied ({} A in every reading), so its coupling cannot "
                                              "be told apart from the offset; vary its current or drop the column",
                                              table.circuits[static_cast<std::size_t>(c)], lo));
  }

  // X = [I | 1], whitened; columns scaled to unit norm so the rank test does not depend on units.
  Eigen::MatrixXd x(n, p);
  x.leftCols(k) = table.currents_A;
  x.col(k).setOnes();
  Eigen::VectorXd sqrt_w = Eigen::VectorXd::Ones(n);
  if (cal.weighted)
    for (Eigen::Index r = 0; r < n; ++r) sqrt_w(r) = 1.0 / table.sigma_T[static_cast<std::size_t>(r)];
  const Eigen::MatrixXd xw = sqrt_w.asDiagonal() * x;
  const Eigen::VectorXd col_norm = xw.colwise().norm().transpose();
  const Eigen::MatrixXd xs = xw * col_norm.cwiseInverse().asDiagonal();
  Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(xs.rows(), xs.cols());
  qr.setThreshold(1e-10);  // relative to the largest pivot of unit-norm columns
  qr.compute(xs);
  if (qr.rank() < p) {
    // The right singular vector of the smallest singular value is the combination that does
    // not vary: name the circuits that take part in it.
    Eigen::JacobiSVD<Eigen::MatrixXd> svd(xs, Eigen::ComputeThinV);
    const Eigen::VectorXd v = svd.matrixV().col(p - 1);
    std::vector<std::string> involved;
    for (Eigen::Index c = 0; c < k; ++c)
      if (std::abs(v(c)) > 0.05) involved.push_back(table.circuits[static_cast<std::size_t>(c)]);
    throw InputError(where, "", fmt::format("the currents of circuit(s) {} vary together (a combination of them{} is the same "
                                            "in every reading), so their couplings cannot be separated; vary each circuit "
                                            "on its own in some readings",
                                            detail::quoted_list(involved), std::abs(v(k)) > 0.05 ? ", up to a constant," : ""));
  }
  const Eigen::MatrixXd yw = sqrt_w.asDiagonal() * table.field_T;
  const Eigen::MatrixXd beta_s = qr.solve(yw);  // p x 3, in scaled columns
  const Eigen::MatrixXd beta = col_norm.cwiseInverse().asDiagonal() * beta_s;
  const Eigen::MatrixXd r = qr.matrixR().topLeftCorner(p, p).triangularView<Eigen::Upper>();
  const Eigen::MatrixXd r_inv = r.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(p, p));
  const Eigen::MatrixXd perm = qr.colsPermutation();
  const Eigen::MatrixXd cov_s = perm * (r_inv * r_inv.transpose()) * perm.transpose();
  Eigen::MatrixXd cov = col_norm.cwiseInverse().asDiagonal() * cov_s * col_norm.cwiseInverse().asDiagonal();

  const Eigen::MatrixXd resid = table.field_T - x * beta;  // n x 3
  cal.dof = static_cast<std::size_t>(3 * (n - p));
  const double chi2 = (sqrt_w.asDiagonal() * resid).squaredNorm();
  cal.chi2_reduced = cal.dof > 0 ? chi2 / static_cast<double>(cal.dof) : 0.0;
  if (!cal.weighted) cov *= cal.chi2_reduced;  // pooled over the three components
  double sum2 = 0.0;
  for (Eigen::Index i = 0; i < n; ++i) {
    const double e = resid.row(i).norm();
    sum2 += e * e;
    if (e > cal.residual_worst_T) {
      cal.residual_worst_T = e;
      cal.worst_reading = static_cast<std::size_t>(i);
    }
  }
  cal.residual_rms_T = std::sqrt(sum2 / static_cast<double>(n));

  cal.coupling_T_per_A = beta.topRows(k).transpose();
  cal.offset_T = beta.row(k).transpose();
  cal.coupling_sigma_T_per_A.resize(3, k);
  for (Eigen::Index c = 0; c < k; ++c) cal.coupling_sigma_T_per_A.col(c).setConstant(std::sqrt(std::max(0.0, cov(c, c))));
  cal.offset_sigma_T.setConstant(std::sqrt(std::max(0.0, cov(k, k))));

  // Each column's three entries are independent with variance cov(c, c), so |K_c| has variance
  // cov(c, c) too; the angles by linear propagation through cos(theta) = u.v / (|u||v|).
  cal.field_constant_T_per_A.resize(static_cast<std::size_t>(k));
  cal.field_constant_sigma_T_per_A.resize(static_cast<std::size_t>(k));
  cal.angle_deg = Eigen::MatrixXd::Zero(k, k);
  cal.angle_sigma_deg = Eigen::MatrixXd::Zero(k, k);
  constexpr double kDeg = 180.0 / std::numbers::pi;
  for (Eigen::Index c = 0; c < k; ++c) {
    cal.field_constant_T_per_A[static_cast<std::size_t>(c)] = cal.coupling_T_per_A.col(c).norm();
    cal.field_constant_sigma_T_per_A[static_cast<std::size_t>(c)] = std::sqrt(std::max(0.0, cov(c, c)));
    for (Eigen::Index d = 0; d < k; ++d) {
      if (c == d) continue;
      const Vec3 u = cal.coupling_T_per_A.col(c), v = cal.coupling_T_per_A.col(d);
      if (u.norm() == 0.0 || v.norm() == 0.0) {
        cal.angle_deg(c, d) = cal.angle_sigma_deg(c, d) = std::numeric_limits<double>::quiet_NaN();
        continue;
      }
      const Vec3 uh = u.normalized(), vh = v.normalized();
      const double cs = std::clamp(uh.dot(vh), -1.0, 1.0);
      const double theta = std::acos(cs);
      const Vec3 gu = (vh - cs * uh) / u.norm();
      const Vec3 gv = (uh - cs * vh) / v.norm();
      const double var_cos = cov(c, c) * gu.squaredNorm() + cov(d, d) * gv.squaredNorm() + 2.0 * cov(c, d) * gu.dot(gv);
      const double s = std::sin(theta);
      cal.angle_deg(c, d) = theta * kDeg;
      cal.angle_sigma_deg(c, d) = s > 1e-12 ? std::sqrt(std::max(0.0, var_cos)) / s * kDeg
                                            : std::numeric_limits<double>::quiet_NaN();
    }
  }
  return cal;
}

SensorNulling null_at_sensor(const Calibration& cal, const Model& model, const Vec3& field_T) {
  const auto k = static_cast<Eigen::Index>(cal.circuits.size());
  std::vector<std::size_t> index;
  Eigen::VectorXd lo(k), hi(k);
  for (Eigen::Index c = 0; c < k; ++c) {
    const std::string& name = cal.circuits[static_cast<std::size_t>(c)];
    const auto it = std::find_if(model.circuits.begin(), model.circuits.end(), [&](const Circuit& m) { return m.name == name; });
    if (it == model.circuits.end())
      throw InputError(fmt::format("the calibration names circuit '{}', which the model does not have", name));
    const Circuit& m = *it;
    index.push_back(static_cast<std::size_t>(it - model.circuits.begin()));
    lo(c) = m.solved ? m.min_current_A : m.current_A;
    hi(c) = m.solved ? m.max_current_A : m.current_A;
  }
  const Eigen::MatrixXd a = cal.coupling_T_per_A;
  const BoundedLeastSquares sol = solve_bounded_least_squares(a, -field_T, lo, hi);
  SensorNulling out;
  for (const auto& c : model.circuits) out.currents_A.push_back(c.current_A);
  for (Eigen::Index c = 0; c < k; ++c) out.currents_A[index[static_cast<std::size_t>(c)]] = sol.x(c);
  out.residual_T = field_T + cal.coupling_T_per_A * sol.x;
  return out;
}

Model with_calibrated_constants(const Model& model, const Calibration& cal, const Vec3& sensor_m, std::vector<double>* factors) {
  Model out = model;
  PointSet p;
  p.push_back(sensor_m);
  if (factors) factors->clear();
  for (std::size_t c = 0; c < cal.circuits.size(); ++c) {
    const std::size_t idx = model.circuit_index(cal.circuits[c]);
    const double k_model = field_per_ampere(model, idx, p)[0].norm();
    if (!(k_model > 0.0))
      throw DomainError(fmt::format("circuit '{}' has no field at the sensor position ({}, {}, {}) m in the model, so its "
                                    "calibrated constant cannot be fed back",
                                    cal.circuits[c], sensor_m.x(), sensor_m.y(), sensor_m.z()));
    const double f = cal.field_constant_T_per_A[c] / k_model;
    for (auto& coil : out.coils)
      if (coil.circuit == cal.circuits[c]) coil.turns *= f;
    if (factors) factors->push_back(f);
  }
  return out;
}

}  // namespace coilwright
