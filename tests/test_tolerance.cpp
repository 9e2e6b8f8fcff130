// Tolerance studies: sensitivities, Monte Carlo builds, yield. Sources are named per case.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <fmt/format.h>
#include <nlohmann/json.hpp>
#include <sys/wait.h>

#include "coilwright/config.hpp"
#include "coilwright/constants.hpp"
#include "coilwright/design_writer.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/field.hpp"
#include "coilwright/parallel.hpp"
#include "coilwright/tolerance.hpp"
#include "coilwright/tolerance_report.hpp"

using namespace coilwright;

namespace {

constexpr double kR = 0.5;  // loop radius [m]

// Two coaxial loops of radius kR, `turns` turns at 1 A, separation d, target sphere of radius a
// with the goal set to the pair's exact centre field, B(0) = mu0 N I R^2 / (R^2 + d^2/4)^{3/2}
// (Biot–Savart on the axis of a loop, any textbook).
double pair_centre_field(double d, double turns) {
  return 2.0 * mu0 * turns * kR * kR / (2.0 * std::pow(kR * kR + 0.25 * d * d, 1.5));
}

std::string pair_toml(double d, double a, const std::string& tolerance_table, const std::string& target_tolerance = "10 ppm",
                      int resolution = 8) {
  return fmt::format(R"(
[[circuit]]
name = "main"
current = "1 A"
[[coil]]
name = "pair"
shape = "loop"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 100
radius = "{} m"
separation = "{:.17g} m"
[target]
region = "sphere"
radius = "{:.17g} m"
field = ["0 T", "0 T", "{:.17g} T"]
tolerance = "{}"
resolution = {}
{}
)",
                     kR, d, a, pair_centre_field(d, 100.0), target_tolerance, resolution, tolerance_table);
}

Model pair(double d, double a, const std::string& tolerance_table, const std::string& target_tolerance = "10 ppm",
           int resolution = 8) {
  return parse_model(pair_toml(d, a, tolerance_table, target_tolerance, resolution), "pair.toml");
}

// Relative agreement with an absolute floor near zero (no floating-point ==).
bool close(double a, double b, double rel, double abs_floor = 0.0) {
  return std::abs(a - b) <= std::max(rel * std::max(std::abs(a), std::abs(b)), abs_floor);
}

}  // namespace

TEST_CASE("tolerance: default options are valid; bad ones are refused by name", "[tolerance]") {
  // Common practice, no source: defaults must pass their own validation.
  CHECK_NOTHROW(ToleranceOptions{}.validate());
  ToleranceOptions o;
  o.step_fraction = 0.0;
  CHECK_THROWS_WITH(o.validate(), Catch::Contains("step_fraction"));
  o = {};
  o.samples = -1;
  CHECK_THROWS_WITH(o.validate(), Catch::Contains("samples"));
}

TEST_CASE("tolerance: [tolerance] and per-coil overrides are read, merged and written back", "[tolerance][config]") {
  // Common practice, no source: a design written back reads the same.
  const std::string extra = R"(
[tolerance]
position = "0.5 mm"
tilt = "0.1 deg"
turns = 1
current = "0.1 %"
distribution = "uniform"
)";
  std::string text = pair_toml(kR, 0.05, extra);
  const std::string override_line = "tolerance = { position = \"2 mm\", radius = \"0.3 mm\", distribution = \"normal\" }\n";
  text.insert(text.find("[target]"), override_line);
  const Model m = parse_model(text, "t.toml");
  REQUIRE(m.tolerances.global);
  CHECK(close(*m.tolerances.global->position_m, 0.5e-3, 1e-15));
  CHECK(close(*m.tolerances.global->tilt_rad, 0.1 * 3.14159265358979323846 / 180.0, 1e-15));
  CHECK(close(*m.tolerances.global->current_relative, 1e-3, 1e-15));
  const ToleranceSpec e = m.tolerances.effective("pair");
  CHECK(close(*e.position_m, 2e-3, 1e-15));          // overridden
  CHECK(close(*e.radius_m, 0.3e-3, 1e-15));          // only in the override
  CHECK(close(*e.turns, 1.0, 1e-15));                // inherited
  CHECK(e.distribution == Distribution::normal);
  const Model back = parse_model(write_model_toml(m), "back.toml");
  const ToleranceSpec b = back.tolerances.effective("pair");
  CHECK(close(*b.position_m, 2e-3, 1e-15));
  CHECK(close(*b.tilt_rad, *e.tilt_rad, 1e-15));
  CHECK(close(*b.current_relative, 1e-3, 1e-15));
  CHECK(back.tolerances.global->distribution == Distribution::uniform);
  CHECK(b.distribution == Distribution::normal);
}

TEST_CASE("tolerance: a pair split into its windings has the pair's field", "[tolerance]") {
  // Common practice, no source: the same sum of the same terms, so agreement to rounding.
  for (bool opposed : {false, true}) {
    std::string text = pair_toml(0.6, 0.05, "");
    if (opposed) text.insert(text.find("[target]"), "opposed = true\n");
    const Model m = parse_model(text, "p.toml");
    const Model e = expand_windings(m);
    REQUIRE(e.coils.size() == 2);
    PointSet pts;
    for (const Vec3& p : {Vec3(0.01, 0.02, 0.03), Vec3(0.2, -0.1, 0.4), Vec3(0.0, 0.0, 0.1)}) pts.push_back(p);
    const FieldSet a = field_of_model(m, pts), b = field_of_model(e, pts);
    for (std::size_t i = 0; i < pts.size(); ++i) CHECK((a[i] - b[i]).norm() <= 1e-14 * a[i].norm());
  }
}

TEST_CASE("tolerance: with zero tolerances every build equals the nominal design", "[tolerance][montecarlo]") {
  // Common practice, no source: a build drawn with zero scatter is the design itself; each
  // build is the same computation as the nominal one, so they agree to the last bit (checked
  // with a 1e-15 relative tolerance rather than ==).
  // 500 ppm: the exact pair's c4 a^4 is 115 ppm over this sphere, so the design meets it.
  const Model m = pair(kR, 0.05, "[tolerance]\nposition = \"0 mm\"\ntilt = \"0 deg\"\nradius = \"0 mm\"\nturns = 0\ncurrent = \"0 %\"\n",
                       "500 ppm");
  ToleranceOptions o;
  o.samples = 12;
  const auto builds = run_builds(m, o, 0, 12);
  BuildEvaluator ev(expand_windings(m));
  Model nominal = expand_windings(m);
  const BuildMetrics n = ev.evaluate(nominal, false, false);
  for (const BuildMetrics& b : builds) {
    CHECK(close(b.worst_relative_deviation, n.worst_relative_deviation, 1e-15, 1e-300));
    CHECK(close(b.rms_relative_deviation, n.rms_relative_deviation, 1e-15, 1e-300));
    CHECK(close(b.centre_field_T, n.centre_field_T, 1e-15));
    CHECK(b.meets_tolerance == n.meets_tolerance);
  }
  const MonteCarloSummary s = summarise(builds, false);
  CHECK(close(s.yield, 1.0, 1e-15));
  CHECK(s.yield_standard_error <= 0.0);
}

TEST_CASE("tolerance: sensitivities agree with finite differences of the full evaluation", "[tolerance][sensitivity]") {
  // Common practice, no source: the study's central differences against a central difference
  // of Evaluator::metrics (the tool's full evaluation, its own sampling) on moved models.
  const Model m = pair(0.52, 0.08, "[tolerance]\nposition = \"0.5 mm\"\ncurrent = \"0.1 %\"\nradius = \"0.2 mm\"\n");
  ToleranceOptions o;
  o.samples = 0;
  const SensitivityStudy study = sensitivities(m, o);
  std::vector<std::string> declared;
  const Model e = expand_windings(m, &declared);
  const auto params = tolerance_parameters(e, m.tolerances, declared);
  const auto find = [&](const std::string& p, const std::string& metric) {
    for (const Sensitivity& s : study.sensitivities)
      if (s.parameter == p && s.metric == metric) return s;
    FAIL("no sensitivity " << p << " / " << metric);
    return Sensitivity{};
  };
  const auto full = [&](const std::string& label, double delta) {
    Model b = e;
    for (const auto& p : params)
      if (p.label == label) perturb(b, p, delta);
    Evaluator ev(b);
    return ev.metrics(b);
  };
  const double h = 1e-6;  // [m] or relative: small against R = 0.5 m, large against rounding
  for (const std::string label : {"pair#2.z", "pair#1.radius", "pair#2.x"}) {
    INFO(label);
    const Metrics up = full(label, h), down = full(label, -h);
    // The centre field does not depend on sampling: agreement to ~1e-6 (truncation (h/R)^2
    // is 4e-12; the rest is rounding over 2h in both differences).
    const double d_centre = (up.centre_field_T.z() - down.centre_field_T.z()) / (2 * h);
    const Sensitivity s = find(label, "centre_field");
    CHECK(close(s.derivative, d_centre, 1e-5, 1e-10));  // floor: 1e-6 of the typical 1e-4 T/m
  }
  {
    const Sensitivity s = find("circuit main.current", "centre_field");
    // B is linear in the current: dB/d(relative current) = B(0) exactly.
    CHECK(close(s.derivative, study.nominal.centre_field_T, 1e-6));
  }
  {
    // The worst deviation under a current change (smooth: the worst point stays at the poles).
    // The two evaluators sample the sphere differently (a meridian through the poles against a
    // Fibonacci sphere whose point nearest a pole is ~1e-3 off in P2), hence 1e-2.
    const double step = 1e-6;
    const Metrics up = full("circuit main.current", step), down = full("circuit main.current", -step);
    const double d_worst = (up.worst_relative_deviation - down.worst_relative_deviation) / (2 * step);
    CHECK(close(find("circuit main.current", "worst_relative_deviation").derivative, d_worst, 1e-2));
  }
  {
    // The volume-weighted RMS under a spacing change: smooth; two quadratures of the same
    // integrand, each converged to well below 1 %, so 2e-2.
    const double step = 1e-5;
    const Metrics up = full("pair#2.z", step), down = full("pair#2.z", -step);
    const double d_rms = (up.rms_relative_deviation - down.rms_relative_deviation) / (2 * step);
    CHECK(close(find("pair#2.z", "rms_relative_deviation").derivative, d_rms, 2e-2));
  }
}

TEST_CASE("tolerance: a Helmholtz pair's spacing error gives the second-order inhomogeneity of its expansion",
          "[tolerance][helmholtz]") {
  // tests/reference/helmholtz_spacing.py (mpmath, from the on-axis loop field and Garrett's
  // zonal expansion, J. Appl. Phys. 22, 1091 (1951)): with loops at +-d/2, d = R (1 + eps),
  // B(z)/B(0) = 1 + c2 z^2 + c4 z^4 + ..., c2 R^2 = 1.92 eps to first order; the largest
  // |B - B(0)|/B(0) over a sphere of radius a is |c2 a^2 + c4 a^4 + ...| (at the poles).
  struct Row {
    double eps, c2, c4;  // c2 [1/R^2], c4 [1/R^4] from helmholtz_spacing.txt
  };
  const Row rows[] = {{-0.01, -0.019256980526718342578, -1.1393113733613615012},
                      {0.005, 0.0095855235166540422534, -1.1580443227341421215},
                      {0.01, 0.019141790664067053302, -1.1638899533946871842},
                      {0.02, 0.038164765745392103638, -1.1749892488275128944}};
  // a = 0.02 R keeps c4 a^4 at 5 % of c2 a^2 (eps = 0.005), so the largest deviation stays at
  // the poles (with a = 0.05 R and opposite signs of c2 and c4 it moves off them).
  const double a = 0.02 * kR;
  double previous = 0.0;
  for (const Row& r : rows) {
    INFO("eps = " << r.eps);
    const Model m = pair(kR * (1.0 + r.eps), a, "", "10 ppm", 12);
    BuildEvaluator ev(expand_windings(m));
    Model b = expand_windings(m);
    const BuildMetrics bm = ev.evaluate(b, false, false);
    const double x = a / kR;
    const double predicted = std::abs(r.c2 * x * x + r.c4 * x * x * x * x);
    // The Fibonacci sphere's point nearest a pole sits at 1 - cos(theta) ~ 1/N (N = 1810):
    // P2 there is 1 - 1.5 sin^2(theta) ≈ 1 - 1.7e-3; c6 a^6 terms are ~1e-8 relative. So 0.5 %.
    CHECK(close(bm.inhomogeneity, predicted, 5e-3));
    // Leading order: linear in the spacing error, as 1.92 eps (a/R)^2; c4 a^4 is 4.8 % of it at
    // eps = 0.005 (2.4 % at 0.01) and c2 departs from 1.92 eps by 0.3 % at eps = 0.01: a 6 % band.
    CHECK(close(bm.inhomogeneity, 1.92 * std::abs(r.eps) * x * x, 0.06));
    if (r.eps > 0.0 && previous > 0.0) CHECK(bm.inhomogeneity > previous);
    if (r.eps > 0.0) previous = bm.inhomogeneity;
  }
  // The symmetric mean cancels the eps-independent c4 a^4 at the poles: 1.92 eps (a/R)^2 to
  // O(eps^2) (c2(+eps) and -c2(-eps) differ by 0.6 % at eps = 0.01, see the reference table).
  const Model up = pair(kR * 1.01, a, "", "10 ppm", 12), down = pair(kR * 0.99, a, "", "10 ppm", 12);
  BuildEvaluator eu(expand_windings(up)), ed(expand_windings(down));
  Model bu = expand_windings(up), bd = expand_windings(down);
  const double mean = 0.5 * (eu.evaluate(bu, false, false).inhomogeneity + ed.evaluate(bd, false, false).inhomogeneity);
  CHECK(close(mean, 1.92 * 0.01 * 0.02 * 0.02, 1e-2));

  // The same through the sensitivity study: moving winding 2 of an exact Helmholtz pair by
  // -sigma shortens the spacing by sigma (c2 and c4 then add at the poles, the larger one-sided
  // change) and shifts the pair by s = -sigma/2, so about the target centre
  // B(z)/B_pair(0) = 1 + c2 (z - s)^2 + c4 (z - s)^4; relative to B at the centre the pole value
  // is c2 (a^2 + 2 a |s|) + c4 ((a + |s|)^4 - s^4). The effect is that less the exact pair's
  // |c4(0)| a^4 (c2, c4 at eps = -0.005 from helmholtz_spacing.txt).
  const double sigma = 0.005 * kR;
  const Model h = pair(kR, a, fmt::format("[tolerance]\nposition = \"{} m\"\n", sigma), "10 ppm", 12);
  ToleranceOptions o;
  o.samples = 0;
  const SensitivityStudy st = sensitivities(h, o);
  double effect = 0.0;
  for (const Sensitivity& s : st.sensitivities)
    if (s.parameter == "pair#2.z" && s.metric == "inhomogeneity") effect = s.effect_at_sigma;
  const double x = a / kR, sh = 0.5 * sigma / kR;
  const double c2 = 0.0096143228830579686521, c4 = 1.1457560001881011406;
  const double predicted = c2 * (x * x + 2 * x * sh) + c4 * (std::pow(x + sh, 4) - std::pow(sh, 4)) - 1.152 * std::pow(x, 4);
  INFO("effect " << effect << " predicted " << predicted);
  // 1 %: the sampled point nearest the pole (0.2 %) and c6 (a + |s|)^6 terms (~1e-3 of c2 a^2).
  CHECK(close(effect, predicted, 1e-2));
  // To first order in sigma this is 1.92 (sigma/R) (a/R)^2 (1 + sigma/a): the c2 cross term
  // 2 a s c2 is a quarter of c2 a^2 here.
  CHECK(close(effect, 1.92 * 0.005 * x * x * (1.0 + sigma / a), 0.05));
}

TEST_CASE("tolerance: yield converges as builds grow, with the binomial standard error", "[tolerance][montecarlo]") {
  // The standard error of a fraction p from N independent trials is sqrt(p (1 - p) / N)
  // (binomial distribution; common practice, no source). Builds are seeded by index, so the
  // first N builds of a longer run are the run with N builds.
  // Spacing errors of sd 0.42 mm (two windings, 0.3 mm each) move B(0) by 0.6 (delta d)/R (d ln B(0)/d d
  // at d = R): sd ~510 ppm, so a 500 ppm tolerance gives a yield near 2/3.
  const Model m = pair(kR, 0.01, "[tolerance]\nposition = \"0.3 mm\"\n", "500 ppm", 6);
  ToleranceOptions o;
  const int N = 1600;
  const auto builds = run_builds(m, o, 0, N);
  const MonteCarloSummary all = summarise(builds, false);
  INFO("yield " << all.yield);
  REQUIRE(all.yield > 0.1);  // a study whose yield is neither 0 nor 1, so the test has power
  REQUIRE(all.yield < 0.9);
  CHECK(close(all.yield_standard_error, std::sqrt(all.yield * (1 - all.yield) / N), 1e-12));
  // Prefixes converge towards the full run within their standard errors (3 sigma).
  for (int n : {100, 400}) {
    const MonteCarloSummary part = summarise(std::vector<BuildMetrics>(builds.begin(), builds.begin() + n), false);
    CHECK(std::abs(part.yield - all.yield) <= 3.0 * part.yield_standard_error);
  }
  // The scatter of 16 batches of 100 matches the binomial standard error. The sample standard
  // deviation of 16 values has a relative spread of about 1/sqrt(30) = 18 %; 50 % is ~2.7 sigma.
  double sum = 0, ss = 0;
  std::vector<double> batch;
  for (int k = 0; k < 16; ++k) {
    const auto b0 = builds.begin() + k * 100;
    batch.push_back(summarise(std::vector<BuildMetrics>(b0, b0 + 100), false).yield);
    sum += batch.back();
  }
  const double mean = sum / 16;
  for (double y : batch) ss += (y - mean) * (y - mean);
  const double sd = std::sqrt(ss / 15);
  CHECK(close(sd, std::sqrt(all.yield * (1 - all.yield) / 100), 0.5));
  // Percentiles are ordered.
  CHECK(all.worst.p50 <= all.worst.p90);
  CHECK(all.worst.p90 <= all.worst.p99);
}

TEST_CASE("tolerance: builds are the same with 1 and 2 threads and for any split", "[tolerance][montecarlo]") {
  // Common practice, no source: per-index seeding makes each build independent of scheduling.
  const Model m = pair(kR, 0.05, "[tolerance]\nposition = \"0.3 mm\"\ntilt = \"0.1 deg\"\nturns = 0.6\ncurrent = \"0.01 %\"\n");
  ToleranceOptions o;
  const int before = max_threads();
  set_threads(1);
  const std::string one = builds_csv(run_builds(m, o, 0, 40), false);
  set_threads(2);
  const std::string two = builds_csv(run_builds(m, o, 0, 40), false);
  auto first = run_builds(m, o, 0, 17);
  const auto rest = run_builds(m, o, 17, 40);
  first.insert(first.end(), rest.begin(), rest.end());
  set_threads(before);
  CHECK(one == two);
  CHECK(builds_csv(first, false) == one);
  // A different seed draws different builds.
  o.seed = 2;
  CHECK(builds_csv(run_builds(m, o, 0, 40), false) != one);
}

TEST_CASE("tolerance: the command prints JSON and writes the builds", "[tolerance][cli]") {
  // Common practice, no source: the documented keys, exit code 0; no tolerances is bad input (2).
  namespace fs = std::filesystem;
  const fs::path dir = fs::temp_directory_path() / "coilwright-test-tolerance";
  fs::remove_all(dir);
  fs::create_directories(dir);
  {
    std::ofstream(dir / "d.toml") << pair_toml(kR, 0.05, "[tolerance]\nposition = \"0.2 mm\"\ncurrent = \"0.01 %\"\n");
    std::ofstream(dir / "none.toml") << pair_toml(kR, 0.05, "");
  }
  const std::string bin = std::string("\"") + COILWRIGHT_BINARY + "\"";
  const std::string cmd = bin + " -q tolerance \"" + (dir / "d.toml").string() + "\" --samples 50 --seed 3 --json > \"" +
                          (dir / "out.json").string() + "\"";
  const int status = std::system(cmd.c_str());
  REQUIRE(WIFEXITED(status));
  REQUIRE(WEXITSTATUS(status) == 0);
  std::ifstream in(dir / "out.json");
  const auto j = nlohmann::json::parse(in);
  for (const char* key : {"nominal", "sensitivities", "yield", "yield_standard_error", "percentiles"}) CHECK(j.contains(key));
  CHECK(j["percentiles"].contains("p50"));
  CHECK(j["percentiles"].contains("p99"));
  REQUIRE(!j["sensitivities"].empty());
  CHECK(j["sensitivities"][0].contains("parameter"));
  CHECK(j["sensitivities"][0].contains("derivative"));
  CHECK(fs::exists(dir / "d-builds.csv"));
  const std::string bad = bin + " -q tolerance \"" + (dir / "none.toml").string() + "\" >/dev/null 2>&1";
  const int s2 = std::system(bad.c_str());
  REQUIRE(WIFEXITED(s2));
  CHECK(WEXITSTATUS(s2) == 2);
  fs::remove_all(dir);
}
