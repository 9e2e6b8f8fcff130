// Forces between windings: closed form for coaxial loops, Lorentz quadrature, Newton's third law.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "coilwright/constants.hpp"
#include "coilwright/forces.hpp"
#include "coilwright/inductance.hpp"
#include "coilwright/model.hpp"

using namespace coilwright;

namespace {

Coil loop_coil(const std::string& name, double radius, const Vec3& centre, double turns, const std::string& circuit) {
  Coil c;
  c.name = name;
  c.shape = Shape::loop;
  c.radius_m = radius;
  c.centre_m = centre;
  c.turns = turns;
  c.circuit = circuit;
  return c;
}

}  // namespace

TEST_CASE("the coaxial-loop force matches dM/dd from mpmath", "[forces]") {
  // Reference: mpmath's numerical derivative of Maxwell's M at 40 digits
  // (tests/reference/mutual_reference.py). The closed form in double keeps ~1e-14; the absolute
  // floor covers d = 0, where the force vanishes.
  std::ifstream in(std::string(COILWRIGHT_SOURCE_DIR) + "/tests/reference/mutual_reference.csv");
  REQUIRE(in.good());
  std::string line;
  std::getline(in, line);
  int rows = 0;
  while (std::getline(in, line)) {
    std::vector<double> r;
    std::stringstream ss(line);
    std::string cell;
    while (std::getline(ss, cell, ',')) r.push_back(std::stod(cell));
    INFO(line);
    CHECK(coaxial_loop_force(r[0], r[1], r[2]) == Approx(r[4]).epsilon(1e-11).margin(1e-20));
    ++rows;
  }
  CHECK(rows >= 8);
}

TEST_CASE("Lorentz quadrature reproduces the coaxial closed form", "[forces]") {
  Model m;
  m.circuits = {Circuit{"a", 3.0}, Circuit{"b", -2.0}};
  m.coils = {loop_coil("one", 0.1, Vec3::Zero(), 10, "a"), loop_coil("two", 0.07, Vec3(0, 0, 0.04), 20, "b")};
  const std::vector<double> I{3.0, -2.0};
  const auto f = forces_on_windings(m, I);
  REQUIRE(f.size() == 2);
  const double expected = 10 * 20 * 3.0 * -2.0 * coaxial_loop_force(0.1, 0.07, 0.04);
  // Coaxial: the integrand is constant around the turn, so the quadrature is exact; what remains is
  // the loop field kernel's own error (~1e-14).
  CHECK(f[1].force_N.z() == Approx(expected).epsilon(1e-10));
  CHECK(f[0].force_N.z() == Approx(-expected).epsilon(1e-10));
  CHECK(std::abs(f[1].force_N.x()) < 1e-12 * std::abs(expected));
  CHECK(f[1].torque_Nm.norm() < 1e-12 * std::abs(expected));
}

TEST_CASE("the halves of a pair pull on each other", "[forces]") {
  // A Helmholtz pair in one circuit: the halves attract (currents in the same sense), the opposed
  // (anti-Helmholtz) pair repels, each with the coaxial closed-form force.
  Model m;
  m.circuits = {Circuit{"a", 1.5}};
  Coil pair = loop_coil("pair", 0.1, Vec3::Zero(), 50, "a");
  pair.separation_m = 0.1;
  m.coils = {pair};
  const std::vector<double> I{1.5};
  const double f_expected = 50 * 50 * 1.5 * 1.5 * coaxial_loop_force(0.1, 0.1, 0.1);
  auto f = forces_on_windings(m, I);
  REQUIRE(f.size() == 2);
  CHECK(f[1].force_N.z() == Approx(f_expected).epsilon(1e-10));
  CHECK(f[1].force_N.z() < 0.0);
  m.coils[0].opposed = true;
  f = forces_on_windings(m, I);
  CHECK(f[1].force_N.z() == Approx(-f_expected).epsilon(1e-10));
}

TEST_CASE("Newton's third law holds across all pairs", "[forces]") {
  // A tilted loop, a rectangle and a pair of packs, none coaxial: the forces sum to zero and so do
  // the torques about one point, to the quadrature's accuracy (trapezoid and Gauss-Legendre
  // along the conductors, pack kernels' own quadrature): 1e-6 of the largest force.
  Model m;
  m.circuits = {Circuit{"a", 2.0}, Circuit{"b", 1.0}, Circuit{"c", -3.0}};
  Coil tilted = loop_coil("tilted", 0.08, Vec3(0.02, 0.01, 0.0), 10, "a");
  tilted.axis = Vec3(0.2, 0.1, 1.0).normalized();
  Coil rect;
  rect.name = "rect";
  rect.shape = Shape::rectangle;
  rect.circuit = "b";
  rect.centre_m = Vec3(0.0, 0.0, 0.15);
  rect.axis = Vec3::UnitZ();
  rect.width_axis = Vec3::UnitX();
  rect.width_m = 0.3;
  rect.height_m = 0.2;
  rect.turns = 5;
  Coil packs;
  packs.name = "packs";
  packs.shape = Shape::pack;
  packs.circuit = "c";
  packs.axis = Vec3::UnitX();
  packs.centre_m = Vec3(0.0, 0.05, 0.0);
  packs.inner_radius_m = 0.04;
  packs.outer_radius_m = 0.05;
  packs.width_m = 0.02;
  packs.turns = 30;
  packs.separation_m = 0.4;
  m.coils = {tilted, rect, packs};
  const std::vector<double> I{2.0, 1.0, -3.0};
  const auto f = forces_on_windings(m, I);
  REQUIRE(f.size() == 4);
  const std::vector<Vec3> centres{tilted.centre_m, rect.centre_m, packs.centre_m - Vec3(0.2, 0, 0),
                                  packs.centre_m + Vec3(0.2, 0, 0)};
  Vec3 total = Vec3::Zero(), torque = Vec3::Zero();
  double largest = 0.0, largest_torque = 0.0;
  for (std::size_t i = 0; i < f.size(); ++i) {
    total += f[i].force_N;
    const Vec3 t = f[i].torque_Nm + centres[i].cross(f[i].force_N);
    torque += t;
    largest = std::max(largest, f[i].force_N.norm());
    largest_torque = std::max(largest_torque, t.norm());
  }
  REQUIRE(largest > 0.0);
  CHECK(total.norm() < 1e-6 * largest);
  CHECK(torque.norm() < 1e-6 * largest_torque);
}

TEST_CASE("the radial self-force of a loop follows from dL/dR", "[forces]") {
  // For L = mu0 R (ln(8R/a) - 7/4): dL/dR = mu0 (ln(8R/a) - 3/4), so F_r = 1/2 I^2 mu0 (ln(8R/a) - 3/4)
  // (virtual work; classical, e.g. Landau & Lifshitz vol. 8 sec. 34 problem, from memory).
  Coil c = loop_coil("l", 0.1, Vec3::Zero(), 1, "a");
  const Wire w = custom_round_wire(1e-3, 0.0, copper());
  const auto load = radial_load(windings(c)[0], w, 100.0);
  REQUIRE(load.has_value());
  const double expected = 0.5 * 1e4 * mu0 * (std::log(8 * 0.1 / 0.5e-3) - 0.75);
  // The GMD form differs from the classical formula by O((a/R)^2 ln) ~ 1e-4.
  CHECK(load->radial_force_N == Approx(expected).epsilon(2e-4));
  CHECK(load->hoop_tension_N == Approx(expected / (2 * M_PI)).epsilon(2e-4));
}
