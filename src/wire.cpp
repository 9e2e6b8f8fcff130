#include "coilwright/wire.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <exception>
#include <initializer_list>
#include <numbers>
#include <string>

#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/units.hpp"

namespace coilwright {

Material copper() {
  // IEC 60028 (International Standard of Resistance for Copper): 1/58 ohm mm^2/m at 20 degC.
  return {"copper", 1e-6 / 58.0, 0.00393, 8890.0};
}

Material aluminium() {
  // IEC 60889 hard-drawn aluminium (61 % IACS), from memory.
  return {"aluminium", 0.028264e-6, 0.00403, 2703.0};
}

std::optional<Material> material_from_string(std::string_view name) {
  if (name == "copper") return copper();
  if (name == "aluminium" || name == "aluminum") return aluminium();
  return std::nullopt;
}

double Wire::conductor_area_m2() const noexcept {
  if (form == WireForm::round) return std::numbers::pi / 4.0 * bare_diameter_m * bare_diameter_m;
  // A rectangle less the four corners cut to radius r: (4 - pi) r^2.
  return bare_width_m * bare_thickness_m - (4.0 - std::numbers::pi) * corner_radius_m * corner_radius_m;
}

double Wire::outer_width_m() const noexcept {
  return (form == WireForm::round ? bare_diameter_m : bare_width_m) + 2.0 * insulation_m;
}

double Wire::outer_thickness_m() const noexcept {
  return (form == WireForm::round ? bare_diameter_m : bare_thickness_m) + 2.0 * insulation_m;
}

double Wire::resistance_per_m(double temperature_K) const noexcept {
  return material.resistivity_at(temperature_K) / conductor_area_m2();
}

double Wire::mass_per_m() const noexcept { return material.density_kg_m3 * conductor_area_m2(); }

void Wire::validate() const {
  auto positive = [&](double v, std::string_view what) {
    if (!(std::isfinite(v) && v > 0.0))
      throw InputError(fmt::format("wire '{}': {} must be positive, got {}", label, what, v));
  };
  if (form == WireForm::round) {
    positive(bare_diameter_m, "the diameter");
  } else {
    positive(bare_width_m, "the width");
    positive(bare_thickness_m, "the thickness");
    if (!(corner_radius_m >= 0.0 && 2.0 * corner_radius_m <= std::min(bare_width_m, bare_thickness_m)))
      throw InputError(fmt::format("wire '{}': the corner radius {} mm must lie between 0 and half the "
                                   "smaller side", label, corner_radius_m * 1e3));
  }
  if (!(std::isfinite(insulation_m) && insulation_m >= 0.0))
    throw InputError(fmt::format("wire '{}': the insulation must be zero or positive", label));
  positive(material.resistivity_ohm_m, "the resistivity");
  positive(material.density_kg_m3, "the density");
  if (!(std::isfinite(material.alpha_per_K) && material.alpha_per_K >= 0.0 && material.alpha_per_K < 0.1))
    throw InputError(fmt::format("wire '{}': the temperature coefficient must lie in [0, 0.1) /K", label));
}

double awg_diameter_m(int gauge) {
  if (gauge < -3 || gauge > 56)
    throw InputError(fmt::format("AWG {} is outside the ASTM B258 range 4/0 (0000) to 56", gauge));
  return 0.127e-3 * std::pow(92.0, (36.0 - gauge) / 39.0);
}

std::optional<int> awg_gauge_from_string(std::string_view s) {
  if (s.size() == 3 && s[1] == '/' && s[2] == '0' && s[0] >= '1' && s[0] <= '4') return 1 - (s[0] - '0');
  if (!s.empty() && std::all_of(s.begin(), s.end(), [](char c) { return c == '0'; }) && s.size() <= 4)
    return 1 - static_cast<int>(s.size());
  if (s.empty() || s.size() > 2 || !std::all_of(s.begin(), s.end(), [](char c) { return std::isdigit(static_cast<unsigned char>(c)); }))
    return std::nullopt;
  if (s[0] == '0') return std::nullopt;  // "05" is not a gauge
  const int n = std::stoi(std::string(s));
  if (n > 56) return std::nullopt;
  return n;
}

std::string awg_name(int gauge) { return gauge <= 0 ? fmt::format("{}/0", 1 - gauge) : std::to_string(gauge); }

const std::vector<double>& metric_nominal_diameters_m() {
  // R20 (preferred) and R40 (intermediate) series of ISO 3, 0.018 mm to 5.000 mm, as listed for
  // nominal conductor diameters in IEC 60317-0-1 (from memory).
  static const std::vector<double> table = [] {
    const double mm[] = {
        0.018, 0.019, 0.020, 0.021, 0.022, 0.024, 0.025, 0.027, 0.028, 0.030, 0.032, 0.034, 0.036,
        0.038, 0.040, 0.043, 0.045, 0.048, 0.050, 0.053, 0.056, 0.060, 0.063, 0.067, 0.071, 0.075,
        0.080, 0.085, 0.090, 0.095, 0.100, 0.106, 0.112, 0.118, 0.125, 0.132, 0.140, 0.150, 0.160,
        0.170, 0.180, 0.190, 0.200, 0.212, 0.224, 0.236, 0.250, 0.265, 0.280, 0.300, 0.315, 0.335,
        0.355, 0.375, 0.400, 0.425, 0.450, 0.475, 0.500, 0.530, 0.560, 0.600, 0.630, 0.670, 0.710,
        0.750, 0.800, 0.850, 0.900, 0.950, 1.000, 1.060, 1.120, 1.180, 1.250, 1.320, 1.400, 1.500,
        1.600, 1.700, 1.800, 1.900, 2.000, 2.120, 2.240, 2.360, 2.500, 2.650, 2.800, 3.000, 3.150,
        3.350, 3.550, 3.750, 4.000, 4.250, 4.500, 4.750, 5.000};
    std::vector<double> v;
    for (double d : mm) v.push_back(d * 1e-3);
    return v;
  }();
  return table;
}

double enamel_build_m(double bare_diameter_m, int grade) {
  if (grade < 1 || grade > 3) throw InputError(fmt::format("insulation grade {} is not 1, 2 or 3", grade));
  const double increase_grade2_m = 0.093e-3 * std::pow(bare_diameter_m / 1e-3, 0.45);
  const double factor = grade == 1 ? 2.0 / 3.0 : grade == 2 ? 1.0 : 4.0 / 3.0;
  return 0.5 * factor * increase_grade2_m;
}

namespace {

std::string material_suffix(const Material& m) { return m.name == "copper" ? "" : ", " + m.name; }

std::string trim(std::string_view s) {
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
  return std::string(s);
}

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

[[noreturn]] void bad_spec(std::string_view spec, std::string_view why) {
  throw InputError(fmt::format(
      "wire \"{}\": {}; write \"AWG 20\", \"0.8 mm\" (an IEC 60317 nominal diameter), \"2.5 x 1.2 mm\" "
      "(rectangular), optionally followed by \", grade 1|2|3\" and \", aluminium\", or a table "
      "{{ diameter = \"0.8 mm\", insulation = \"0.04 mm\", material = \"copper\" }}",
      spec, why));
}

}  // namespace

Wire awg_wire(int gauge, int grade, const Material& m) {
  Wire w;
  w.bare_diameter_m = awg_diameter_m(gauge);
  w.grade = grade;
  w.insulation_m = enamel_build_m(w.bare_diameter_m, grade);
  w.material = m;
  w.label = fmt::format("AWG {}{}{}", awg_name(gauge), grade == 2 ? "" : fmt::format(", grade {}", grade),
                        material_suffix(m));
  return w;
}

Wire metric_wire(double nominal_diameter_m, int grade, const Material& m) {
  Wire w;
  w.bare_diameter_m = nominal_diameter_m;
  w.grade = grade;
  w.insulation_m = enamel_build_m(nominal_diameter_m, grade);
  w.material = m;
  w.label = fmt::format("{:g} mm{}{}", nominal_diameter_m * 1e3,
                        grade == 2 ? "" : fmt::format(", grade {}", grade), material_suffix(m));
  return w;
}

Wire rectangular_wire(double width_m, double thickness_m, double corner_radius_m, double insulation_m,
                      const Material& m) {
  Wire w;
  w.form = WireForm::rectangular;
  w.bare_width_m = width_m;
  w.bare_thickness_m = thickness_m;
  w.corner_radius_m = corner_radius_m;
  w.insulation_m = insulation_m;
  w.material = m;
  w.label = fmt::format("{:g} x {:g} mm{}", width_m * 1e3, thickness_m * 1e3, material_suffix(m));
  return w;
}

Wire custom_round_wire(double diameter_m, double insulation_m, const Material& m) {
  Wire w;
  w.bare_diameter_m = diameter_m;
  w.insulation_m = insulation_m;
  w.material = m;
  w.label = fmt::format("{:g} mm over {:g} mm insulation{}", diameter_m * 1e3, insulation_m * 1e3,
                        material_suffix(m));
  return w;
}

Wire parse_wire(std::string_view spec) {
  // Split off the optional qualifiers: ", grade N" and a material name.
  std::string body = lower(trim(spec));
  int grade = 2;
  Material material = copper();
  for (bool changed = true; changed;) {
    changed = false;
    std::string t = trim(body);
    while (!t.empty() && t.back() == ',') t = trim(std::string_view(t).substr(0, t.size() - 1));
    for (const char* name : {"aluminium", "aluminum", "copper"}) {
      const std::string n = name;
      if (t.size() > n.size() && t.ends_with(n)) {
        material = *material_from_string(n);
        t = t.substr(0, t.size() - n.size());
        changed = true;
        break;
      }
    }
    if (!changed && t.size() > 7 && t.substr(t.size() - 7, 6) == "grade ") {
      const char g = t.back();
      if (g < '1' || g > '3') bad_spec(spec, "the insulation grade must be 1, 2 or 3");
      grade = g - '0';
      t = t.substr(0, t.size() - 7);
      changed = true;
    }
    body = trim(t);
    while (!body.empty() && body.back() == ',') body.pop_back();
  }
  body = trim(body);
  if (body.empty()) bad_spec(spec, "no size given");

  // AWG n / n AWG
  if (body.starts_with("awg") || body.ends_with("awg")) {
    const std::string g = trim(body.starts_with("awg") ? std::string_view(body).substr(3)
                                                       : std::string_view(body).substr(0, body.size() - 3));
    const auto gauge = awg_gauge_from_string(g);
    if (!gauge) bad_spec(spec, fmt::format("'{}' is not an AWG gauge from 4/0 to 56", g));
    return awg_wire(*gauge, grade, material);
  }

  // Rectangular: "<w> x <t> <unit>"
  if (const auto x = body.find(" x "); x != std::string::npos) {
    const std::string first = trim(std::string_view(body).substr(0, x));
    const std::string second = trim(std::string_view(body).substr(x + 3));
    const auto unit_at = second.find_first_not_of("0123456789.eE+-");
    if (unit_at == std::string::npos) bad_spec(spec, "the rectangle has no unit");
    const std::string unit = second.substr(unit_at);
    double w = 0.0, t = 0.0;
    try {
      w = parse_quantity(first.find_first_not_of("0123456789.eE+-") == std::string::npos ? first + " " + unit : first,
                         Dimension::length);
      t = parse_quantity(second, Dimension::length);
    } catch (const UnitParseError& e) {
      bad_spec(spec, e.what());
    }
    // Enamel on rectangular wire: the grade-2 build of a round wire of the smaller side (an estimate).
    Wire r = rectangular_wire(w, t, 0.0, enamel_build_m(std::min(w, t), grade), material);
    r.grade = grade;
    r.validate();
    return r;
  }

  // Metric nominal diameter.
  double d = 0.0;
  try {
    d = parse_quantity(body, Dimension::length);
  } catch (const UnitParseError& e) {
    bad_spec(spec, e.what());
  }
  const auto& table = metric_nominal_diameters_m();
  const auto it = std::lower_bound(table.begin(), table.end(), d * (1.0 - 1e-9));
  if (it != table.end() && std::abs(*it - d) <= 1e-9 * d) return metric_wire(*it, grade, material);
  std::string nearest;
  if (it != table.begin()) nearest += fmt::format("{:.3f} mm", *(it - 1) * 1e3);
  if (it != table.end()) nearest += fmt::format("{}{:.3f} mm", nearest.empty() ? "" : " or ", *it * 1e3);
  throw InputError(fmt::format(
      "wire \"{}\": {:g} mm is not an IEC 60317 nominal diameter (0.018 mm to 5 mm); the nearest are {}. "
      "For another diameter write a table: {{ diameter = \"{:g} mm\", insulation = \"0.03 mm\" }}",
      spec, d * 1e3, nearest.empty() ? "none" : nearest, d * 1e3));
}

namespace {

// "<number> <unit>" with the unit one of `units` (name, factor to SI); InputError keyed by `key`.
double scaled(const std::string& text, std::string_view key,
              std::initializer_list<std::pair<std::string_view, double>> units) {
  const std::string t = trim(text);
  std::size_t used = 0;
  double v = 0.0;
  try {
    v = std::stod(t, &used);
  } catch (const std::exception&) {
    used = 0;
  }
  std::string accepted;
  for (const auto& [u, f] : units) accepted += fmt::format("{}\"{}\"", accepted.empty() ? "" : ", ", u);
  if (used == 0 || !std::isfinite(v))
    throw InputError(SourceLocation{}, std::string(key), fmt::format("expected a number and a unit ({}), found \"{}\"", accepted, text));
  const std::string unit = trim(std::string_view(t).substr(used));
  for (const auto& [u, f] : units)
    if (unit == u) return v * f;
  throw InputError(SourceLocation{}, std::string(key), fmt::format("unknown unit \"{}\"; accepted: {}", unit, accepted));
}

double length_of(const std::string& text, std::string_view key) {
  try {
    return parse_quantity(text, Dimension::length);
  } catch (const UnitParseError& e) {
    throw InputError(SourceLocation{}, std::string(key), e.what());
  }
}

std::string quoted(std::string_view s) {
  std::string out = "\"";
  for (char c : s) {
    if (c == '"' || c == '\\') out += '\\';
    out += c;
  }
  return out + "\"";
}

}  // namespace

Wire wire_from_table(const WireTable& t) {
  Material m = copper();
  if (t.material) {
    const auto known = material_from_string(lower(trim(*t.material)));
    if (known) {
      m = *known;
    } else {
      if (!t.resistivity || !t.temperature_coefficient || !t.density)
        throw InputError(SourceLocation{}, "material",
                         fmt::format("unknown material \"{}\": name copper or aluminium, or give resistivity, "
                                     "temperature_coefficient and density", *t.material));
      m.name = trim(*t.material);
    }
  }
  if (t.resistivity)
    m.resistivity_ohm_m = scaled(*t.resistivity, "resistivity",
                                 {{"ohm m", 1.0}, {"ohm mm2/m", 1e-6}, {"ohm mm^2/m", 1e-6}, {"uohm cm", 1e-8}});
  if (t.temperature_coefficient)
    m.alpha_per_K = scaled(*t.temperature_coefficient, "temperature_coefficient", {{"/K", 1.0}, {"1/K", 1.0}, {"ppm/K", 1e-6}});
  if (t.density)
    m.density_kg_m3 = scaled(*t.density, "density", {{"kg/m3", 1.0}, {"kg/m^3", 1.0}, {"g/cm3", 1e3}, {"g/cm^3", 1e3}});

  const bool rect = t.width || t.thickness;
  if (rect && t.diameter)
    throw InputError(SourceLocation{}, "diameter", "give either a diameter (round wire) or width and thickness (rectangular)");
  if (!rect && !t.diameter)
    throw InputError(SourceLocation{}, "diameter", "a wire table needs a diameter, or a width and thickness");
  if (rect && !(t.width && t.thickness))
    throw InputError(SourceLocation{}, t.width ? "thickness" : "width", "a rectangular wire needs both width and thickness");
  if (!rect && t.corner_radius) throw InputError(SourceLocation{}, "corner_radius", "a corner radius applies to rectangular wire only");

  const double size = rect ? std::min(length_of(*t.width, "width"), length_of(*t.thickness, "thickness"))
                           : length_of(*t.diameter, "diameter");
  int grade = 0;
  double insulation = 0.0;
  if (t.insulation) {
    const std::string ins = lower(trim(*t.insulation));
    if (ins.starts_with("grade")) {
      const std::string g = trim(std::string_view(ins).substr(5));
      if (g != "1" && g != "2" && g != "3")
        throw InputError(SourceLocation{}, "insulation", fmt::format("\"{}\": the IEC 60317 grades are 1, 2 and 3", *t.insulation));
      grade = g[0] - '0';
      insulation = enamel_build_m(size, grade);
    } else {
      insulation = length_of(*t.insulation, "insulation");
    }
  }
  Wire w;
  if (rect) {
    w = rectangular_wire(length_of(*t.width, "width"), length_of(*t.thickness, "thickness"),
                         t.corner_radius ? length_of(*t.corner_radius, "corner_radius") : 0.0, insulation, m);
  } else {
    w = custom_round_wire(size, insulation, m);
    if (grade != 0) w.label = fmt::format("{:g} mm, grade {}{}", size * 1e3, grade, material_suffix(m));
  }
  w.grade = grade;
  try {
    w.validate();
  } catch (const InputError& e) {
    throw InputError(SourceLocation{}, "", e.what());
  }
  return w;
}

std::string wire_toml(const Wire& w) {
  // A catalogue label that parses back to the same wire is written as the string spec.
  try {
    const Wire back = parse_wire(w.label);
    auto same = [](double a, double b) { return std::abs(a - b) <= 1e-12 * std::max(std::abs(a), std::abs(b)); };
    if (back.form == w.form && same(back.bare_diameter_m, w.bare_diameter_m) && same(back.bare_width_m, w.bare_width_m) &&
        same(back.bare_thickness_m, w.bare_thickness_m) && same(back.insulation_m, w.insulation_m) &&
        back.corner_radius_m == w.corner_radius_m && back.material.name == w.material.name &&
        same(back.material.resistivity_ohm_m, w.material.resistivity_ohm_m))
      return quoted(w.label);
  } catch (const InputError&) {
  }
  std::string out = "{ ";
  if (w.form == WireForm::round) {
    out += fmt::format("diameter = \"{:.17g} m\"", w.bare_diameter_m);
  } else {
    out += fmt::format("width = \"{:.17g} m\", thickness = \"{:.17g} m\"", w.bare_width_m, w.bare_thickness_m);
    if (w.corner_radius_m > 0.0) out += fmt::format(", corner_radius = \"{:.17g} m\"", w.corner_radius_m);
  }
  out += fmt::format(", insulation = \"{:.17g} m\", material = {}, resistivity = \"{:.17g} ohm m\", "
                     "temperature_coefficient = \"{:.17g} /K\", density = \"{:.17g} kg/m3\" }}",
                     w.insulation_m, quoted(w.material.name), w.material.resistivity_ohm_m, w.material.alpha_per_K,
                     w.material.density_kg_m3);
  return out;
}

}  // namespace coilwright
