// Ranked designs written by a search are complete, reloadable and reproducible.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "coilwright/config.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/results.hpp"
#include "coilwright/search.hpp"

using namespace coilwright;
namespace fs = std::filesystem;

namespace {

// A four-loop system with several distinct local optima of the worst deviation.
const char* kConfig = R"(
[project]
name = "results-test"
[[circuit]]
name = "main"
current = { min = "-10 A", max = "10 A" }
[[coil]]
name = "outer"
shape = "loop"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 20
radius = "0.5 m"
separation = { start = "0.8 m", min = "0.3 m", max = "1.2 m" }
[[coil]]
name = "inner"
shape = "loop"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = { start = 12, min = 1, max = 40 }
radius = "0.5 m"
separation = { start = "0.2 m", min = "0.05 m", max = "0.6 m" }
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "0.15 m"
goal = "uniform"
field = ["0 T", "0 T", "100 uT"]
tolerance = "10 ppm"
[search]
objective = "worst"
seed = 11
starts = 8
designs = 4
max_evaluations = 3000
min_gap = "10 mm"
)";

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

fs::path fresh_dir(const std::string& name) {
  const fs::path d = fs::temp_directory_path() / ("coilwright-test-" + name);
  fs::remove_all(d);
  return d;
}

}  // namespace

TEST_CASE("written designs reload and re-evaluate to the same metrics", "[results]") {
  const Model config = parse_model(kConfig, "results-test.toml");
  const SearchSummary s = run_search(config);
  REQUIRE(s.designs.size() >= 3);  // distinct optima exist for this system
  const fs::path dir = fresh_dir("reload");
  write_results(dir, config, s);
  for (std::size_t r = 0; r < s.designs.size(); ++r) {
    Model reloaded = load_model(dir / design_file_name(r + 1));
    Evaluator ev(reloaded);
    const Metrics m = ev.metrics(reloaded);
    const Metrics& want = s.designs[r].metrics;
    // 17 significant digits in the file: the same doubles, so agreement to rounding of the sums.
    CHECK(m.worst_relative_deviation == Approx(want.worst_relative_deviation).epsilon(1e-12));
    CHECK(m.rms_relative_deviation == Approx(want.rms_relative_deviation).epsilon(1e-12));
    CHECK(m.good_field_radius_m == Approx(want.good_field_radius_m).epsilon(1e-12));
    CHECK(m.centre_field_T.z() == Approx(want.centre_field_T.z()).epsilon(1e-14));
    // Integer turns in every written design.
    CHECK(reloaded.coils[1].turns == std::round(reloaded.coils[1].turns));
  }
  // Ranked: feasible first, objective non-decreasing.
  for (std::size_t r = 1; r < s.designs.size(); ++r) CHECK(s.designs[r - 1].objective <= s.designs[r].objective);
  CHECK(fs::exists(dir / "designs.csv"));
  CHECK(fs::exists(dir / "summary.json"));
  fs::remove_all(dir);
}

TEST_CASE("the same seed gives byte-identical results", "[results]") {
  const Model config = parse_model(kConfig, "results-test.toml");
  const fs::path a = fresh_dir("seed-a"), b = fresh_dir("seed-b");
  write_results(a, config, run_search(config));
  write_results(b, config, run_search(config));
  for (const char* f : {"designs.csv", "design-01.toml", "design-02.toml", "design-03.toml"})
    CHECK(slurp(a / f) == slurp(b / f));
  fs::remove_all(a);
  fs::remove_all(b);
}

TEST_CASE("CSV fields with commas, quotes or newlines are quoted", "[results]") {
  // RFC 4180, section 2.
  CHECK(csv_field("plain") == "plain");
  CHECK(csv_field("a,b") == "\"a,b\"");
  CHECK(csv_field("say \"hi\"") == "\"say \"\"hi\"\"\"");
  CHECK(csv_field("two\nlines") == "\"two\nlines\"");
}
