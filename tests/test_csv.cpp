// CSV reading: the line splitter and the point-list reader. Quoting follows RFC 4180.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <string>

#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"

namespace {
std::filesystem::path write_temp(const std::string& name, const std::string& text) {
  const auto dir = std::filesystem::temp_directory_path() / "coilwright_test_csv";
  std::filesystem::create_directories(dir);
  const auto p = dir / name;
  std::ofstream(p) << text;
  return p;
}
std::string error_of(const std::filesystem::path& p) {
  try {
    (void)coilwright::read_points_csv(p);
  } catch (const coilwright::InputError& e) {
    return e.what();
  }
  return "(no error)";
}
}  // namespace

TEST_CASE("csv: fields are split at commas, quotes protect commas and \"\" is one quote", "[csv]") {
  using V = std::vector<std::string>;
  CHECK(coilwright::split_csv_line("a,b,c") == V{"a", "b", "c"});
  CHECK(coilwright::split_csv_line(" a , b ,c ") == V{"a", "b", "c"});
  CHECK(coilwright::split_csv_line("\"x, y\",2") == V{"x, y", "2"});
  CHECK(coilwright::split_csv_line("\"say \"\"hi\"\"\",") == V{"say \"hi\"", ""});
  CHECK(coilwright::split_csv_line("a,b\r") == V{"a", "b"});
  CHECK(coilwright::split_csv_line("") == V{""});
  CHECK_THROWS_AS(coilwright::split_csv_line("\"open"), coilwright::InputError);
  CHECK_THROWS_AS(coilwright::split_csv_line("\"a\"b,c"), coilwright::InputError);
}

TEST_CASE("csv: points with x, y, z in any order, extra columns, comments and blank lines", "[csv]") {
  const auto p = write_temp("good.csv", "# probe positions\n label , z, y ,x\n\nA,3,2,1\n# skip\nB,-6e-3,0.5,+4\n");
  const auto pts = coilwright::read_points_csv(p);
  REQUIRE(pts.size() == 2);
  CHECK(pts[0] == coilwright::Vec3(1, 2, 3));
  CHECK(pts[1] == coilwright::Vec3(4, 0.5, -6e-3));
}

TEST_CASE("csv: bad point files name the line, the column and the text found", "[csv]") {
  CHECK_THAT(error_of(write_temp("no_y.csv", "x,z\n1,2\n")), Catch::Contains("no_y.csv:1:1: key 'y'"));
  CHECK_THAT(error_of(write_temp("bad_number.csv", "x,y,z\n1,2,3\n1, 2mm ,3\n")),
             Catch::Contains("bad_number.csv:3:4: key 'y'") && Catch::Contains("found \"2mm\""));
  CHECK_THAT(error_of(write_temp("nan.csv", "x,y,z\nnan,0,0\n")), Catch::Contains("key 'x'") && Catch::Contains("\"nan\""));
  CHECK_THAT(error_of(write_temp("short.csv", "x,y,z\n1,2\n")), Catch::Contains("short.csv:2") && Catch::Contains("found 2 fields"));
  CHECK_THAT(error_of(write_temp("empty.csv", "x,y,z\n# nothing\n")), Catch::Contains("no data rows"));
  CHECK_THAT(error_of(write_temp("nothing.csv", "")), Catch::Contains("no header row"));
  CHECK_THAT(error_of(std::filesystem::temp_directory_path() / "coilwright_test_csv" / "missing.csv"),
             Catch::Contains("cannot open"));
}
