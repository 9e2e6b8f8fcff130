// Inductance: Maxwell's coaxial-loop formula, the Neumann integral, loop and solenoid
// self-inductance, winding packs and circuit matrices.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "coilwright/constants.hpp"
#include "coilwright/inductance.hpp"
#include "coilwright/model.hpp"

using namespace coilwright;

namespace {

std::vector<std::vector<double>> read_csv(const std::string& name) {
  std::ifstream in(std::string(COILWRIGHT_SOURCE_DIR) + "/tests/reference/" + name);
  REQUIRE(in.good());
  std::string line;
  std::getline(in, line);  // header
  std::vector<std::vector<double>> rows;
  while (std::getline(in, line)) {
    std::vector<double> row;
    std::stringstream ss(line);
    std::string cell;
    while (std::getline(ss, cell, ',')) row.push_back(std::stod(cell));
    rows.push_back(row);
  }
  return rows;
}

Coil loop_coil(const std::string& name, double radius, double z, double turns, const std::string& circuit = "a") {
  Coil c;
  c.name = name;
  c.shape = Shape::loop;
  c.radius_m = radius;
  c.centre_m = Vec3(0, 0, z);
  c.turns = turns;
  c.circuit = circuit;
  return c;
}

}  // namespace

TEST_CASE("Maxwell's coaxial-loop formula matches mpmath", "[inductance]") {
  // Reference: mpmath at 40 digits, textbook form, tests/reference/mutual_reference.py. The Landen
  // form used here keeps ~1e-15; 1e-12 allows for the elliptic integral's last bits near k = 1.
  for (const auto& r : read_csv("mutual_reference.csv")) {
    INFO("a=" << r[0] << " b=" << r[1] << " d=" << r[2]);
    CHECK(mutual_coaxial_loops(r[0], r[1], r[2]) == Approx(r[3]).epsilon(1e-12));
    CHECK(mutual_coaxial_loops(r[1], r[0], -r[2]) == Approx(r[3]).epsilon(1e-12));
  }
}

TEST_CASE("Maxwell's formula has the classical limits", "[inductance]") {
  // Close equal loops: M -> mu0 a (ln(8a/d) - 2) (Maxwell, Treatise vol. 2 art. 705, from memory);
  // the neglected terms are O((d/a)^2 ln(a/d)) ~ 1e-7 here.
  const double a = 0.2, d = 2e-4;
  CHECK(mutual_coaxial_loops(a, a, d) == Approx(mu0 * a * (std::log(8 * a / d) - 2)).epsilon(1e-6));
  // Distant loops: two dipoles on a common axis, M -> mu0 pi a^2 b^2 / (2 d^3), relative
  // correction O((a^2 + b^2)/d^2) = 1e-6 here; the textbook form would lose all digits here.
  const double a1 = 0.01, b1 = 0.01, far = 14.0;
  CHECK(mutual_coaxial_loops(a1, b1, far) == Approx(mu0 * M_PI * a1 * a1 * b1 * b1 / (2 * far * far * far)).epsilon(3e-6));
}

TEST_CASE("the Neumann double integral agrees with Maxwell for coaxial loops", "[inductance]") {
  // Plain Gauss-Legendre over both curves; 16 panels x 16 nodes converge to ~1e-12 for curves
  // at least 0.05 radius apart.
  for (const auto& [a, b, d] : {std::tuple{0.1, 0.1, 0.05}, {0.1, 0.2, 0.3}, {0.25, 0.2, 0.125}}) {
    const auto fa = Filament::loop(Vec3::Zero(), Vec3::UnitZ(), a);
    const auto fb = Filament::loop(Vec3(0, 0, d), Vec3::UnitZ(), b);
    CHECK(neumann_mutual_inductance(fa, fb) == Approx(mutual_coaxial_loops(a, b, d)).epsilon(1e-10));
  }
}

TEST_CASE("the semi-analytic Neumann integral agrees with the double quadrature", "[inductance]") {
  // Tilted, offset loops: no closed form; the two independent quadratures must agree.
  const auto fa = Filament::loop(Vec3::Zero(), Vec3::UnitZ(), 0.1);
  const auto fb = Filament::loop(Vec3(0.03, -0.02, 0.08), Vec3(0.3, 0.1, 1.0), 0.07);
  const double m = mutual_inductance(fa, fb);
  CHECK(m == Approx(neumann_mutual_inductance(fa, fb, 24, 16)).epsilon(1e-9));
  CHECK(mutual_inductance(fb, fa) == Approx(m).epsilon(1e-9));
  // A square against a loop and against another square: polygon paths.
  const auto sq = Filament::polygon({{0.1, -0.1, 0.05}, {0.1, 0.1, 0.05}, {-0.1, 0.1, 0.05}, {-0.1, -0.1, 0.05}});
  const auto sq2 = Filament::polygon({{0.12, -0.08, 0.15}, {0.12, 0.12, 0.15}, {-0.08, 0.12, 0.15}, {-0.08, -0.08, 0.15}});
  CHECK(mutual_inductance(fa, sq) == Approx(neumann_mutual_inductance(fa, sq, 24, 16)).epsilon(1e-9));
  CHECK(mutual_inductance(sq, sq2) == Approx(neumann_mutual_inductance(sq, sq2, 24, 16)).epsilon(1e-9));
  // Reversing the circulation of one curve reverses the sign.
  const auto flipped = Filament::loop(Vec3(0.03, -0.02, 0.08), -Vec3(0.3, 0.1, 1.0), 0.07);
  CHECK(mutual_inductance(fa, flipped) == Approx(-m).epsilon(1e-9));
}

TEST_CASE("self-inductance of a circular loop of round wire", "[inductance]") {
  // L = mu0 R (ln(8R/a) - 7/4) (Rosa & Grover 1912), valid to O((a/R)^2 ln(R/a)) ~ 1e-4 here.
  const double R = 0.1, a = 0.5e-3;
  const double classical = loop_self_inductance(R, a);
  CHECK(filament_self_inductance(Filament::loop(Vec3::Zero(), Vec3::UnitZ(), R), round_gmd(a)) ==
        Approx(classical).epsilon(1e-4));
  // Through a winding with a one-turn wire of that diameter.
  Coil c = loop_coil("l", R, 0, 1);
  Wire w = custom_round_wire(2 * a, 0.0, copper());
  const auto L = self_inductance(windings(c)[0], w);
  REQUIRE(L.has_value());
  CHECK(*L == Approx(classical).epsilon(1e-4));
  // Without a wire the self-inductance is absent, not guessed.
  CHECK_FALSE(self_inductance(windings(c)[0], std::nullopt).has_value());
}

TEST_CASE("geometric mean distances", "[inductance]") {
  // Square: g = 0.44705 s (Rosa & Grover 1912, from memory); a line segment: l e^(-3/2).
  CHECK(rectangle_gmd(1.0, 1.0) == Approx(0.44705).epsilon(2e-5));
  CHECK(rectangle_gmd(1.0, 0.0) == Approx(std::exp(-1.5)).epsilon(1e-14));
  // Very flat rectangle tends to the line: relative change of O(c/b).
  CHECK(rectangle_gmd(1.0, 1e-6) == Approx(std::exp(-1.5)).epsilon(1e-5));
}

TEST_CASE("single-layer solenoid: Nagaoka's coefficient and Wheeler's formula", "[inductance]") {
  // Nagaoka's coefficient against mpmath (tests/reference/mutual_reference.py): the elliptic form
  // and a direct quadrature of the sheet's self-inductance, which agree to 1e-12.
  for (const auto& r : read_csv("nagaoka_reference.csv")) {
    INFO("2a/l = " << r[0]);
    CHECK(nagaoka_coefficient(r[0], 1.0) == Approx(r[1]).epsilon(1e-12));
  }
  // Nagaoka's table (1909; also in Grover's tables), from memory: 2a/l = 1 -> 0.6884, 2 -> 0.5255.
  CHECK(nagaoka_coefficient(1.0, 1.0) == Approx(0.6884).margin(5e-5));
  CHECK(nagaoka_coefficient(2.0, 1.0) == Approx(0.5255).margin(5e-5));
  // Wheeler (Proc. IRE 16, 1928) claims ~1 % for l > 0.8 a.
  for (double l_over_a : {0.8, 1.0, 2.0, 5.0, 20.0}) {
    INFO("l/a = " << l_over_a);
    const double a = 0.05, l = l_over_a * a;
    CHECK(solenoid_self_inductance(a, l, 100) == Approx(wheeler_solenoid_inductance(a, l, 100)).epsilon(0.01));
  }
  // Long solenoid: mu0 N^2 pi a^2 / l, end correction 8a/(3 pi l) to first order.
  CHECK(nagaoka_coefficient(0.002, 1.0) == Approx(1.0 - 4 * 0.002 / (3 * M_PI)).epsilon(1e-6));
}

TEST_CASE("a thick circular coil: the Brooks coil", "[inductance]") {
  // Brooks coil: square cross-section of side c, mean radius 3c/2, current uniform over the
  // section; L = 1.6994e-6 a N^2 H with a the mean radius in metres (= 0.025491 c N^2 uH, c in cm;
  // Grover, Inductance Calculations, from memory). The cell quadrature converges as O(h^4) for
  // square cells; the published value has five figures.
  const double c = 0.02, a = 1.5 * c;
  Coil k;
  k.name = "brooks";
  k.shape = Shape::pack;
  k.inner_radius_m = a - 0.5 * c;
  k.outer_radius_m = a + 0.5 * c;
  k.width_m = c;
  k.turns = 100;
  const auto L = self_inductance(windings(k)[0], awg_wire(24));
  REQUIRE(L.has_value());
  CHECK(*L == Approx(1.6994e-6 * a * 100 * 100).epsilon(1e-4));
}

TEST_CASE("circuit inductance sums self and mutual terms with signs", "[inductance]") {
  Model m;
  m.circuits = {Circuit{"a"}, Circuit{"b"}};
  Coil pair = loop_coil("pair", 0.1, 0, 10, "a");
  pair.separation_m = 0.1;
  pair.opposed = true;
  m.coils = {pair, loop_coil("probe", 0.05, 0.3, 5, "b")};
  const double L1 = 1e-3, Lp = 2e-4;  // given self terms
  const std::vector<std::optional<double>> selfs{L1, L1, Lp};
  const InductanceMatrix L = circuit_inductance(m, selfs);
  const double M12 = 100 * mutual_coaxial_loops(0.1, 0.1, 0.1);
  CHECK(L.henry(0, 0) == Approx(2 * L1 - 2 * M12).epsilon(1e-12));  // opposed half negative
  const double Mab = 50 * (mutual_coaxial_loops(0.1, 0.05, 0.35) - mutual_coaxial_loops(0.1, 0.05, 0.25));
  CHECK(L.henry(0, 1) == Approx(Mab).epsilon(1e-12));
  CHECK(L.henry(1, 0) == Approx(Mab).epsilon(1e-12));
  CHECK(L.henry(1, 1) == Approx(Lp).epsilon(1e-12));
  const std::vector<double> I{2.0, 1.0};
  CHECK(*stored_energy(L, I) == Approx(0.5 * (4 * L.henry(0, 0) + 4 * Mab + L.henry(1, 1))).epsilon(1e-12));
  // Without the probe's self term its diagonal is absent, and with it the stored energy.
  const std::vector<std::optional<double>> partial{L1, L1, std::nullopt};
  const InductanceMatrix Lp2 = circuit_inductance(m, partial);
  CHECK_FALSE(Lp2.self(1).has_value());
  CHECK_FALSE(stored_energy(Lp2, I).has_value());
}

TEST_CASE("AC drive and ramp voltage", "[inductance]") {
  const AcDrive a = ac_drive(1e-3, 2.0, 3.0, 1000.0);
  CHECK(a.reactance_ohm == Approx(2 * M_PI).epsilon(1e-14));
  CHECK(a.impedance_ohm == Approx(std::hypot(2.0, 2 * M_PI)).epsilon(1e-14));
  CHECK(a.voltage_V == Approx(3 * std::hypot(2.0, 2 * M_PI)).epsilon(1e-14));
  // Series resonance: 1/(w^2 L) = 25.33 uF at 1 kHz, 1 mH.
  CHECK(a.resonance_capacitance_F == Approx(1.0 / (4 * M_PI * M_PI * 1e6 * 1e-3)).epsilon(1e-14));
  CHECK(ramp_voltage(0.5, 2.0, 3.0, 10.0) == Approx(11.0).epsilon(1e-15));
}
