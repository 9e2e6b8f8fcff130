// Calibrating the coupling matrix and offset of a rig from sensor readings.
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>
#include <random>
#include <string>

#include <fmt/format.h>

#include "coilwright/calibration.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"

using namespace coilwright;

namespace {

// A coupling of a slightly misaligned cage (our invention): three columns of about 80 uT/A,
// each tilted by a few tenths of a degree from its axis.
Eigen::Matrix3d true_coupling() {
  Eigen::Matrix3d k;
  k << 81.0e-6, 0.4e-6, -0.2e-6,
       0.3e-6, 79.5e-6, 0.6e-6,
       -0.5e-6, 0.1e-6, 80.7e-6;
  return k;
}
const Vec3 kOffset(18.2e-6, -2.7e-6, -43.9e-6);  // T, an Earth-like field (our choice)

// Each circuit stepped alone through -1, -0.5, 0.5, 1 A, plus zero and some combinations.
CalibrationTable synthetic_table(double sigma, bool give_sigma, unsigned seed) {
  std::vector<Eigen::Vector3d> currents{{0, 0, 0}};
  for (int c = 0; c < 3; ++c)
    for (double i : {-1.0, -0.5, 0.5, 1.0}) {
      Eigen::Vector3d v = Eigen::Vector3d::Zero();
      v[c] = i;
      currents.push_back(v);
    }
  currents.push_back({0.5, 0.5, 0.5});
  currents.push_back({-0.7, 0.3, 0.9});
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, 1.0);
  CalibrationTable t;
  t.source_file = "synthetic";
  t.circuits = {"x-pair", "y-pair", "z-pair"};
  const auto n = static_cast<Eigen::Index>(currents.size());
  t.currents_A.resize(n, 3);
  t.field_T.resize(n, 3);
  for (Eigen::Index r = 0; r < n; ++r) {
    t.currents_A.row(r) = currents[static_cast<std::size_t>(r)].transpose();
    Vec3 b = true_coupling() * currents[static_cast<std::size_t>(r)] + kOffset;
    for (int a = 0; a < 3; ++a) b[a] += sigma * noise(rng);
    t.field_T.row(r) = b.transpose();
    if (give_sigma) t.sigma_T.push_back(sigma);
    t.lines.push_back(static_cast<std::size_t>(r + 2));
  }
  return t;
}

}  // namespace

TEST_CASE("calibration: noiseless readings give the coupling and offset exactly", "[calibration]") {
  const Calibration cal = calibrate(synthetic_table(0.0, false, 1));
  // Rounding only: 1e-12 relative to 80 uT/A and to the 50 uT offset.
  CHECK((cal.coupling_T_per_A - true_coupling()).norm() < 1e-12 * 80e-6);
  CHECK((cal.offset_T - kOffset).norm() < 1e-12 * 50e-6);
  CHECK(cal.residual_worst_T < 1e-12 * 50e-6);
  for (int c = 0; c < 3; ++c)
    CHECK(cal.field_constant_T_per_A[static_cast<std::size_t>(c)] ==
          Approx(true_coupling().col(c).norm()).epsilon(1e-12));
  // Angle between columns 0 and 1 from their dot product (computed here independently).
  const double cos01 = true_coupling().col(0).normalized().dot(true_coupling().col(1).normalized());
  CHECK(cal.angle_deg(0, 1) == Approx(std::acos(cos01) * 180.0 / std::numbers::pi).epsilon(1e-10));
  CHECK(std::abs(cal.non_orthogonality_deg(0, 1)) < 1.0);
  CHECK(std::abs(cal.non_orthogonality_deg(0, 1)) > 0.01);
}

TEST_CASE("calibration: with noise, every parameter lies within its stated uncertainty", "[calibration]") {
  constexpr double sigma = 5e-9;  // T
  for (const bool give_sigma : {true, false}) {
    for (unsigned seed : {3u, 4u, 5u}) {
      const Calibration cal = calibrate(synthetic_table(sigma, give_sigma, seed));
      INFO("sigma given " << give_sigma << ", seed " << seed);
      // 4 sigma per parameter (Gaussian tail 6e-5; 12 parameters x 6 runs), seeds fixed.
      for (int a = 0; a < 3; ++a) {
        for (int c = 0; c < 3; ++c)
          CHECK(std::abs(cal.coupling_T_per_A(a, c) - true_coupling()(a, c)) < 4 * cal.coupling_sigma_T_per_A(a, c));
        CHECK(std::abs(cal.offset_T[a] - kOffset[a]) < 4 * cal.offset_sigma_T[a]);
      }
      for (std::size_t c = 0; c < 3; ++c) {
        const double truth = true_coupling().col(static_cast<Eigen::Index>(c)).norm();
        CHECK(std::abs(cal.field_constant_T_per_A[c] - truth) < 4 * cal.field_constant_sigma_T_per_A[c]);
      }
      const double cos01 = true_coupling().col(0).normalized().dot(true_coupling().col(1).normalized());
      CHECK(std::abs(cal.angle_deg(0, 1) - std::acos(cos01) * 180.0 / std::numbers::pi) < 4 * cal.angle_sigma_deg(0, 1));
      CHECK(cal.residual_rms_T < 3 * sigma * std::sqrt(3.0));
    }
  }
}

TEST_CASE("calibration: rank-deficient readings are refused naming the circuit", "[calibration]") {
  CalibrationTable t = synthetic_table(0.0, false, 1);
  t.currents_A.col(1).setConstant(0.25);  // y never varied
  CHECK_THROWS_WITH(calibrate(t), Catch::Contains("circuit 'y-pair' is never varied"));

  t = synthetic_table(0.0, false, 1);
  t.currents_A.col(2) = 2.0 * t.currents_A.col(0);  // z always twice x
  try {
    (void)calibrate(t);
    FAIL("no error");
  } catch (const InputError& e) {
    const std::string msg = e.what();
    CHECK_THAT(msg, Catch::Contains("'x-pair'") && Catch::Contains("'z-pair'") && Catch::Contains("vary together"));
    CHECK_THAT(msg, !Catch::Contains("'y-pair'"));
  }

  // Fewer readings than unknowns (4 per component, 5 without sigma).
  t = synthetic_table(0.0, false, 1);
  t.currents_A.conservativeResize(4, 3);
  t.field_T.conservativeResize(4, 3);
  t.lines.resize(4);
  CHECK_THROWS_WITH(calibrate(t), Catch::Contains("has 4 reading(s)") && Catch::Contains("at least 5"));
}

TEST_CASE("calibration: the table format", "[calibration]") {
  const std::string text =
      "# steps of the x and y pairs\nx-pair[mA],y-pair[A],Bx[uT],By[uT],Bz[uT]\n"
      "0,0,18,-2,-44\n500,0,58,-2,-44\n0,0.5,18,38,-44\n-500,-0.5,-22,-42,-44\n250,0.25,38,18,-44\n";
  const CalibrationTable t = parse_calibration_csv(text, "steps.csv");
  REQUIRE(t.circuits.size() == 2);
  CHECK(t.circuits[0] == "x-pair");
  CHECK(t.currents_A(1, 0) == Approx(0.5).epsilon(1e-15));
  CHECK(t.field_T(1, 0) == Approx(58e-6).epsilon(1e-15));
  const Calibration cal = calibrate(t);
  // 40 uT per 0.5 A = 80 uT/A on both (the numbers above are exact).
  CHECK(cal.field_constant_T_per_A[0] == Approx(80e-6).epsilon(1e-10));
  CHECK(cal.field_constant_T_per_A[1] == Approx(80e-6).epsilon(1e-10));
  CHECK(cal.angle_deg(0, 1) == Approx(90.0).epsilon(1e-9));

  CHECK_THROWS_WITH(parse_calibration_csv("x-pair,Bx,By,Bz\n1,2,3,4\n", "t.csv"), Catch::Contains("x-pair[A]"));
  CHECK_THROWS_WITH(parse_calibration_csv("x-pair[V],Bx,By,Bz\n1,2,3,4\n", "t.csv"), Catch::Contains("not a unit of current"));
  CHECK_THROWS_WITH(parse_calibration_csv("x-pair[A],Bx,By,Bz\n1,2,x,4\n", "t.csv"),
                    Catch::Contains("t.csv:2:5: key 'By'"));
  const Model cage = load_model(COILWRIGHT_SOURCE_DIR "/configs/cage-null.toml");
  const CalibrationTable wrong = parse_calibration_csv("w-pair[A],Bx,By,Bz\n1,2,3,4\n", "t.csv");
  CHECK_THROWS_WITH(check_circuits(wrong, cage), Catch::Contains("'w-pair'") && Catch::Contains("'x-pair'"));
}

TEST_CASE("calibration: calibrated constants feed back into the nulling currents", "[calibration]") {
  const Model cage = load_model(COILWRIGHT_SOURCE_DIR "/configs/cage-null.toml");
  // The sensor sees the cage's model coupling, scaled by 1.03, 0.98, 1.01 (a built rig that
  // differs from its drawing; our choice), and the offset below.
  const std::vector<double> scale{1.03, 0.98, 1.01};
  PointSet origin;
  origin.push_back(Vec3::Zero());
  Eigen::Matrix3d k;
  for (std::size_t c = 0; c < 3; ++c) k.col(static_cast<Eigen::Index>(c)) = scale[c] * field_per_ampere(cage, c, origin)[0];
  CalibrationTable t = synthetic_table(0.0, false, 1);
  for (Eigen::Index r = 0; r < t.currents_A.rows(); ++r)
    t.field_T.row(r) = (k * t.currents_A.row(r).transpose() + kOffset).transpose();
  const Calibration cal = calibrate(t);

  // Nulling at the sensor with the calibrated coupling cancels the offset exactly.
  const SensorNulling sn = null_at_sensor(cal, cage, cal.offset_T);
  CHECK(sn.residual_T.norm() < 1e-12 * 50e-6);
  const Vec3 check = k * Eigen::Vector3d(sn.currents_A[0], sn.currents_A[1], sn.currents_A[2]) + kOffset;
  CHECK(check.norm() < 1e-12 * 50e-6);

  // Fed back into the model, the scale factors are the ones applied.
  std::vector<double> factors;
  const Model calibrated = with_calibrated_constants(cage, cal, Vec3::Zero(), &factors);
  REQUIRE(factors.size() == 3);
  for (std::size_t c = 0; c < 3; ++c) CHECK(factors[c] == Approx(scale[c]).epsilon(1e-10));
  for (std::size_t c = 0; c < 3; ++c)
    CHECK(field_per_ampere(calibrated, c, origin)[0].norm() == Approx(cal.field_constant_T_per_A[c]).epsilon(1e-10));
}
