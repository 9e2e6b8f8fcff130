// On-axis (zonal harmonic) expansion of coil systems.
#include <catch2/catch.hpp>

#include <cmath>

#include <fmt/format.h>

#include "coilwright/config.hpp"
#include "coilwright/constants.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/zonal.hpp"

using namespace coilwright;

namespace {

// Gegenbauer C_n^{3/2}(x) by the recurrence of Abramowitz & Stegun 22.7.3.
double gegenbauer_3_2(int n, double x) {
  double c0 = 1.0, c1 = 3.0 * x;
  if (n == 0) return c0;
  for (int k = 2; k <= n; ++k) {
    const double c2 = (2.0 * x * (k + 0.5) * c1 - (k + 1.0) * c0) / k;
    c0 = c1;
    c1 = c2;
  }
  return c1;
}

Model loop_model(double radius, double z0) {
  return parse_model(fmt::format(R"(
[[circuit]]
name = "main"
current = "1 A"
[[coil]]
name = "loop"
shape = "loop"
centre = ["0 m", "0 m", "{} m"]
axis = [0, 0, 1]
turns = 1
radius = "{} m"
)", z0, radius), "loop.toml");
}

}  // namespace

TEST_CASE("a loop's on-axis Taylor coefficients match the Gegenbauer expansion", "[zonal]") {
  // B(z) = mu0 I a^2 / (2 (a^2 + (z - z0)^2)^{3/2}); with R^2 = a^2 + z0^2, cos(alpha) = z0/R the
  // generating function of C_n^{3/2} (A&S 22.9.3) gives b_n = mu0 I a^2 C_n^{3/2}(cos alpha) / (2 R^{n+3}).
  for (auto [a, z0] : {std::pair{1.0, 0.0}, std::pair{0.3, 0.2}, std::pair{2.0, -1.5}}) {
    const Model m = loop_model(a, z0);
    const AxialResponse r = axial_response(m, Vec3::Zero(), Vec3::UnitZ(), 10);
    const double R = std::hypot(a, z0);
    for (int n = 0; n <= 10; ++n) {
      const double exact = mu0 * a * a * gegenbauer_3_2(n, z0 / R) / (2.0 * std::pow(R, n + 3));
      // per_ampere holds b_n h^n; compare on the scale of the leading term (double-precision
      // Chebyshev fit amplified by the monomial conversion: 1e-11 of b_0 suffices for orders <= 10).
      CHECK(r.per_ampere(n, 0) == Approx(exact * std::pow(r.scale_m, n)).margin(1e-11 * r.per_ampere.row(0).norm()));
    }
  }
}

TEST_CASE("a Helmholtz pair is of fourth order with b4/b0 = -144/125", "[zonal]") {
  // B(z) = B0 (1 - (144/125)(z/R)^4 + ...): tests/reference/design_references.txt (mpmath).
  Model m = parse_model(R"(
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
radius = "0.1 m"
goal = "uniform"
field = ["0 T", "0 T", "1 uT"]
tolerance = "1 %"
)", "helmholtz.toml");
  Evaluator ev(m);
  const Metrics metrics = ev.metrics(m);
  REQUIRE(metrics.order.has_value());
  CHECK(*metrics.order == 4);
  const double d = metrics.zonal_scale_m;  // distance to the wire: sqrt(1 + 1/4)
  CHECK(d == Approx(std::sqrt(1.25)).epsilon(1e-12));
  CHECK(metrics.zonal[4] == Approx(-1.152 * std::pow(d, 4)).epsilon(1e-9));
  CHECK(metrics.zonal[6] == Approx(1.261568 * std::pow(d, 6)).epsilon(1e-8));
  CHECK(std::abs(metrics.zonal[2]) < 1e-12);
}

TEST_CASE("Chebyshev to monomial conversion is exact for T_m", "[zonal]") {
  // T_4 = 8x^4 - 8x^2 + 1 (A&S 22.3.15).
  const auto mono = chebyshev_to_monomial({0, 0, 0, 0, 1}, 4);
  CHECK(mono[0] == Approx(1));
  CHECK(mono[2] == Approx(-8));
  CHECK(mono[4] == Approx(8));
}
