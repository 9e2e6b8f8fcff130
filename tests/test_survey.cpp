// Survey CSV: the rule, then inputs that must pass and inputs that must fail.
// Rule: header x,y,z,Bx,By,Bz (+ optional sigma), units in brackets, SI without; comments,
// blank lines and CRLF allowed; every malformed line is refused with file, line and column.
#include <catch2/catch.hpp>

#include <string>

#include "coilwright/error.hpp"
#include "coilwright/survey.hpp"

using namespace coilwright;

namespace {
// Unit conversions are exact decimal scalings; 1e-15 relative covers one rounding of the product.
constexpr double kRel = 1e-15;

std::string error_of(const std::string& text) {
  try {
    (void)parse_survey_csv(text, "bench.csv");
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}
}  // namespace

TEST_CASE("survey: units in brackets are converted to metres and tesla", "[survey]") {
  // 1 G = 1e-4 T, 1 uT = 1e-6 T, 1 nT = 1e-9 T (SI prefixes and the gauss definition, common practice, no source).
  const Survey s = parse_survey_csv("x[mm],y[cm],z,Bx[uT],By[nT],Bz[G]\n250,3,0.5,48.5,-120,0.2\n", "bench.csv");
  REQUIRE(s.size() == 1);
  CHECK(s.points[0].x() == Approx(0.25).epsilon(kRel));
  CHECK(s.points[0].y() == Approx(0.03).epsilon(kRel));
  CHECK(s.points[0].z() == Approx(0.5).epsilon(kRel));
  CHECK(s.field[0].x() == Approx(48.5e-6).epsilon(kRel));
  CHECK(s.field[0].y() == Approx(-120e-9).epsilon(kRel));
  CHECK(s.field[0].z() == Approx(0.2e-4).epsilon(kRel));
  CHECK_FALSE(s.has_uncertainty());
  CHECK(s.lines[0] == 2);
}

TEST_CASE("survey: any column order, sigma, comments, blank lines and CRLF", "[survey]") {
  const std::string text =
      "# a survey\r\n\r\nBz[uT], sigma[nT], x, y, z, Bx[uT], By[uT]\r\n"
      "  # indented comment\r\n-44,2,0,0,0,18,-2\r\n\r\n-43,5,0.1,0,0,18.5,-2.5\r\n";
  const Survey s = parse_survey_csv(text, "bench.csv");
  REQUIRE(s.size() == 2);
  REQUIRE(s.has_uncertainty());
  CHECK(s.sigma_T[0] == Approx(2e-9).epsilon(kRel));
  CHECK(s.sigma_T[1] == Approx(5e-9).epsilon(kRel));
  CHECK(s.field[1].x() == Approx(18.5e-6).epsilon(kRel));
  CHECK(s.field[1].z() == Approx(-43e-6).epsilon(kRel));
  CHECK(s.points[1].x() == Approx(0.1).epsilon(kRel));
  CHECK(s.lines[0] == 5);
  CHECK(s.lines[1] == 7);
}

TEST_CASE("survey: a malformed line names file, line, column, the text and what is accepted", "[survey]") {
  const std::string head = "x,y,z,Bx[uT],By[uT],Bz[uT]\n0,0,0,1,2,3\n# note\n";
  const std::string msg = error_of(head + "0,0,0,1,abc,3\n");
  CHECK_THAT(msg, Catch::Contains("bench.csv:4"));
  CHECK_THAT(msg, Catch::Contains("By[uT]"));
  CHECK_THAT(msg, Catch::Contains("\"abc\""));
  CHECK_THAT(msg, Catch::Contains("number"));

  const std::string count = error_of(head + "0,0,0,1,2\n");
  CHECK_THAT(count, Catch::Contains("bench.csv:4"));
  CHECK_THAT(count, Catch::Contains("5 value(s)"));

  CHECK_THAT(error_of(head + "0,0,nan,1,2,3\n"), Catch::Contains("bench.csv:4"));
  CHECK_THAT(error_of(head + "0,0,,1,2,3\n"), Catch::Contains("key 'z'"));
}

TEST_CASE("survey: bad headers are refused with what is accepted", "[survey]") {
  CHECK_THAT(error_of("x,y,z,Bx[uT],By[uT],Bz[furlong]\n0,0,0,1,2,3\n"), Catch::Contains("accepted: T"));
  CHECK_THAT(error_of("x[uT],y,z,Bx,By,Bz\n0,0,0,1,2,3\n"), Catch::Contains("not a unit of length"));
  CHECK_THAT(error_of("x,y,z,Bx,By\n0,0,0,1,2\n"), Catch::Contains("no column 'Bz'"));
  CHECK_THAT(error_of("x,y,z,Bx,By,Bz,sgima\n0,0,0,1,2,3,4\n"), Catch::Contains("key 'sgima': not a survey column"));
  CHECK_THAT(error_of("x,y,z,Bx,By,Bz,sigma\n0,0,0,1,2,3,0\n"), Catch::Contains("accepted: a positive uncertainty"));
  CHECK_THAT(error_of("x,y,z,Bx[uT,By,Bz\n0,0,0,1,2,3\n"), Catch::Contains("name[unit]"));
  CHECK_THAT(error_of("# nothing\n\n"), Catch::Contains("no header"));
  CHECK_THAT(error_of("x,y,z,Bx,By,Bz\n"), Catch::Contains("no readings"));
}

TEST_CASE("survey: the bundled demo survey reads", "[survey]") {
  const Survey s = read_survey_csv(COILWRIGHT_SOURCE_DIR "/configs/survey-demo.csv");
  CHECK(s.size() == 27);
  CHECK(s.has_uncertainty());
}
