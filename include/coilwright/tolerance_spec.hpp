#pragma once
// Build tolerances as declared in a config: a [tolerance] table for every coil and, per coil,
// `tolerance = { ... }` overriding some of its keys. Plain data; the analysis is in tolerance.hpp.
#include <map>
#include <optional>
#include <string>
#include <string_view>

namespace coilwright {

// How a toleranced dimension scatters between builds. The declared value is the standard
// deviation (normal) or the half-width of the interval (uniform).
enum class Distribution { normal, uniform };
[[nodiscard]] std::string_view to_string(Distribution d) noexcept;
[[nodiscard]] std::optional<Distribution> distribution_from_string(std::string_view s) noexcept;

// One set of tolerances; an absent key is not toleranced (or, in a coil's override, inherited).
struct ToleranceSpec {
  std::optional<double> position_m;        // shift of each winding's centre, per Cartesian component [m]
  std::optional<double> tilt_rad;          // tilt of each winding's axis, about each of two cross axes [rad]
  std::optional<double> radius_m;          // radius / inner and outer radius together / each rectangle side [m]
  std::optional<double> turns;             // turns of each winding [count]
  std::optional<double> current_relative;  // relative error of each circuit's current (e.g. 1e-3 = 0.1 %)
  std::optional<double> wire_diameter_m;   // wire diameter [m]; recorded, it does not change the field model
  std::optional<Distribution> distribution;
  [[nodiscard]] bool empty() const noexcept {
    return !position_m && !tilt_rad && !radius_m && !turns && !current_relative && !wire_diameter_m && !distribution;
  }
};

struct Tolerances {
  std::optional<ToleranceSpec> global;               // [tolerance]
  std::map<std::string, ToleranceSpec> per_coil;     // coil name -> its `tolerance = { ... }`
  [[nodiscard]] bool declared() const noexcept { return global.has_value() || !per_coil.empty(); }
  // The coil's override over the global table, key by key (absent keys stay absent).
  [[nodiscard]] ToleranceSpec effective(const std::string& coil) const {
    ToleranceSpec e = global.value_or(ToleranceSpec{});
    const auto it = per_coil.find(coil);
    if (it == per_coil.end()) return e;
    const ToleranceSpec& o = it->second;
    if (o.position_m) e.position_m = o.position_m;
    if (o.tilt_rad) e.tilt_rad = o.tilt_rad;
    if (o.radius_m) e.radius_m = o.radius_m;
    if (o.turns) e.turns = o.turns;
    if (o.current_relative) e.current_relative = o.current_relative;
    if (o.wire_diameter_m) e.wire_diameter_m = o.wire_diameter_m;
    if (o.distribution) e.distribution = o.distribution;
    return e;
  }
};

// How the design search ranks its designs.
enum class RankBy {
  objective,  // nominal objective (the default)
  yield       // fraction of Monte Carlo builds meeting the target tolerance, then the objective
};
[[nodiscard]] std::string_view to_string(RankBy r) noexcept;
[[nodiscard]] std::optional<RankBy> rank_by_from_string(std::string_view s) noexcept;

}  // namespace coilwright
