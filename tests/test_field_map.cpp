// Field maps: lattices in the documented order, values equal to the field of the model, and the
// CSV/VTK layouts. Rule first, then inputs that must pass and those that must fail.
#include <catch2/catch.hpp>

#include <cmath>
#include <sstream>

#include "coilwright/config.hpp"
#include "coilwright/design_writer.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/field_map.hpp"

using namespace coilwright;

namespace {

const char* kLoopWithTarget = R"(
[project]
name = "map-loop"
[[circuit]]
name = "main"
current = "2 A"
[[coil]]
name = "loop"
shape = "loop"
circuit = "main"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 5
radius = "100 mm"
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "20 mm"
goal = "uniform"
field = ["0 T", "0 T", "62.83 uT"]
tolerance = "1 %"
)";

// Relative agreement with an absolute floor (common practice, no source).
bool near(double a, double b, double rel = 1e-14, double floor = 1e-20) {
  return std::abs(a - b) <= std::max(floor, rel * std::max(std::abs(a), std::abs(b)));
}

}  // namespace

TEST_CASE("A lattice runs its first direction fastest from the origin to origin + edge") {
  const MapLattice l = grid_lattice(Vec3(-1, -2, -3), Vec3(1, 2, 3), {3, 2, 2});
  const PointSet p = l.points();
  REQUIRE(p.size() == 12);
  CHECK(p[0].isApprox(Vec3(-1, -2, -3)));
  CHECK(p[1].isApprox(Vec3(0, -2, -3)));
  CHECK(p[3].isApprox(Vec3(-1, 2, -3)));
  CHECK(p[11].isApprox(Vec3(1, 2, 3)));
  const MapLattice xz = plane_lattice("xz", Vec3::Zero(), 0.2, 0.4, 3, 5);
  CHECK(xz.points()[0].isApprox(Vec3(-0.1, 0, -0.2)));
  CHECK(xz.points()[14].isApprox(Vec3(0.1, 0, 0.2)));
}

TEST_CASE("Lattices with no extent or no points or too many points are refused") {
  CHECK_NOTHROW(line_lattice(Vec3::Zero(), Vec3::UnitZ(), 1));  // one point needs no extent
  CHECK_THROWS_AS(line_lattice(Vec3::Zero(), Vec3::Zero(), 5), InputError);
  CHECK_THROWS_AS(line_lattice(Vec3::Zero(), Vec3::UnitZ(), 0), InputError);
  CHECK_THROWS_AS(grid_lattice(Vec3::Zero(), Vec3::Ones(), {2001, 2001, 2}), InputError);
  CHECK_THROWS_AS(plane_lattice("xx", Vec3::Zero(), 1, 1, 3, 3), InputError);
}

TEST_CASE("A map holds the model's field and marks points on a winding instead of refusing them") {
  const Model m = parse_model(kLoopWithTarget, "map-loop.toml");
  const FieldMap map = compute_field_map(m, line_lattice(Vec3(0, 0, -0.05), Vec3(0.1, 0, 0), 11));
  const FieldSet direct = field_of_model(m, map.points);
  for (std::size_t i = 0; i + 1 < map.points.size(); ++i) {
    CHECK_FALSE(map.in_winding[i]);
    CHECK(near(map.field_T.bz[i], direct.bz[i]));
    CHECK(std::isfinite(map.deviation[i]));
  }
  // The last point is on the filament (radius 100 mm).
  CHECK(map.in_winding.back());
  CHECK(std::isnan(map.field_T.bz.back()));
  CHECK(std::isnan(map.deviation.back()));
  CHECK(map.tolerance_relative == Approx(0.01));
}

TEST_CASE("CSV and VTK layouts name their columns and write nan where undefined") {
  const Model m = parse_model(kLoopWithTarget, "map-loop.toml");
  const FieldMap map = compute_field_map(m, line_lattice(Vec3(0, 0, 0), Vec3(0.1, 0, 0), 3));
  const std::string csv = field_map_csv(map, "title\nwith a break");
  CHECK(csv.find("x,y,z,Bx,By,Bz,|B|,deviation\n") != std::string::npos);
  CHECK(csv.find("title with a break") != std::string::npos);
  CHECK(csv.find("nan") != std::string::npos);
  const std::string vtk = field_map_vtk(map, "t");
  std::istringstream in(vtk);
  std::string line;
  std::getline(in, line);
  CHECK(line == "# vtk DataFile Version 3.0");
  std::getline(in, line);
  std::getline(in, line);
  CHECK(line == "ASCII");
  std::getline(in, line);
  CHECK(line == "DATASET STRUCTURED_GRID");
  std::getline(in, line);
  CHECK(line == "DIMENSIONS 3 1 1");
  CHECK(vtk.find("VECTORS B double") != std::string::npos);
  CHECK(vtk.find("SCALARS deviation double 1\nLOOKUP_TABLE default") != std::string::npos);
  CHECK_THROWS_AS(write_field_map("map.txt", map, "t"), InputError);
}

TEST_CASE("[[map]] tables are read, written back with a design and give the lattice they name") {
  const std::string maps = R"(
[[map]]
name = "axis"
kind = "line"
from = ["0 m", "0 m", "-120 mm"]
to = ["0 m", "0 m", "120 mm"]
points = 241

[[map]]
name = "xz"
kind = "plane"
plane = "xz"
size = ["300 mm", "200 mm"]
points = [31, 21]
format = ["csv", "vtk"]

[[map]]
name = "box"
kind = "grid"
from = ["-10 mm", "-10 mm", "-10 mm"]
to = ["10 mm", "10 mm", "10 mm"]
points = 5
format = "vtk"
)";
  const Model m = parse_model(std::string(kLoopWithTarget) + maps, "maps.toml");
  REQUIRE(m.maps.size() == 3);
  CHECK(m.maps[0].kind == MapKind::line);
  CHECK(m.maps[0].points == std::array<int, 3>{241, 1, 1});
  CHECK(m.maps[0].formats == std::vector<MapFormat>{MapFormat::csv});
  CHECK(m.maps[1].centre_m == m.target->centre_m);  // a plane defaults to the target's centre
  CHECK(m.maps[1].size_m == std::array<double, 2>{0.3, 0.2});
  CHECK(m.maps[1].formats == std::vector<MapFormat>{MapFormat::csv, MapFormat::vtk});
  CHECK(m.maps[2].points == std::array<int, 3>{5, 5, 5});
  CHECK(m.location_of("map.xz").line == 31);  // its [[map]] header

  const MapLattice axis = lattice_of(m.maps[0]);
  CHECK(axis.size() == 241);
  CHECK(axis.points()[120].isApprox(Vec3::Zero()));
  CHECK(lattice_of(m.maps[1]).points()[0].isApprox(Vec3(-0.15, 0, -0.1)));
  CHECK(lattice_of(m.maps[2]).size() == 125);

  // A design file carries its maps unchanged.
  const Model back = parse_model(write_model_toml(m), "back.toml");
  REQUIRE(back.maps.size() == 3);
  for (std::size_t i = 0; i < 3; ++i) {
    CHECK(back.maps[i].name == m.maps[i].name);
    CHECK(back.maps[i].kind == m.maps[i].kind);
    CHECK(back.maps[i].from_m == m.maps[i].from_m);
    CHECK(back.maps[i].to_m == m.maps[i].to_m);
    CHECK(back.maps[i].centre_m == m.maps[i].centre_m);
    CHECK(back.maps[i].size_m == m.maps[i].size_m);
    CHECK(back.maps[i].points == m.maps[i].points);
    CHECK(back.maps[i].formats == m.maps[i].formats);
  }
  CHECK(map_file_name("design-01", m.maps[1], MapFormat::vtk) == "design-01-xz.vtk");
}

TEST_CASE("[[map]] mistakes name the map, the key and what is accepted") {
  const auto refused = [](const std::string& map_table, const std::string& message) {
    INFO(map_table);
    try {
      (void)parse_model(std::string(kLoopWithTarget) + map_table, "bad-map.toml");
      FAIL("accepted");
    } catch (const InputError& e) {
      CHECK_THAT(e.what(), Catch::Contains(message));
    }
  };
  refused("[[map]]\nkind = \"line\"\n", "a [[map]] needs a 'name'");
  refused("[[map]]\nname = \"../x\"\nkind = \"line\"\n", "is not a file-name stem");
  refused("[[map]]\nname = \"a\"\nkind = \"cube\"\n", "unknown map kind \"cube\"; accepted: line, plane, grid");
  refused("[[map]]\nname = \"a\"\nkind = \"line\"\nfrom = [\"0 m\", \"0 m\", \"0 m\"]\npoints = 3\n", "a line map needs 'to'");
  refused("[[map]]\nname = \"a\"\nkind = \"line\"\nplane = \"xz\"\n", "a line map does not take 'plane'");
  refused("[[map]]\nname = \"a\"\nkind = \"plane\"\nplane = \"xw\"\n", "unknown plane \"xw\"; accepted: xy, xz, yz");
  refused("[[map]]\nname = \"a\"\nkind = \"plane\"\nplane = \"xy\"\nsize = [\"1 m\", \"0 m\"]\npoints = 3\n", "must be > 0");
  refused("[[map]]\nname = \"a\"\nkind = \"plane\"\nplane = \"xy\"\nsize = [\"1 m\", \"1 m\"]\npoints = [3, 3, 3]\n",
          "expected an array of 2 point counts, found 3 elements");
  refused("[[map]]\nname = \"a\"\nkind = \"grid\"\nfrom = [\"0 m\", \"0 m\", \"0 m\"]\nto = [\"1 m\", \"1 m\", \"1 m\"]\npoints = 1000\n",
          "a config map takes at most 1000000");
  refused("[[map]]\nname = \"a\"\nkind = \"line\"\nfrom = [\"0 m\", \"0 m\", \"0 m\"]\nto = [\"1 m\", \"0 m\", \"0 m\"]\npoints = 1\n",
          "a point count must be 2 to 100000, found 1");
  refused("[[map]]\nname = \"a\"\nkind = \"line\"\nfrom = [\"0 m\", \"0 m\", \"0 m\"]\nto = [\"1 m\", \"0 m\", \"0 m\"]\npoints = 3\nformat = \"png\"\n",
          "unknown map format \"png\"; accepted: csv, vtk");
  refused("[[map]]\nname = \"a\"\nkind = \"line\"\nfrom = [\"0 m\", \"0 m\", \"0 m\"]\nto = [\"1 m\", \"0 m\", \"0 m\"]\npoints = 3\n"
          "[[map]]\nname = \"a\"\nkind = \"line\"\n",
          "duplicate map name \"a\"");
}

TEST_CASE("A map of a null-goal rig without an ambient field holds the coils' field and no deviation") {
  std::string text = kLoopWithTarget;
  const auto at = text.find("goal = \"uniform\"");
  REQUIRE(at != std::string::npos);
  text.replace(at, text.find("tolerance") - at, "goal = \"null\"\n");
  text.replace(text.find("tolerance = \"1 %\""), 17, "tolerance = \"20 nT\"");
  const Model m = parse_model(text, "null-map.toml");
  REQUIRE(m.target->goal == Goal::null);
  const FieldMap map = compute_field_map(m, line_lattice(Vec3(0, 0, -0.05), Vec3(0, 0, 0.05), 11));
  CHECK(map.reference_T == 0.0);
  for (std::size_t i = 0; i < 11; ++i) {
    CHECK(std::isnan(map.deviation[i]));
    CHECK(map.field_T[i].z() > 0.0);
  }
}
