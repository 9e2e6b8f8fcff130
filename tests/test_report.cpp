// Figures and the HTML report: user text is escaped, figures are SVG without scripts, options
// are validated. The browser test (tests/e2e/report_in_browser.py) checks the rendered page.
#include <catch2/catch.hpp>

#include <nlohmann/json.hpp>

#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/figures.hpp"
#include "coilwright/report.hpp"

using namespace coilwright;

namespace {

const char* kPair = R"(
[project]
name = "pair <b>bold</b> & 'q'"
description = "<img src=x onerror=alert(1)>"
[[circuit]]
name = "main"
current = "1 A"
[[coil]]
name = "pair"
shape = "pack"
circuit = "main"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 20
inner_radius = "100 mm"
outer_radius = "110 mm"
width = "10 mm"
separation = "105 mm"
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "20 mm"
goal = "uniform"
field = ["0 T", "0 T", "170 uT"]
tolerance = "100 ppm"
)";

}  // namespace

TEST_CASE("html_escape turns the five markup characters into references") {
  CHECK(html_escape("a<b>&\"'c") == "a&lt;b&gt;&amp;&quot;&#39;c");
  CHECK(html_escape("plain µT") == "plain µT");
}

TEST_CASE("The default figure options are valid and bad ones name the field") {
  CHECK_NOTHROW(FigureOptions{}.validate());
  FigureOptions o;
  o.map_points = 3;
  CHECK_THROWS_WITH(o.validate(), Catch::Contains("map_points"));
}

TEST_CASE("A design's figures are complete SVG documents without scripts") {
  const Model m = parse_model(kPair, "pair.toml");
  const std::vector<Figure> figs = design_figures(m);
  REQUIRE(figs.size() == 4);
  for (const Figure& f : figs) {
    INFO(f.name);
    CHECK(f.svg.find("<svg") != std::string::npos);
    CHECK(f.svg.find("</svg>") != std::string::npos);
    CHECK(f.svg.find("<script") == std::string::npos);
    CHECK(inline_svg(f.svg).rfind("<svg", 0) == 0);
  }
  CHECK_THROWS_AS(worst_deviation_histogram({}, 1e-4), InputError);
  CHECK(worst_deviation_histogram({1e-5, 2e-5, 8e-5, 1.2e-4}, 1e-4).svg.find("<svg") != std::string::npos);
}

TEST_CASE("The report escapes every user string and needs no network") {
  const Model m = parse_model(kPair, "pair.toml");
  nlohmann::json summary = {{"project", m.project.name}, {"config", "<x>.toml"}, {"seed", 1}, {"stop_reason", "converged"},
                            {"evaluations", 1},
                            {"designs", nlohmann::json::array({{{"rank", 1}, {"file", "design-01.toml"}, {"feasible", true},
                                                                {"parameters", {{"pair.<s>", 0.1}}}, {"metrics", nlohmann::json::object()}}})}};
  const std::string page = report_html(summary, {m}, {design_figures(m)}, nullptr);
  CHECK(page.find("<b>bold</b>") == std::string::npos);
  CHECK(page.find("pair &lt;b&gt;bold&lt;/b&gt; &amp; &#39;q&#39;") != std::string::npos);
  CHECK(page.find("<img") == std::string::npos);
  CHECK(page.find("&lt;x&gt;.toml") != std::string::npos);
  CHECK(page.find("pair.&lt;s&gt;") != std::string::npos);
  CHECK(page.find("<script") == std::string::npos);
  CHECK(page.find("No wire declared") != std::string::npos);
  CHECK(page.find("implanted medical devices") != std::string::npos);
}
