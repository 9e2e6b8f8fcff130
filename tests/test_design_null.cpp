// Sizing a three-axis cage for a null goal on top of a declared ambient field: the search
// spaces the pairs and solves the currents so the residual stays within tolerance.
#include <catch2/catch.hpp>

#include "coilwright/config.hpp"
#include "coilwright/search.hpp"

using namespace coilwright;

TEST_CASE("a searched cage nulls an Earth-like field to its tolerance", "[search][null]") {
  // 25–65 uT is the commonly quoted range of the geomagnetic field; this one is 50 uT.
  const Model m = parse_model(R"(
[[circuit]]
name = "x"
current = { min = "-3 A", max = "3 A" }
[[circuit]]
name = "y"
current = { min = "-3 A", max = "3 A" }
[[circuit]]
name = "z"
current = { min = "-3 A", max = "3 A" }
[[coil]]
name = "x-pair"
shape = "rectangle"
circuit = "x"
centre = ["0 m", "0 m", "0 m"]
axis = [1, 0, 0]
width_axis = [0, 1, 0]
turns = 30
width = "1.0 m"
height = "1.0 m"
separation = { start = "350 mm", min = "250 mm", max = "800 mm" }
[[coil]]
name = "y-pair"
shape = "rectangle"
circuit = "y"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 1, 0]
width_axis = [0, 0, 1]
turns = 30
width = "1.06 m"
height = "1.06 m"
separation = { start = "800 mm", min = "250 mm", max = "850 mm" }
[[coil]]
name = "z-pair"
shape = "rectangle"
circuit = "z"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
width_axis = [1, 0, 0]
turns = 30
width = "1.12 m"
height = "1.12 m"
separation = { start = "400 mm", min = "250 mm", max = "900 mm" }
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "100 mm"
goal = "null"
tolerance = "50 nT"
resolution = 6
[target.ambient]
uniform = ["18 uT", "-4 uT", "-46 uT"]
gradient = [["0 T/m", "0 T/m", "0 T/m"], ["0 T/m", "0 T/m", "0 T/m"], ["0 T/m", "0 T/m", "0 T/m"]]
[search]
objective = "worst"
seed = 2
starts = 3
designs = 1
max_evaluations = 1500
)", "cage-null-search.toml");
  const SearchSummary s = run_search(m);
  const Design& d = s.designs.front();
  REQUIRE(d.constraints.feasible());
  INFO("worst residual " << d.metrics.worst_absolute_deviation_T << " T");
  CHECK(d.metrics.worst_absolute_deviation_T <= 50e-9);
  CHECK(d.metrics.meets_tolerance());
  // The residual at the centre is far below the ambient it cancels.
  CHECK(d.metrics.centre_field_T.norm() < 1e-3 * 50e-6);
}
