// Sample sets fitted to target regions.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/sampling.hpp"

using namespace coilwright;

TEST_CASE("Gauss–Legendre rules integrate polynomials of degree 2n-1 exactly", "[sampling]") {
  // Property of the n-point Gauss–Legendre rule (Abramowitz & Stegun 25.4.29).
  for (int n : {1, 2, 5, 12, 40}) {
    const auto& g = gauss_legendre(n);
    for (int k = 0; k <= 2 * n - 1; ++k) {
      double s = 0.0;
      for (int i = 0; i < n; ++i) s += g.weights[i] * std::pow(g.nodes[i], k);
      const double exact = k % 2 ? 0.0 : 2.0 / (k + 1);
      CHECK(s == Approx(exact).margin(1e-14));
    }
  }
}

namespace {
Target sphere_target(double radius) {
  Target t;
  t.region = RegionKind::sphere;
  t.radius_m = radius;
  t.field_T = Vec3(0, 0, 1e-3);
  return t;
}
double weighted_mean_r2(const SampleSet& s, const Vec3& c) {
  double m = 0.0;
  for (std::size_t i = 0; i < s.volume.size(); ++i) m += s.weights[i] * (s.volume[i] - c).squaredNorm();
  return m;
}
}  // namespace

TEST_CASE("sphere volume weights reproduce the mean of r^2 = 3R^2/5", "[sampling]") {
  // <r^2> over a ball = 3R^2/5 (elementary integral; common practice, no source).
  const Target t = sphere_target(0.05);
  for (Symmetry sym : {Symmetry{false, false}, Symmetry{true, false}, Symmetry{true, true}}) {
    const SampleSet s = sample_region(t, sym);
    double total = 0.0;
    for (double w : s.weights) total += w;
    CHECK(total == Approx(1.0).epsilon(1e-14));
    // The 3-D rule uses an equal-area lattice for directions; r^2 does not depend on them.
    CHECK(weighted_mean_r2(s, t.centre_m) == Approx(0.6 * 0.05 * 0.05).epsilon(1e-12));
    for (std::size_t i = 0; i < s.boundary.size(); ++i) CHECK(s.boundary[i].norm() == Approx(0.05).epsilon(1e-14));
  }
}

TEST_CASE("axisymmetric samples lie in one half-plane, mirrored ones on one side", "[sampling]") {
  const Target t = sphere_target(0.1);
  const SampleSet s = sample_region(t, Symmetry{true, true});
  for (std::size_t i = 0; i < s.boundary.size(); ++i) {
    CHECK(std::abs(s.boundary.y[i]) < 1e-15);
    CHECK(s.boundary.x[i] >= 0.0);
    CHECK(s.boundary.z[i] >= -1e-15);
  }
  // Far fewer points than the full 3-D surface at the same resolution.
  CHECK(s.boundary.size() * 20 < sample_region(t, Symmetry{}).boundary.size());
}

TEST_CASE("symmetry is detected from the coil system", "[sampling]") {
  const std::string base = R"(
[[circuit]]
name = "main"
current = "1 A"
[[coil]]
name = "pair"
shape = "loop"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 1
radius = "1 m"
separation = "1 m"
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "0.3 m"
goal = "uniform"
field = ["0 T", "0 T", "1 uT"]
tolerance = "1 %"
)";
  const Model coaxial = parse_model(base, "sym.toml");
  CHECK(detect_symmetry(coaxial).axisymmetric);
  CHECK(detect_symmetry(coaxial).mirrored);
  Model tilted = coaxial;
  tilted.coils[0].axis = Vec3(0, 1, 1).normalized();
  CHECK_FALSE(detect_symmetry(tilted).axisymmetric);
  Model shifted = coaxial;
  shifted.coils[0].centre_m = Vec3(0, 0, 0.1);
  CHECK(detect_symmetry(shifted).axisymmetric);
  CHECK_FALSE(detect_symmetry(shifted).mirrored);
}

TEST_CASE("sample counts bound what sampling makes for every region and symmetry", "[sampling]") {
  // count_samples must never undercount (the reader refuses by it) and should not overcount by
  // much without symmetry (it is the limit users see).
  std::vector<Target> targets;
  for (int res : {2, 5, 12, 40}) {
    Target s = sphere_target(0.2);
    s.resolution = res;
    Target c = s;
    c.region = RegionKind::cylinder;
    c.length_m = 0.7;
    Target b = s;
    b.region = RegionKind::box;
    b.size_m = Vec3(0.3, 0.1, 0.05);
    Target p = b;
    p.region = RegionKind::plane;
    p.size_m = Vec3(0.3, 0.02, 0.0);
    targets.insert(targets.end(), {s, c, b, p});
  }
  for (const Target& t : targets) {
    const SampleCount count = count_samples(t);
    INFO("region " << to_string(t.region) << ", resolution " << t.resolution);
    REQUIRE(count.within_limits());
    for (Symmetry sym : {Symmetry{false, false}, Symmetry{true, false}, Symmetry{true, true}}) {
      const SampleSet s = sample_region(t, sym);
      CHECK(static_cast<double>(s.volume.size() + s.boundary.size()) <= count.points);
    }
    const SampleSet full = sample_region(t, Symmetry{});
    CHECK(static_cast<double>(full.volume.size() + full.boundary.size()) >= 0.5 * count.points);
  }
}

TEST_CASE("targets too large to sample are refused by the reader with the count", "[sampling][config]") {
  // Before: a thin box or a long cylinder asked for ~1e12 samples (a hang, then out of memory),
  // and a resolution above 128 threw std::out_of_range from the Gauss-Legendre table (exit 1).
  const std::string coil = "[[circuit]]\nname = \"main\"\ncurrent = \"1 A\"\n"
                           "[[coil]]\nname = \"a\"\nshape = \"loop\"\nradius = \"2 m\"\n";
  const auto refusal = [&](const std::string& target) {
    try {
      (void)parse_model(coil + "[target]\n" + target + "goal = \"null\"\n", "big.toml");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("accepted");
  };
  using Catch::Matchers::Contains;
  CHECK_THAT(refusal("region = \"box\"\nsize = [\"1 m\", \"1 m\", \"10 um\"]\n"),
             Contains("big.toml:9:10") && Contains("target.region") && Contains("sample points") &&
                 Contains("at most 4e+06 points"));
  CHECK_THAT(refusal("region = \"cylinder\"\nradius = \"1 mm\"\nlength = \"100 m\"\n"),
             Contains("target.region") && Contains("less elongated"));
  CHECK_THAT(refusal("region = \"sphere\"\nradius = \"0.1 m\"\nresolution = 129\n"),
             Contains("target.resolution") && Contains("found 129; accepted: an integer from 2 to 128"));
  CHECK_THAT(refusal("region = \"box\"\nsize = [\"1 m\", \"1 m\", \"0.1 m\"]\nresolution = 100\n"),
             Contains("big.toml:11:14") && Contains("target.resolution") && Contains("resolution 100 would need"));
  CHECK(refusal("region = \"sphere\"\nradius = \"0.1 m\"\nresolution = 128\n") == "accepted");

  // A target built in code is refused by the sampler itself.
  Target t = sphere_target(0.1);
  t.region = RegionKind::plane;
  t.size_m = Vec3(1.0, 1e-9, 0.0);
  CHECK_THROWS_AS(sample_region(t, Symmetry{}), DomainError);
}
