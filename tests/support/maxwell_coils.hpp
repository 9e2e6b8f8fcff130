#pragma once
// Config text shared by the search tests: Maxwell's three-coil arrangement (Treatise on
// Electricity and Magnetism, 1873, vol. 2, §715) as coaxial loops of 10 turns. A centre loop of
// radius R on circuit "centre", a mirrored pair of radius sqrt(4/7) R on circuit "outer" whose
// separation is free in [min, max] from `start`; both currents are solved within +-10 A.
#include <cmath>
#include <string>

#include <fmt/format.h>

namespace coilwright::test {

inline std::string maxwell_three_coils(double R, double start_m, double min_m, double max_m) {
  return fmt::format(R"(
[[circuit]]
name = "centre"
current = {{ min = "-10 A", max = "10 A" }}
[[circuit]]
name = "outer"
current = {{ min = "-10 A", max = "10 A" }}
[[coil]]
name = "middle"
shape = "loop"
circuit = "centre"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 10
radius = "{R} m"
[[coil]]
name = "ends"
shape = "loop"
circuit = "outer"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
turns = 10
radius = "{ro} m"
separation = {{ start = "{start} m", min = "{lo} m", max = "{hi} m" }}
)",
                     fmt::arg("R", R), fmt::arg("ro", std::sqrt(4.0 / 7.0) * R), fmt::arg("start", start_m),
                     fmt::arg("lo", min_m), fmt::arg("hi", max_m));
}

}  // namespace coilwright::test
