// The search with objective = "worst" over a finite volume beats the textbook designs, which
// are optimal only for a vanishingly small one.
#include <catch2/catch.hpp>

#include <cmath>

#include <fmt/format.h>

#include "coilwright/config.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/search.hpp"
#include "support/maxwell_coils.hpp"

using namespace coilwright;

namespace {

constexpr double R = 0.5;

std::string sphere_target(double radius, const std::string& search) {
  return fmt::format(R"(
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "{} m"
goal = "uniform"
field = ["0 T", "0 T", "100 uT"]
tolerance = "10 ppm"
[search]
objective = "worst"
seed = 7
{}
)", radius, search);
}

// The worst relative deviation of a fixed design on the target (currents solved the same way).
double worst_of(Model m) {
  m.free_parameters.clear();
  Evaluator ev(m);
  return ev.objective(m, Objective::worst);
}

}  // namespace

TEST_CASE("over a sphere of 0.3 R the best two-loop design beats the Helmholtz spacing", "[search][worst]") {
  const std::string toml = R"(
[[circuit]]
name = "main"
current = { min = "-10 A", max = "10 A" }
[[coil]]
name = "pair"
shape = "loop"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 10
radius = "0.5 m"
separation = { start = "0.3 m", min = "0.1 m", max = "1 m" }
)" + sphere_target(0.3 * R, "starts = 4\nmax_evaluations = 2000");
  const Model config = parse_model(toml, "two-loops.toml");
  const SearchSummary s = run_search(config);
  Model helmholtz = config;
  helmholtz.coils[0].separation_m = R;  // textbook: d = R
  const double textbook = worst_of(helmholtz);
  const double found = s.designs.front().metrics.worst_relative_deviation;
  INFO("Helmholtz " << textbook << ", found " << found);
  CHECK(found < 0.9 * textbook);
}

TEST_CASE("over a sphere of 0.3 R the best three-coil design beats the Maxwell coil", "[search][worst]") {
  const double zo = std::sqrt(3.0 / 7.0) * R;
  const std::string toml = test::maxwell_three_coils(R, 1.6 * zo, 0.2 * R, 2.0 * R) +
                           sphere_target(0.3 * R, "starts = 4\nmax_evaluations = 2000");
  const Model config = parse_model(toml, "three-coils.toml");
  const SearchSummary s = run_search(config);
  Model maxwell = config;
  maxwell.coils[1].separation_m = 2.0 * zo;  // textbook position; currents solved on the sphere as for the search
  const double textbook = worst_of(maxwell);
  const double found = s.designs.front().metrics.worst_relative_deviation;
  INFO("Maxwell " << textbook << ", found " << found);
  CHECK(found < 0.9 * textbook);
}

TEST_CASE("a short solenoid with end corrections is at least 10x more uniform", "[search][worst]") {
  // Issue requirement: solenoid of length 2R, free end-correction windings, central cylinder.
  const std::string coils = R"(
[[circuit]]
name = "main"
current = { min = "-10 A", max = "10 A" }
[[circuit]]
name = "trim"
current = { min = "-10 A", max = "10 A" }
[[coil]]
name = "solenoid"
shape = "solenoid"
circuit = "main"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 200
radius = "50 mm"
length = "100 mm"
[[coil]]
name = "ends"
shape = "pack"
circuit = "trim"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 20
inner_radius = "52 mm"
outer_radius = "58 mm"
width = "6 mm"
separation = { start = "40 mm", min = "10 mm", max = "110 mm" }
)";
  const std::string target = R"(
[target]
region = "cylinder"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "15 mm"
length = "30 mm"
goal = "uniform"
field = ["0 T", "0 T", "5 mT"]
tolerance = "100 ppm"
[search]
objective = "worst"
seed = 1
starts = 4
max_evaluations = 1500
)";
  const Model config = parse_model(coils + target, "end-correction.toml");
  const SearchSummary s = run_search(config);
  // The plain solenoid: same length, no corrections (trim current held at zero).
  Model plain = config;
  plain.circuits[1].solved = false;
  plain.circuits[1].current_A = 0.0;
  const double bare = worst_of(plain);
  const double corrected = s.designs.front().metrics.worst_relative_deviation;
  INFO("plain " << bare << ", corrected " << corrected);
  CHECK(corrected * 10.0 < bare);
}
