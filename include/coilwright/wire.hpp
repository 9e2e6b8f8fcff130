#pragma once
// Magnet wire: conductor material, bare and insulated dimensions, resistance and mass per length.
// Pure data and formulas, no I/O.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace coilwright {

inline constexpr double kReferenceTemperatureK = 293.15;  // 20 degC, the reference of IEC 60028

// A conductor material: resistivity and its linear temperature coefficient at 20 degC, density.
struct Material {
  std::string name;                    // "copper", "aluminium", or the user's name
  double resistivity_ohm_m = 0.0;      // [ohm m] at 20 degC
  double alpha_per_K = 0.0;            // [1/K] at 20 degC: rho(T) = rho20 (1 + alpha (T - 20 degC))
  double density_kg_m3 = 0.0;          // [kg/m^3]
  // Resistivity at an absolute temperature [K].
  [[nodiscard]] double resistivity_at(double temperature_K) const noexcept {
    return resistivity_ohm_m * (1.0 + alpha_per_K * (temperature_K - kReferenceTemperatureK));
  }
};

// Annealed copper, IEC 60028: 1/58 ohm mm^2/m at 20 degC, alpha20 = 0.00393 /K, 8890 kg/m^3.
[[nodiscard]] Material copper();
// Hard-drawn aluminium, IEC 60889: 0.028264 ohm mm^2/m at 20 degC, alpha20 = 0.00403 /K,
// 2703 kg/m^3 (values from memory of the standard).
[[nodiscard]] Material aluminium();
// "copper" / "aluminium" (also "aluminum"); nullopt otherwise.
[[nodiscard]] std::optional<Material> material_from_string(std::string_view name);

enum class WireForm { round, rectangular };

// One wire: the conductor's bare dimensions, the insulation's radial build and the material.
struct Wire {
  std::string label;                 // how it is written back: "AWG 20", "0.8 mm", ...
  WireForm form = WireForm::round;
  double bare_diameter_m = 0.0;      // round
  double bare_width_m = 0.0;         // rectangular: side along the coil axis
  double bare_thickness_m = 0.0;     // rectangular: side across the layers (radial)
  double corner_radius_m = 0.0;      // rectangular: rounding of the four corners
  double insulation_m = 0.0;         // radial build of the insulation on each side [m]
  int grade = 0;                     // IEC 60317 insulation grade 1..3 (0 = given as a thickness)
  Material material = copper();

  [[nodiscard]] double conductor_area_m2() const noexcept;
  // Overall size over insulation: the pitch of adjacent turns along a layer / of adjacent layers.
  [[nodiscard]] double outer_width_m() const noexcept;      // round: outer diameter
  [[nodiscard]] double outer_thickness_m() const noexcept;  // round: outer diameter
  [[nodiscard]] double resistance_per_m(double temperature_K) const noexcept;  // [ohm/m]
  [[nodiscard]] double mass_per_m() const noexcept;  // [kg/m], conductor only
  // Throws InputError naming the wire when a dimension or property is not positive/finite.
  void validate() const;
};

// ASTM B258: d = 0.127 mm x 92^((36 - n)/39); gauge n from -3 ("0000", "4/0") to 56.
[[nodiscard]] double awg_diameter_m(int gauge);
// "20" -> 20, "0" / "1/0" -> 0, "00" / "2/0" -> -1, "000" / "3/0" -> -2, "0000" / "4/0" -> -3.
[[nodiscard]] std::optional<int> awg_gauge_from_string(std::string_view s);
[[nodiscard]] std::string awg_name(int gauge);  // -3 -> "4/0"

// Nominal bare diameters of enamelled round wire (IEC 60317-0-1 Clause 4: the R20 series with
// the R40 intermediate sizes, ISO 3, from 0.018 mm to 5.000 mm), in metres, ascending.
[[nodiscard]] const std::vector<double>& metric_nominal_diameters_m();

// Radial insulation build of enamelled round wire of bare diameter d for IEC 60317 grade 1..3,
// taken as half the increase to the standard's maximum overall diameter. Approximated (from
// memory of IEC 60317-0-1 Table 1) by inc_grade2 = 0.093 mm x (d / 1 mm)^0.45, grade 1 two thirds
// and grade 3 four thirds of it; give the insulation explicitly where the exact figure matters.
[[nodiscard]] double enamel_build_m(double bare_diameter_m, int grade);

// Catalogue constructors.
[[nodiscard]] Wire awg_wire(int gauge, int grade = 2, const Material& m = copper());
[[nodiscard]] Wire metric_wire(double nominal_diameter_m, int grade = 2, const Material& m = copper());
[[nodiscard]] Wire rectangular_wire(double width_m, double thickness_m, double corner_radius_m,
                                    double insulation_m, const Material& m = copper());
[[nodiscard]] Wire custom_round_wire(double diameter_m, double insulation_m, const Material& m);

// Parses the string forms of a wire spec:
//   "AWG 20", "AWG 4/0", "AWG 0000", "20 AWG"       (ASTM B258, grade 2 unless stated)
//   "0.8 mm", "0.80 mm"                               (an IEC 60317 nominal diameter)
//   "2.5 x 1.2 mm"                                    (rectangular, width x thickness)
// each optionally followed by ", grade 1|2|3" and/or ", aluminium" (words may be separated by
// commas or spaces). Throws InputError with the accepted forms on anything else, and names the
// nearest nominal sizes when a metric diameter is not in the series.
[[nodiscard]] Wire parse_wire(std::string_view spec);

// The table form of a wire spec as written in a config, each value a string with its unit:
//   { diameter = "0.8 mm", insulation = "grade 2" | "0.04 mm", material = "copper" }
//   { width = "4 mm", thickness = "1.5 mm", corner_radius = "0.5 mm", insulation = "0.05 mm" }
//   a material other than copper/aluminium gives resistivity ("1.7e-8 ohm m", "0.0172 ohm mm2/m"),
//   temperature_coefficient ("0.0039 /K") and density ("8900 kg/m3") (these may also override).
struct WireTable {
  std::optional<std::string> diameter, width, thickness, corner_radius, insulation, material, resistivity,
      temperature_coefficient, density;
};
// Throws InputError whose key() names the offending field ("insulation", ...).
[[nodiscard]] Wire wire_from_table(const WireTable& t);

// The wire as a TOML value that reads back to the same wire: the string spec for catalogue wires,
// an inline table with every property otherwise.
[[nodiscard]] std::string wire_toml(const Wire& w);

}  // namespace coilwright
