// The search with objective = "order": the classical zonal-harmonic designs must come out of it,
// from starting points well away from the answer. Each answer to 1e-6 relative.
#include <catch2/catch.hpp>

#include <cmath>

#include <fmt/format.h>

#include "coilwright/config.hpp"
#include "coilwright/field.hpp"
#include "coilwright/search.hpp"
#include "support/maxwell_coils.hpp"

using namespace coilwright;

namespace {

constexpr double kAnswer = 1e-6;  // the issue's required agreement

SearchSummary search(const std::string& toml) {
  const Model m = parse_model(toml, "order-test.toml");
  SearchSummary s = run_search(m);
  REQUIRE_FALSE(s.designs.empty());
  REQUIRE(s.designs.front().constraints.feasible());
  return s;
}

const char* kTarget = R"(
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "100 mm"
goal = "{goal}"
{what}
tolerance = "1 %"
[search]
objective = "order"
seed = 3
starts = 4
designs = 1
max_evaluations = 4000
)";

std::string target(const std::string& goal, const std::string& what) {
  return fmt::format(fmt::runtime(kTarget), fmt::arg("goal", goal), fmt::arg("what", what));
}

}  // namespace

TEST_CASE("two coaxial loops: the order search finds the Helmholtz spacing d = R", "[search][order]") {
  // H. von Helmholtz's pair: b2 = 0 at d = R (tests/reference/design_references.txt).
  const auto s = search(R"(
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
separation = { start = "0.2 m", min = "0.1 m", max = "1.5 m" }
)" + target("uniform", R"(field = ["0 T", "0 T", "100 uT"])"));
  const Design& d = s.designs.front();
  CHECK(*d.model.coils[0].separation_m == Approx(0.5).epsilon(kAnswer));
  REQUIRE(d.metrics.order);
  CHECK(*d.metrics.order == 4);
}

TEST_CASE("opposed loops with a gradient goal: the Maxwell pair d = sqrt(3) R", "[search][order]") {
  // J. C. Maxwell, A Treatise on Electricity and Magnetism (1873), vol. 2, §715; value checked in
  // tests/reference/design_references.txt.
  const auto s = search(R"(
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
separation = { start = "0.4 m", min = "0.2 m", max = "2 m" }
opposed = true
)" + target("gradient", R"(gradient = "1 mT/m")"));
  const Design& d = s.designs.front();
  CHECK(*d.model.coils[0].separation_m == Approx(0.5 * std::sqrt(3.0)).epsilon(kAnswer));
  REQUIRE(d.metrics.order);
  CHECK(*d.metrics.order == 5);
}

TEST_CASE("three coils: the Maxwell coil at +-sqrt(3/7) R with ampere-turns 49:64", "[search][order]") {
  // Maxwell, Treatise (1873), vol. 2, §715: outer radius sqrt(4/7) R at +-sqrt(3/7) R, outer
  // ampere-turns 49/64 of the centre coil's; every term below the sixth vanishes and b6/b0 =
  // -2.0428571 (tests/reference/design_references.txt).
  const double R = 0.4;
  const auto s = search(test::maxwell_three_coils(R, 0.3 * R, 0.1 * R, 2.0 * R) +
                        target("uniform", R"(field = ["0 T", "0 T", "100 uT"])"));
  const Design& d = s.designs.front();
  CHECK(*d.model.coils[1].separation_m == Approx(2.0 * std::sqrt(3.0 / 7.0) * R).epsilon(kAnswer));
  const double ratio = d.model.circuits[1].current_A / d.model.circuits[0].current_A;  // equal turns
  CHECK(ratio == Approx(49.0 / 64.0).epsilon(kAnswer));
  REQUIRE(d.metrics.order);
  CHECK(*d.metrics.order == 6);
  for (int n = 1; n < 6; ++n) CHECK(std::abs(d.metrics.zonal[n]) < kVanishingTerm);
  CHECK(d.metrics.zonal[6] == Approx(-2.0428571428571428571 * std::pow(d.metrics.zonal_scale_m / R, 6)).epsilon(1e-5));
}

TEST_CASE("two coaxial square coils: separation 0.5445 a, and the field is truly 3-D", "[search][order]") {
  // d/a = 0.544505643 where b2 vanishes (A. H. Firester, Rev. Sci. Instrum. 37, 1264 (1966), from
  // memory; 20 digits in tests/reference/design_references.txt).
  const double a = 1.0;
  const auto s = search(R"(
[[circuit]]
name = "main"
current = { min = "-10 A", max = "10 A" }
[[coil]]
name = "squares"
shape = "rectangle"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
width_axis = [1, 0, 0]
turns = 10
width = "1 m"
height = "1 m"
separation = { start = "0.2 m", min = "0.1 m", max = "1.2 m" }
)" + target("uniform", R"(field = ["0 T", "0 T", "100 uT"])"));
  const Design& d = s.designs.front();
  CHECK(*d.model.coils[0].separation_m == Approx(0.54450564302020562758 * a).epsilon(kAnswer));
  REQUIRE(d.metrics.order);
  CHECK(*d.metrics.order == 4);
  // At one radius in the mid-plane the deviation depends on azimuth (towards a side vs a corner).
  PointSet pts;
  pts.push_back(Vec3(0.3, 0, 0));
  pts.push_back(Vec3(0.3 / std::sqrt(2.0), 0.3 / std::sqrt(2.0), 0));
  const FieldSet b = field_of_model(d.model, pts);
  CHECK(std::abs(b[0].z() - b[1].z()) > 1e-4 * std::abs(b[0].z()));
}
