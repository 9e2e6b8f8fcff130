#include "coilwright/units.hpp"

#include <array>
#include <charconv>
#include <cmath>
#include <numbers>
#include <optional>
#include <system_error>
#include <utility>
#include <vector>

#include <fmt/format.h>

namespace coilwright {

namespace detail {

// One accepted unit symbol. The value in SI is number * 10^exp10 * factor + offset; powers of
// ten are applied by one multiplication or division by an exact power, so "250 mm" gives
// exactly 0.25 and values written in the SI unit read back unchanged.
struct UnitDef {
  std::string symbol;
  Dimension dim;
  int exp10 = 0;
  double factor = 1.0;  // non-decimal conversions: inch, minute, degree
  double offset = 0.0;  // degC as an absolute temperature
};

namespace {

struct Prefix {
  std::string_view symbol;
  int exp10;
};
constexpr std::array<Prefix, 9> kPrefixes{{{"p", -12}, {"n", -9}, {"u", -6}, {"m", -3}, {"c", -2},
                                           {"", 0}, {"k", 3}, {"M", 6}, {"G", 9}}};

int prefix_exp(std::string_view p) {
  for (const auto& [s, e] : kPrefixes)
    if (s == p) return e;
  return 0;
}

// Adds `base` with each prefix listed ("-" = no prefix).
void add_prefixed(std::vector<UnitDef>& out, Dimension dim, std::string_view base, int base_exp,
                  std::initializer_list<std::string_view> prefixes) {
  for (std::string_view p : prefixes) {
    const std::string_view pre = p == "-" ? std::string_view{} : p;
    out.push_back({std::string(pre) + std::string(base), dim, base_exp + prefix_exp(pre)});
  }
}

std::vector<UnitDef> build_units() {
  using D = Dimension;
  std::vector<UnitDef> u;
  add_prefixed(u, D::length, "m", 0, {"-", "m", "c", "u", "n", "k"});
  u.push_back({"in", D::length, 0, 0.0254});  // exact by definition (1959)
  u.push_back({"ft", D::length, 0, 0.3048});
  add_prefixed(u, D::current, "A", 0, {"-", "m", "u", "n", "k"});
  add_prefixed(u, D::flux_density, "T", 0, {"-", "m", "u", "n", "p"});
  add_prefixed(u, D::flux_density, "G", -4, {"-", "m", "u", "k"});  // gauss = 1e-4 T
  // Gradients: a flux density over a length.
  struct Part {
    std::string_view symbol;
    int exp10;
  };
  constexpr std::array<Part, 7> flux{{{"T", 0}, {"mT", -3}, {"uT", -6}, {"nT", -9}, {"pT", -12}, {"G", -4}, {"mG", -7}}};
  constexpr std::array<Part, 3> per{{{"m", 0}, {"cm", -2}, {"mm", -3}}};
  for (const auto& f : flux)
    for (const auto& l : per)
      u.push_back({fmt::format("{}/{}", f.symbol, l.symbol), D::gradient, f.exp10 - l.exp10});
  add_prefixed(u, D::angle, "rad", 0, {"-", "m", "u"});
  u.push_back({"deg", D::angle, 0, std::numbers::pi / 180.0});
  add_prefixed(u, D::voltage, "V", 0, {"-", "m", "u", "k"});
  add_prefixed(u, D::power, "W", 0, {"-", "m", "u", "k", "M"});
  add_prefixed(u, D::resistance, "ohm", 0, {"-", "m", "u", "k", "M"});
  add_prefixed(u, D::inductance, "H", 0, {"-", "m", "u", "n"});
  add_prefixed(u, D::temperature, "K", 0, {"-", "m"});
  u.push_back({"degC", D::temperature, 0, 1.0, 273.15});
  add_prefixed(u, D::temperature_difference, "K", 0, {"-", "m"});
  u.push_back({"degC", D::temperature_difference, 0, 1.0});
  add_prefixed(u, D::frequency, "Hz", 0, {"-", "m", "k", "M", "G"});
  add_prefixed(u, D::time, "s", 0, {"-", "m", "u", "n"});
  u.push_back({"min", D::time, 0, 60.0});
  u.push_back({"h", D::time, 0, 3600.0});
  u.push_back({"%", D::ratio, -2});
  u.push_back({"ppm", D::ratio, -6});
  u.push_back({"ppb", D::ratio, -9});
  for (std::string_view s : {"W/(m^2 K)", "W/(m2 K)", "W/m^2/K", "W/m2/K", "W/m2K", "W/m^2K"})
    u.push_back({std::string(s), D::heat_transfer, 0});
  return u;
}

const std::vector<UnitDef>& units() {
  static const std::vector<UnitDef> table = build_units();
  return table;
}

struct DimInfo {
  Dimension dim;
  std::string_view si;
  std::string_view name;
  std::string_view example;
};
constexpr std::array<DimInfo, 15> kDims{{
    {Dimension::length, "m", "length", "250 mm"},
    {Dimension::current, "A", "current", "2.5 A"},
    {Dimension::flux_density, "T", "magnetic flux density", "200 uT"},
    {Dimension::gradient, "T/m", "field gradient", "10 mT/m"},
    {Dimension::angle, "rad", "angle", "0.5 deg"},
    {Dimension::voltage, "V", "voltage", "30 V"},
    {Dimension::power, "W", "power", "100 W"},
    {Dimension::resistance, "ohm", "resistance", "2 ohm"},
    {Dimension::inductance, "H", "inductance", "1 mH"},
    {Dimension::temperature, "K", "temperature", "20 degC"},
    {Dimension::temperature_difference, "K", "temperature difference", "5 K"},
    {Dimension::frequency, "Hz", "frequency", "50 Hz"},
    {Dimension::time, "s", "time", "10 min"},
    {Dimension::ratio, "1", "ratio", "0.1 %"},
    {Dimension::heat_transfer, "W/(m^2 K)", "heat transfer coefficient", "5 W/(m^2 K)"},
}};

const DimInfo& info(Dimension d) {
  for (const auto& i : kDims)
    if (i.dim == d) return i;
  return kDims[0];
}

// Replaces every occurrence of `from` in `s` by `to`.
void replace_all(std::string& s, std::string_view from, std::string_view to) {
  for (std::size_t pos = s.find(from); pos != std::string::npos; pos = s.find(from, pos + to.size()))
    s.replace(pos, from.size(), to);
}

// Spellings that mean the same unit: micro signs, ohm signs, degree signs, product dots.
std::string normalise_unit(std::string_view raw) {
  std::string s(raw);
  replace_all(s, "\xC2\xB5", "u");      // U+00B5 MICRO SIGN
  replace_all(s, "\xCE\xBC", "u");      // U+03BC GREEK SMALL LETTER MU
  replace_all(s, "\xCE\xA9", "ohm");    // U+03A9 GREEK CAPITAL LETTER OMEGA
  replace_all(s, "\xE2\x84\xA6", "ohm");  // U+2126 OHM SIGN
  replace_all(s, "\xC2\xB0" "C", "degC");  // U+00B0 DEGREE SIGN
  replace_all(s, "\xC2\xB0", "deg");
  replace_all(s, "\xC2\xB7", " ");      // U+00B7 MIDDLE DOT
  replace_all(s, "*", " ");
  replace_all(s, "\xC2\xB2", "^2");     // U+00B2 SUPERSCRIPT TWO
  // Collapse runs of spaces.
  std::string out;
  for (char c : s) {
    if (c == ' ' && (out.empty() || out.back() == ' ')) continue;
    out.push_back(c);
  }
  while (!out.empty() && out.back() == ' ') out.pop_back();
  return out;
}

const UnitDef* find_unit(std::string_view symbol, std::optional<Dimension> dim) {
  for (const auto& u : units())
    if (u.symbol == symbol && (!dim || u.dim == *dim)) return &u;
  return nullptr;
}

bool is_space(char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\r'; }

std::string_view trim(std::string_view s) {
  while (!s.empty() && is_space(s.front())) s.remove_prefix(1);
  while (!s.empty() && is_space(s.back())) s.remove_suffix(1);
  return s;
}

double scale(double x, int exp10) {
  // 10^k is exact in double for k <= 22, so one multiplication or division rounds once.
  static constexpr std::array<double, 23> kPow{1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                               1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                               1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
  if (exp10 >= 0) return x * kPow[static_cast<std::size_t>(exp10)];
  return x / kPow[static_cast<std::size_t>(-exp10)];
}

}  // namespace
}  // namespace detail

std::string_view si_unit(Dimension d) noexcept { return detail::info(d).si; }

std::string_view dimension_name(Dimension d) noexcept { return detail::info(d).name; }

std::string accepted_units(Dimension d) {
  std::string out;
  for (const auto& u : detail::units()) {
    if (u.dim != d) continue;
    if (!out.empty()) out += ", ";
    out += u.symbol;
  }
  if (d == Dimension::ratio) out += " or a bare number";
  if (d == Dimension::resistance) out += " (also \xCE\xA9)";
  return out;
}

double parse_quantity(std::string_view text, Dimension expected) {
  using namespace detail;
  const std::string_view s = trim(text);
  const auto& want = info(expected);
  const auto expect_msg = [&] {
    return fmt::format("a {} is expected, e.g. \"{}\"; accepted units: {}", want.name, want.example,
                       accepted_units(expected));
  };
  if (s.empty()) throw UnitParseError(fmt::format("empty value: {}", expect_msg()));

  // The number: std::from_chars takes no leading '+', so skip one by hand.
  std::string_view num = s;
  bool plus = false;
  if (num.front() == '+') {
    plus = true;
    num.remove_prefix(1);
  }
  double value = 0.0;
  const auto [end, ec] = std::from_chars(num.data(), num.data() + num.size(), value);
  if (ec == std::errc::result_out_of_range)
    throw UnitParseError(fmt::format("the number in \"{}\" is out of the range of a double (non-finite); accepted: "
                                     "numbers of magnitude below about 1.8e308", s));
  if (ec != std::errc{} || (plus && (num.empty() || num.front() == '-' || num.front() == '+')))
    throw UnitParseError(fmt::format("\"{}\" does not start with a number; {}", s, expect_msg()));
  if (!std::isfinite(value))
    throw UnitParseError(fmt::format("\"{}\" is not a finite number; {}", s, expect_msg()));
  const std::string unit = normalise_unit(trim(std::string_view(end, static_cast<std::size_t>(s.data() + s.size() - end))));

  if (unit.empty()) {
    if (expected == Dimension::ratio) return value;
    throw UnitParseError(fmt::format("\"{}\" has no unit; {}", s, expect_msg()));
  }
  if (const UnitDef* u = find_unit(unit, expected)) {
    const double si = scale(value, u->exp10) * u->factor + u->offset;
    if (!std::isfinite(si))
      throw UnitParseError(fmt::format("\"{}\" is not finite in {}; accepted: a {} whose value in {} is below about 1.8e308", s,
                                       want.si, want.name, want.si));
    return si;
  }
  if (const UnitDef* other = find_unit(unit, std::nullopt))
    throw UnitParseError(fmt::format("\"{}\" is a {} ({}), but {}", s, info(other->dim).name, unit, expect_msg()));
  throw UnitParseError(fmt::format("unknown unit \"{}\" in \"{}\"; {}", unit, s, expect_msg()));
}

}  // namespace coilwright
