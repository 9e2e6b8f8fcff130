#include "coilwright/config.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <fstream>
#include <map>
#include <numbers>
#include <set>
#include <sstream>
#include <tuple>
#include <utility>

#include <fmt/format.h>
#include <toml++/toml.h>

#include "coilwright/csv.hpp"
#include "coilwright/sampling.hpp"
#include "coilwright/units.hpp"
#include "coilwright/thermal.hpp"
#include "coilwright/winding.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

namespace detail {
namespace {

// ---- string <-> enum tables ------------------------------------------------------------

template <class E>
struct Named {
  E value;
  std::string_view name;
};

constexpr std::array<Named<RegionKind>, 5> kRegions{{{RegionKind::sphere, "sphere"},
                                                     {RegionKind::cylinder, "cylinder"},
                                                     {RegionKind::box, "box"},
                                                     {RegionKind::plane, "plane"},
                                                     {RegionKind::points, "points"}}};
constexpr std::array<Named<Goal>, 3> kGoals{{{Goal::uniform, "uniform"}, {Goal::gradient, "gradient"}, {Goal::null, "null"}}};
constexpr std::array<Named<Objective>, 3> kObjectives{
    {{Objective::worst, "worst"}, {Objective::rms, "rms"}, {Objective::order, "order"}}};
constexpr std::array<std::string_view, 6> kGlobalAlgorithms{"multistart", "mlsl", "direct", "crs", "isres", "none"};
constexpr std::array<std::string_view, 5> kLocalAlgorithms{"auto", "bobyqa", "cobyla", "neldermead", "sbplx"};

template <class E, std::size_t N>
std::string_view name_of(const std::array<Named<E>, N>& table, E v) noexcept {
  for (const auto& n : table)
    if (n.value == v) return n.name;
  return "?";
}
template <class E, std::size_t N>
std::optional<E> value_of(const std::array<Named<E>, N>& table, std::string_view s) noexcept {
  for (const auto& n : table)
    if (n.name == s) return n.value;
  return std::nullopt;
}
template <class Range>
std::string join(const Range& names, std::string_view sep = ", ") {
  std::string out;
  for (const auto& n : names) {
    if (!out.empty()) out += sep;
    if constexpr (requires { n.name; })
      out += n.name;
    else
      out += n;
  }
  return out;
}

}  // namespace
}  // namespace detail

std::string_view to_string(RegionKind r) noexcept { return detail::name_of(detail::kRegions, r); }
std::optional<RegionKind> region_from_string(std::string_view s) noexcept { return detail::value_of(detail::kRegions, s); }
std::string_view to_string(Goal g) noexcept { return detail::name_of(detail::kGoals, g); }
std::optional<Goal> goal_from_string(std::string_view s) noexcept { return detail::value_of(detail::kGoals, s); }
std::string_view to_string(Objective o) noexcept { return detail::name_of(detail::kObjectives, o); }
std::optional<Objective> objective_from_string(std::string_view s) noexcept {
  return detail::value_of(detail::kObjectives, s);
}
bool is_global_algorithm(std::string_view s) noexcept {
  return std::find(detail::kGlobalAlgorithms.begin(), detail::kGlobalAlgorithms.end(), s) != detail::kGlobalAlgorithms.end();
}
bool is_local_algorithm(std::string_view s) noexcept {
  return std::find(detail::kLocalAlgorithms.begin(), detail::kLocalAlgorithms.end(), s) != detail::kLocalAlgorithms.end();
}

namespace detail {
namespace {

// ---- keys each table takes -------------------------------------------------------------

constexpr std::array<std::string_view, 8> kTopTables{"project", "circuit", "coil", "target", "search", "hardware", "tolerance", "map"};
constexpr std::array<std::string_view, 2> kProjectKeys{"name", "description"};
constexpr std::array<std::string_view, 3> kCircuitKeys{"name", "current", "supply"};
constexpr std::array<std::string_view, 10> kCoilCommonKeys{"name", "shape", "circuit", "centre", "axis",
                                                           "turns", "separation", "opposed", "wire", "tolerance"};
constexpr std::array<std::string_view, 7> kToleranceKeys{"position", "tilt", "radius", "turns", "current", "wire_diameter",
                                                         "distribution"};
constexpr std::array<std::string_view, 3> kSupplyKeys{"max_current", "max_voltage", "max_power"};
constexpr std::array<std::string_view, 9> kWireKeys{"diameter", "width", "thickness", "corner_radius", "insulation",
                                                    "material", "resistivity", "temperature_coefficient", "density"};
constexpr std::array<std::string_view, 10> kHardwareKeys{"ambient_temperature", "operating_temperature", "heat_transfer",
                                                         "insulation_class", "lead_allowance", "spare", "packing",
                                                         "frequency", "ramp_rate", "exposure_threshold"};
constexpr std::array<std::string_view, 10> kCoilShapeKeys{"radius", "inner_radius", "outer_radius", "width", "height",
                                                          "length", "width_axis", "cross_section", "vertices"};

std::vector<std::string_view> shape_keys(Shape s) {
  switch (s) {
    case Shape::loop: return {"radius"};
    case Shape::pack: return {"inner_radius", "outer_radius", "width"};
    case Shape::solenoid: return {"radius", "inner_radius", "outer_radius", "length"};
    case Shape::rectangle: return {"width", "height", "width_axis", "cross_section"};
    case Shape::polygon: return {"vertices"};
  }
  return {};
}

std::vector<std::string_view> coil_keys(Shape s) {
  std::vector<std::string_view> k(kCoilCommonKeys.begin(), kCoilCommonKeys.end());
  for (auto x : shape_keys(s)) k.push_back(x);
  return k;
}

constexpr std::array<std::string_view, 14> kTargetKeys{"region", "centre",   "axis",      "reference",  "radius",
                                                       "length", "size",     "file",      "goal",       "field",
                                                       "gradient", "tolerance", "resolution", "ambient"};
std::vector<std::string_view> region_keys(RegionKind r) {
  std::vector<std::string_view> k{"region", "centre", "axis", "goal", "field", "gradient", "tolerance", "resolution", "ambient"};
  switch (r) {
    case RegionKind::sphere: k.push_back("radius"); break;
    case RegionKind::cylinder: k.insert(k.end(), {"radius", "length"}); break;
    case RegionKind::box:
    case RegionKind::plane: k.insert(k.end(), {"size", "reference"}); break;
    case RegionKind::points: k.push_back("file"); break;
  }
  return k;
}
constexpr std::array<std::string_view, 2> kAmbientKeys{"uniform", "gradient"};
constexpr std::array<std::string_view, 16> kSearchKeys{
    "objective",       "seed",     "global",  "local",           "starts",          "max_evaluations", "max_time",
    "designs",         "max_outer_radius", "max_half_length", "min_bore_radius", "min_gap", "max_ampere_turns", "stray",
    "rank_by",         "yield_samples"};
constexpr std::array<std::string_view, 2> kStrayKeys{"point", "max_field"};
constexpr std::array<std::string_view, 9> kMapKeys{"name", "kind", "from", "to", "plane", "centre", "size", "points", "format"};

template <class Range>
bool contains(const Range& r, std::string_view s) {
  return std::find(r.begin(), r.end(), s) != r.end();
}

std::string join_keys(const auto& keys) {
  std::string out;
  for (std::string_view k : keys) {
    if (k.empty()) continue;
    if (!out.empty()) out += ", ";
    out += k;
  }
  return out;
}

std::string_view type_name(const toml::node& n) {
  switch (n.type()) {
    case toml::node_type::string: return "a string";
    case toml::node_type::integer: return "an integer";
    case toml::node_type::floating_point: return "a floating-point number";
    case toml::node_type::boolean: return "a boolean";
    case toml::node_type::table: return "a table";
    case toml::node_type::array: return "an array";
    case toml::node_type::date: return "a date";
    case toml::node_type::time: return "a time";
    case toml::node_type::date_time: return "a date-time";
    case toml::node_type::none: break;
  }
  return "nothing";
}

// How a value was written, for messages ("the start 700 mm lies outside ...").
// A value as the user wrote it, for messages. Arrays and tables are spelled out here rather than
// by toml++'s formatter, which converts the log10 of a float below 1 to an unsigned integer
// (undefined behaviour, found by fuzzing: tests/fuzz/regressions/config).
std::string shown(const toml::node& n, bool quoted = false) {
  if (const auto* s = n.as_string()) return quoted ? fmt::format("\"{}\"", s->get()) : s->get();
  if (const auto* i = n.as_integer()) return fmt::format("{}", i->get());
  if (const auto* f = n.as_floating_point()) return fmt::format("{}", f->get());
  if (const auto* b = n.as_boolean()) return b->get() ? "true" : "false";
  std::string out;
  if (const auto* a = n.as_array()) {
    for (const auto& e : *a) out += (out.empty() ? "" : ", ") + shown(e, true);
    return "[" + out + "]";
  }
  if (const auto* t = n.as_table()) {
    for (auto&& [k, v] : *t) out += fmt::format("{}{} = {}", out.empty() ? "" : ", ", k.str(), shown(v, true));
    return "{ " + out + " }";
  }
  return "(a date or time)";
}

// What a free parameter table's numbers are.
struct Quantity {
  bool integer = false;  // turns
  Dimension dim = Dimension::length;
};

// The rule a coil value must satisfy; "" if it holds.
std::string coil_rule(CoilKey k, double v) {
  switch (k) {
    case CoilKey::radius:
    case CoilKey::outer_radius:
    case CoilKey::width:
    case CoilKey::height:
    case CoilKey::length:
    case CoilKey::separation: return v > 0.0 ? "" : "must be > 0";
    case CoilKey::inner_radius: return v >= 0.0 ? "" : "must be >= 0";
    case CoilKey::turns: return v >= 1.0 ? "" : "must be a positive integer";
    case CoilKey::centre_x:
    case CoilKey::centre_y:
    case CoilKey::centre_z:
    case CoilKey::wire: return "";
  }
  return "";
}

struct PendingTie {
  std::size_t coil;
  CoilKey key;
  std::string leader;
  SourceLocation where;
  std::string path;
};

class Reader {
 public:
  Reader(std::string file, Model& model) : file_(std::move(file)), m_(model) {
    m_.source_file = file_;
    base_ = std::filesystem::path(file_).parent_path();
  }

  void read(const toml::table& root) {
    for (auto&& [k, v] : root) {
      const std::string key(k.str());
      if (!contains(kTopTables, key)) {
        const bool table = v.is_table() || v.is_array_of_tables();
        fail(at(k.source()), "",
             table ? fmt::format("unknown table [{}]; the config takes [project], [[circuit]], [[coil]], [target], [search], [hardware], [tolerance], [[map]]", key)
                   : fmt::format("unknown top-level key '{}'; the config takes the tables [project], [[circuit]], [[coil]], [target], [search], [hardware], [tolerance], [[map]]", key));
      }
      m_.locations[key] = at(k.source());
    }
    if (const auto* p = root.get("project")) read_project(table(*p, "project"));
    if (const auto* c = root.get("circuit")) read_circuits(array_of_tables(*c, "circuit"));
    if (const auto* c = root.get("coil")) read_coils(array_of_tables(*c, "coil"));
    if (m_.coils.empty())
      fail(SourceLocation{file_, 0, 0}, "",
           "the config declares no [[coil]]; accepted: a config with at least one [[coil]] table (examples in configs/shapes/)");
    resolve_ties();
    for (std::size_t i = 0; i < m_.coils.size(); ++i) check_coil(i);
    if (const auto* t = root.get("target")) read_target(table(*t, "target"));
    if (const auto* s = root.get("search")) read_search(table(*s, "search"));
    if (const auto* h = root.get("hardware")) read_hardware(table(*h, "hardware"));
    if (const auto* t = root.get("tolerance")) m_.tolerances.global = read_tolerance(table(*t, "tolerance"), "tolerance");
    if (const auto* mp = root.get("map")) read_maps(array_of_tables(*mp, "map"));
    check_windings_fit();
  }

 private:
  std::string file_;
  Model& m_;
  std::filesystem::path base_;
  std::vector<PendingTie> ties_;
  std::map<std::pair<std::size_t, CoilKey>, std::size_t> free_index_;  // (coil, key) -> free parameter
  std::vector<std::set<CoilKey>> given_;                              // keys each coil was given

  SourceLocation at(const toml::source_region& r) const { return {file_, r.begin.line, r.begin.column}; }
  SourceLocation at(const toml::node& n) const { return at(n.source()); }
  [[noreturn]] void fail(const SourceLocation& where, const std::string& key, const std::string& msg) const {
    throw InputError(where, key, msg);
  }
  [[noreturn]] void wrong_type(const toml::node& n, const std::string& key, std::string_view wanted) const {
    fail(at(n), key, fmt::format("expected {}, found {} ({})", wanted, type_name(n), shown(n)));
  }

  // Records where every key of `t` is and refuses keys not in `allowed`.
  template <class Range>
  void check_keys(const toml::table& t, const std::string& path, const Range& allowed, std::string_view what) {
    for (auto&& [k, v] : t) {
      const std::string key(k.str());
      if (!contains(allowed, key))
        fail(at(k.source()), path + "." + key, fmt::format("unknown key in {}; it takes: {}", what, join_keys(allowed)));
      m_.locations[path + "." + key] = at(k.source());
    }
  }

  const toml::table& table(const toml::node& n, const std::string& key) const {
    if (const auto* t = n.as_table()) return *t;
    if (n.is_array_of_tables())
      fail(at(n), key, fmt::format("expected one table [{}], found an array of tables [[{}]]", key, key));
    wrong_type(n, key, "a table");
  }
  const toml::array& array_of_tables(const toml::node& n, const std::string& key) const {
    if (n.is_array_of_tables()) return *n.as_array();
    if (n.is_table()) fail(at(n), key, fmt::format("expected an array of tables [[{}]], found a single table [{}]", key, key));
    wrong_type(n, key, fmt::format("an array of tables [[{}]]", key));
  }
  const toml::array& array(const toml::node& n, const std::string& key, std::size_t size, std::string_view what) const {
    const auto* a = n.as_array();
    if (!a) wrong_type(n, key, fmt::format("an array of {}", what));
    if (size != 0 && a->size() != size)
      fail(at(n), key, fmt::format("expected an array of {} {}, found {} element{}", size, what, a->size(), a->size() == 1 ? "" : "s"));
    return *a;
  }
  std::string string(const toml::node& n, const std::string& key) const {
    if (const auto* s = n.as_string()) return s->get();
    wrong_type(n, key, "a string");
  }
  long long integer(const toml::node& n, const std::string& key) const {
    if (const auto* i = n.as_integer()) return i->get();
    wrong_type(n, key, "an integer");
  }
  bool boolean(const toml::node& n, const std::string& key) const {
    if (const auto* b = n.as_boolean()) return b->get();
    wrong_type(n, key, "true or false");
  }
  double number(const toml::node& n, const std::string& key) const {
    double v = 0.0;
    if (const auto* i = n.as_integer())
      v = static_cast<double>(i->get());
    else if (const auto* f = n.as_floating_point())
      v = f->get();
    else
      wrong_type(n, key, "a number");
    if (!std::isfinite(v)) fail(at(n), key, fmt::format("expected a finite number, found {}", shown(n)));
    return v;
  }
  double quantity(const toml::node& n, const std::string& key, Dimension d) const {
    if (n.is_number())
      fail(at(n), key,
           fmt::format("found the bare number {}; a {} needs a unit, written as a string such as \"{}\"; accepted units: {}",
                       shown(n), dimension_name(d), d == Dimension::length ? "250 mm" : fmt::format("1 {}", si_unit(d)),
                       accepted_units(d)));
    const std::string text = string(n, key);
    double v = 0.0;
    try {
      v = parse_quantity(text, d);
    } catch (const UnitParseError& e) {
      fail(at(n), key, e.what());
    }
    if (d == Dimension::length && std::abs(v) > kMaxLengthM)
      fail(at(n), key, fmt::format("\"{}\" is {:g} m; accepted: lengths up to {:g} m", text, v, kMaxLengthM));
    return v;
  }
  Vec3 vec3_quantity(const toml::node& n, const std::string& key, Dimension d) const {
    const auto& a = array(n, key, 3, fmt::format("{} strings", dimension_name(d)));
    Vec3 v;
    for (std::size_t i = 0; i < 3; ++i) v[static_cast<Eigen::Index>(i)] = quantity(*a.get(i), key, d);
    return v;
  }
  Vec3 direction(const toml::node& n, const std::string& key) const {
    const auto& a = array(n, key, 3, "numbers");
    Vec3 v;
    for (std::size_t i = 0; i < 3; ++i) v[static_cast<Eigen::Index>(i)] = number(*a.get(i), key);
    const double len = v.norm();
    if (!(len > 0.0) || !std::isfinite(len)) fail(at(n), key, fmt::format("a direction must not be zero; found {}", shown(n)));
    return unit(v);
  }
  // Normalised; a vector that is already unit to rounding is kept bit for bit, so a design
  // written back reads the same.
  static Vec3 unit(const Vec3& v) {
    const double len = v.norm();
    return std::abs(len - 1.0) <= 4e-16 ? v : Vec3(v / len);
  }
  // The part of `v` across the unit vector `axis`, normalised (zero if parallel).
  static Vec3 across(const Vec3& v, const Vec3& axis) {
    const double along = v.dot(axis);
    if (std::abs(along) <= 1e-15) return v;
    const Vec3 in_plane = v - along * axis;
    return in_plane.norm() < 1e-9 ? Vec3::Zero() : unit(in_plane);
  }

  // ---- [project] ---------------------------------------------------------------------
  void read_project(const toml::table& t) {
    m_.locations["project"] = at(t);
    check_keys(t, "project", kProjectKeys, "[project]");
    if (const auto* n = t.get("name")) m_.project.name = string(*n, "project.name");
    if (const auto* n = t.get("description")) m_.project.description = string(*n, "project.description");
  }

  // ---- [[circuit]] -------------------------------------------------------------------
  void read_circuits(const toml::array& arr) {
    for (std::size_t i = 0; i < arr.size(); ++i) {
      const auto& t = *arr.get(i)->as_table();
      const std::string tmp = fmt::format("circuit[{}]", i + 1);
      const auto* name_node = t.get("name");
      if (!name_node) fail(at(t), tmp, "a [[circuit]] needs a 'name'");
      Circuit c;
      c.name = string(*name_node, tmp + ".name");
      if (c.name.empty()) fail(at(*name_node), tmp + ".name", "the name must not be empty");
      const std::string path = "circuit." + c.name;
      for (const auto& other : m_.circuits)
        if (other.name == c.name)
          fail(at(*name_node), path, fmt::format("duplicate circuit name \"{}\" (first declared at {})", c.name,
                                                 m_.location_of(path).str()));
      m_.locations[path] = at(t);
      check_keys(t, path, kCircuitKeys, "a [[circuit]]");
      const auto* cur = t.get("current");
      if (!cur) fail(at(t), path, "a [[circuit]] needs a 'current': a fixed \"2.5 A\" or a range { min = \"-5 A\", max = \"5 A\" }");
      const std::string key = path + ".current";
      if (const auto* range = cur->as_table()) {
        for (auto&& [k, v] : *range)
          if (!contains(std::array<std::string_view, 3>{"min", "max", "start"}, k.str()))
            fail(at(k.source()), key + "." + std::string(k.str()), "unknown key in a current range; it takes: min, max, start");
        const auto* mn = range->get("min");
        const auto* mx = range->get("max");
        if (!mn || !mx) fail(at(*cur), key, "a current range needs both 'min' and 'max'");
        c.solved = true;
        c.min_current_A = quantity(*mn, key + ".min", Dimension::current);
        c.max_current_A = quantity(*mx, key + ".max", Dimension::current);
        if (!(c.min_current_A < c.max_current_A))
          fail(at(*mn), key, fmt::format("min {} must be less than max {}", shown(*mn), shown(*mx)));
        c.current_A = 0.5 * (c.min_current_A + c.max_current_A);
        if (const auto* st = range->get("start")) {
          c.current_A = quantity(*st, key + ".start", Dimension::current);
          if (c.current_A < c.min_current_A || c.current_A > c.max_current_A)
            fail(at(*st), key, fmt::format("the start {} lies outside [{}, {}]", shown(*st), shown(*mn), shown(*mx)));
        }
      } else {
        c.current_A = quantity(*cur, key, Dimension::current);
      }
      if (const auto* sup = t.get("supply")) c.supply = read_supply(*sup, path + ".supply");
      m_.circuits.push_back(std::move(c));
    }
  }

  // ---- [[coil]] ----------------------------------------------------------------------
  void read_coils(const toml::array& arr) {
    for (std::size_t i = 0; i < arr.size(); ++i) read_coil(*arr.get(i)->as_table(), i);
  }

  void read_coil(const toml::table& t, std::size_t index) {
    const std::string tmp = fmt::format("coil[{}]", index + 1);
    const auto* name_node = t.get("name");
    if (!name_node) fail(at(t), tmp, "a [[coil]] needs a 'name'");
    Coil c;
    c.name = string(*name_node, tmp + ".name");
    if (c.name.empty()) fail(at(*name_node), tmp + ".name", "the name must not be empty");
    const std::string path = "coil." + c.name;
    for (const auto& other : m_.coils)
      if (other.name == c.name)
        fail(at(*name_node), path, fmt::format("duplicate coil name \"{}\" (first declared at {})", c.name, m_.location_of(path).str()));
    m_.locations[path] = at(t);

    const auto* shape_node = t.get("shape");
    if (!shape_node) fail(at(t), path, fmt::format("a [[coil]] needs a 'shape': one of {}", "loop, pack, solenoid, rectangle, polygon"));
    const std::string shape_name = string(*shape_node, path + ".shape");
    const auto shape = shape_from_string(shape_name);
    if (!shape)
      fail(at(*shape_node), path + ".shape",
           fmt::format("unknown shape \"{}\"; accepted: loop, pack, solenoid, rectangle, polygon", shape_name));
    c.shape = *shape;

    const auto allowed = coil_keys(c.shape);
    for (auto&& [k, v] : t) {
      const std::string key(k.str());
      const std::string kp = path + "." + key;
      if (!contains(allowed, key)) {
        if (contains(kCoilShapeKeys, key))
          fail(at(k.source()), kp, fmt::format("key '{}' does not apply to shape '{}'; it takes: {}", key, shape_name, join_keys(allowed)));
        fail(at(k.source()), kp, fmt::format("unknown key '{}' in a [[coil]]; a {} takes: {}", key, shape_name, join_keys(allowed)));
      }
      m_.locations[kp] = at(k.source());
    }

    const std::size_t ci = m_.coils.size();
    m_.coils.push_back(std::move(c));
    given_.emplace_back();
    Coil& coil = m_.coils.back();

    // circuit
    if (const auto* n = t.get("circuit")) {
      coil.circuit = string(*n, path + ".circuit");
      bool found = false;
      for (const auto& cc : m_.circuits) found = found || cc.name == coil.circuit;
      if (!found)
        fail(at(*n), path + ".circuit",
             fmt::format("unknown circuit \"{}\"; declared circuits: {}", coil.circuit,
                         m_.circuits.empty() ? std::string("(none)") : join(names_of_circuits())));
    } else if (m_.circuits.size() == 1) {
      coil.circuit = m_.circuits.front().name;
    } else if (m_.circuits.empty()) {
      fail(at(t), path, "no [[circuit]] is declared; add one, e.g. [[circuit]] with name = \"main\" and current = \"1 A\"");
    } else {
      fail(at(t), path + ".circuit",
           fmt::format("key 'circuit' is required when more than one [[circuit]] is declared; declared: {}",
                       join(names_of_circuits())));
    }

    // Free parameters are recorded in this order: lengths, turns, centre.
    for (auto [name, key] : {std::pair{"radius", CoilKey::radius}, std::pair{"inner_radius", CoilKey::inner_radius},
                             std::pair{"outer_radius", CoilKey::outer_radius}, std::pair{"width", CoilKey::width},
                             std::pair{"height", CoilKey::height}, std::pair{"length", CoilKey::length},
                             std::pair{"separation", CoilKey::separation}})
      if (const auto* n = t.get(name)) coil_value(*n, ci, key, path + "." + name, {false, Dimension::length});
    if (const auto* n = t.get("turns")) coil_value(*n, ci, CoilKey::turns, path + ".turns", {true, Dimension::length});
    if (const auto* n = t.get("centre")) {
      const auto& a = array(*n, path + ".centre", 3, "length strings");
      const std::array<CoilKey, 3> keys{CoilKey::centre_x, CoilKey::centre_y, CoilKey::centre_z};
      for (std::size_t i = 0; i < 3; ++i) coil_value(*a.get(i), ci, keys[i], path + ".centre", {false, Dimension::length});
    }
    if (const auto* n = t.get("axis")) coil.axis = direction(*n, path + ".axis");

    if (const auto* n = t.get("opposed")) {
      m_.coils[ci].opposed = boolean(*n, path + ".opposed");
      if (!t.get("separation"))
        fail(at(*n), path + ".opposed", "'opposed' applies only to a mirrored pair; add 'separation' or remove 'opposed'");
    }
    if (const auto* n = t.get("width_axis")) {
      const std::string key = path + ".width_axis";
      const Vec3 w = direction(*n, key);
      const Vec3 a = m_.coils[ci].axis;
      const Vec3 in_plane = across(w, a);
      if (in_plane.isZero()) fail(at(*n), key, fmt::format("width_axis {} is parallel to the axis; it must have a part across it", shown(*n)));
      m_.coils[ci].width_axis = in_plane;
    } else if (m_.coils[ci].shape == Shape::rectangle) {
      m_.coils[ci].width_axis = Frame::from_axis(m_.coils[ci].axis).u;
    }
    if (const auto* n = t.get("cross_section")) {
      const std::string key = path + ".cross_section";
      const auto& a = array(*n, key, 2, "lengths [depth, thickness]");
      const double depth = quantity(*a.get(0), key, Dimension::length);
      const double thick = quantity(*a.get(1), key, Dimension::length);
      if (depth < 0.0 || thick < 0.0) fail(at(*n), key, fmt::format("depth and thickness must be >= 0, found {}", shown(*n)));
      m_.coils[ci].depth_m = depth;
      m_.coils[ci].thickness_m = thick;
    }
    if (const auto* n = t.get("vertices")) read_vertices(*n, ci, path + ".vertices");
    if (const auto* n = t.get("tolerance")) m_.tolerances.per_coil[m_.coils[ci].name] = read_tolerance(table(*n, path + ".tolerance"), path + ".tolerance");
    if (const auto* n = t.get("wire")) {
      if (const auto* list = n->as_array()) {
        // A list of wires: the search chooses one, as an integer free parameter.
        const std::string key = path + ".wire";
        if (list->empty()) fail(at(*n), key, "an empty list of wires; give one wire spec or a list of several");
        for (std::size_t i = 0; i < list->size(); ++i)
          m_.coils[ci].wire_options.push_back(read_wire(*list->get(i), fmt::format("{}[{}]", key, i)));
        m_.coils[ci].wire = m_.coils[ci].wire_options.front();
        if (list->size() > 1) {
          FreeParameter fp;
          fp.coil = ci;
          fp.key = CoilKey::wire;
          fp.integer = true;
          fp.where = at(*n);
          fp.min = 0.0;
          fp.max = static_cast<double>(list->size() - 1);
          fp.start = 0.0;
          free_index_[{ci, CoilKey::wire}] = m_.free_parameters.size();
          m_.free_parameters.push_back(fp);
        }
      } else {
        m_.coils[ci].wire = read_wire(*n, path + ".wire");
      }
    }

    require_shape_keys(t, ci, path, shape_name);
  }

  // ---- hardware: wire, supply, [hardware] ----------------------------------------------
  // wire = "AWG 20" | "0.8 mm" | { diameter = "0.8 mm", insulation = "grade 2", material = "copper" }
  Wire read_wire(const toml::node& n, const std::string& key) {
    if (n.is_string()) {
      try {
        return parse_wire(string(n, key));
      } catch (const InputError& e) {
        fail(at(n), key, e.what());
      }
    }
    const auto* t = n.as_table();
    if (!t) wrong_type(n, key, "a wire spec string (\"AWG 20\", \"0.8 mm\") or a table { diameter = \"0.8 mm\", ... }");
    check_keys(*t, key, kWireKeys, "a wire table");
    WireTable w;
    const std::array<std::pair<std::string_view, std::optional<std::string>*>, 9> fields{{
        {"diameter", &w.diameter}, {"width", &w.width}, {"thickness", &w.thickness}, {"corner_radius", &w.corner_radius},
        {"insulation", &w.insulation}, {"material", &w.material}, {"resistivity", &w.resistivity},
        {"temperature_coefficient", &w.temperature_coefficient}, {"density", &w.density}}};
    for (const auto& [name, field] : fields)
      if (const auto* v = t->get(name)) *field = string(*v, key + "." + std::string(name));
    try {
      return wire_from_table(w);
    } catch (const InputError& e) {
      const toml::node* where = e.key().empty() ? nullptr : t->get(e.key());
      fail(where ? at(*where) : at(n), e.key().empty() ? key : key + "." + e.key(), e.what());
    }
  }

  // supply = { max_current = "5 A", max_voltage = "30 V", max_power = "100 W" }
  Supply read_supply(const toml::node& n, const std::string& key) {
    const auto* t = n.as_table();
    if (!t) wrong_type(n, key, "a table { max_current = \"5 A\", max_voltage = \"30 V\", max_power = \"100 W\" }");
    check_keys(*t, key, kSupplyKeys, "a supply");
    Supply s;
    auto limit = [&](std::string_view name, Dimension d, std::optional<double>& out) {
      if (const auto* v = t->get(name)) {
        out = quantity(*v, key + "." + std::string(name), d);
        if (!(*out > 0.0)) fail(at(*v), key + "." + std::string(name), fmt::format("a supply limit must be positive, found {}", shown(*v)));
      }
    };
    limit("max_current", Dimension::current, s.max_current_A);
    limit("max_voltage", Dimension::voltage, s.max_voltage_V);
    limit("max_power", Dimension::power, s.max_power_W);
    if (!s.max_current_A && !s.max_voltage_V && !s.max_power_W)
      fail(at(n), key, "a supply needs at least one of max_current, max_voltage, max_power");
    return s;
  }

  void read_hardware(const toml::table& t) {
    m_.locations["hardware"] = at(t);
    check_keys(t, "hardware", kHardwareKeys, "[hardware]");
    HardwareOptions& h = m_.hardware;
    auto get = [&](std::string_view name, Dimension d) -> std::optional<double> {
      if (const auto* v = t.get(name)) return quantity(*v, "hardware." + std::string(name), d);
      return std::nullopt;
    };
    if (auto v = get("ambient_temperature", Dimension::temperature)) h.ambient_temperature_K = *v;
    if (auto v = get("operating_temperature", Dimension::temperature)) h.operating_temperature_K = *v;
    if (auto v = get("heat_transfer", Dimension::heat_transfer)) h.heat_transfer_W_m2K = *v;
    if (auto v = get("lead_allowance", Dimension::length)) h.lead_allowance_m = *v;
    if (const auto* v = t.get("spare")) h.spare_fraction = v->is_number() ? number(*v, "hardware.spare") : quantity(*v, "hardware.spare", Dimension::ratio);
    if (auto v = get("frequency", Dimension::frequency)) h.frequency_Hz = *v;
    if (auto v = get("exposure_threshold", Dimension::flux_density)) h.exposure_threshold_T = *v;
    if (const auto* v = t.get("ramp_rate")) {
      try {
        h.ramp_rate_A_per_s = parse_ramp_rate(string(*v, "hardware.ramp_rate"));
      } catch (const UnitParseError& e) {
        fail(at(*v), "hardware.ramp_rate", e.what());
      }
    }
    if (const auto* v = t.get("insulation_class")) {
      const std::string text = v->is_integer() ? std::to_string(integer(*v, "hardware.insulation_class"))
                                               : string(*v, "hardware.insulation_class");
      const auto cls = thermal_class_from_string(text);
      if (!cls)
        fail(at(*v), "hardware.insulation_class",
             fmt::format("unknown insulation class {}; IEC 60085 classes: 105 (A), 120 (E), 130 (B), 155 (F), 180 (H), "
                         "200 (N), 220 (R), 250", shown(*v)));
      h.insulation_class_C = cls->limit_C;
    }
    if (const auto* v = t.get("packing")) {
      const auto p = packing_from_string(string(*v, "hardware.packing"));
      if (!p) fail(at(*v), "hardware.packing", fmt::format("unknown packing {}; accepted: layered, orthocyclic", shown(*v)));
      h.packing = *p;
    }
    try {
      h.validate();
    } catch (const InputError& e) {
      fail(at(t), "hardware", e.what());
    }
  }

  // A wire on a coil whose size and turns are fixed must fit its declared pack: say so at load.
  void check_windings_fit() {
    for (std::size_t ci = 0; ci < m_.coils.size(); ++ci) {
      const Coil& c = m_.coils[ci];
      if (!c.wire) continue;
      bool free = false;
      for (const auto& fp : m_.free_parameters) free = free || fp.coil == ci;
      if (free) continue;  // checked on every design instead
      try {
        (void)wind(c, *c.wire, m_.hardware.packing);
      } catch (const InputError& e) {
        fail(m_.location_of("coil." + c.name + ".wire"), "coil." + c.name + ".wire", e.what());
      }
    }
  }

  std::vector<std::string> names_of_circuits() const {
    std::vector<std::string> n;
    for (const auto& c : m_.circuits) n.push_back(c.name);
    return n;
  }

  void read_vertices(const toml::node& n, std::size_t ci, const std::string& key) {
    const auto* a = n.as_array();
    if (!a) wrong_type(n, key, "an array of points [[x, y, z], ...] (lengths)");
    if (a->size() < 3) fail(at(n), key, fmt::format("a polygon needs at least 3 vertices, found {}", a->size()));
    std::vector<Vec3> v;
    for (const auto& p : *a) v.push_back(vec3_quantity(p, key, Dimension::length));
    double size = 0.0;
    for (const auto& p : v) size = std::max(size, p.norm());
    for (std::size_t i = 0; i < v.size(); ++i)
      if ((v[(i + 1) % v.size()] - v[i]).norm() <= 1e-12 * std::max(size, 1e-300))
        fail(at(*a->get((i + 1) % v.size())), key, fmt::format("vertices {} and {} coincide; every side must have a length", i + 1, (i + 1) % v.size() + 1));
    double area = 0.0;
    for (std::size_t i = 1; i + 1 < v.size(); ++i) area = std::max(area, (v[i] - v[0]).cross(v[i + 1] - v[0]).norm());
    for (std::size_t i = 2; i < v.size(); ++i) area = std::max(area, (v[1] - v[0]).cross(v[i] - v[0]).norm());
    if (area <= 1e-12 * size * size) fail(at(n), key, "the vertices all lie on one line; a polygon must enclose an area");
    m_.coils[ci].vertices_m = std::move(v);
  }

  void require_shape_keys(const toml::table& t, std::size_t ci, const std::string& path, const std::string& shape_name) {
    const auto need = [&](std::string_view key) {
      if (!t.get(key)) fail(at(t), path, fmt::format("shape '{}' requires key '{}'", shape_name, key));
    };
    switch (m_.coils[ci].shape) {
      case Shape::loop: need("radius"); break;
      case Shape::pack: need("inner_radius"); need("outer_radius"); need("width"); break;
      case Shape::solenoid: {
        need("length");
        const bool r = t.get("radius") != nullptr;
        const bool ri = t.get("inner_radius") != nullptr;
        const bool ro = t.get("outer_radius") != nullptr;
        if (r && (ri || ro))
          fail(at(t), path, "a solenoid takes either 'radius' (single layer) or 'inner_radius' and 'outer_radius' (multi-layer), not both");
        if (!r && !ri && !ro)
          fail(at(t), path, "shape 'solenoid' requires key 'radius' (single layer) or 'inner_radius' and 'outer_radius' (multi-layer)");
        if (!r) { need("inner_radius"); need("outer_radius"); }
        break;
      }
      case Shape::rectangle: need("width"); need("height"); break;
      case Shape::polygon: need("vertices"); break;
    }
  }

  // A coil quantity: fixed, free { start, min, max } or tied { same_as = "coil" }.
  void coil_value(const toml::node& n, std::size_t ci, CoilKey key, const std::string& kp, Quantity q) {
    given_[ci].insert(key);
    const auto read_one = [&](const toml::node& v, const std::string& k) -> double {
      if (!q.integer) return quantity(v, k, q.dim);
      const long long i = integer(v, k);
      return static_cast<double>(i);
    };
    const auto check_rule = [&](const toml::node& v, double x, const std::string& k, std::string_view what) {
      if (const std::string rule = coil_rule(key, x); !rule.empty())
        fail(at(v), k, fmt::format("{}{} {}, found {}", what, to_string(key), rule, shown(v)));
    };
    const auto* t = n.as_table();
    if (!t) {
      if (q.integer && !n.is_integer())
        wrong_type(n, kp, "an integer or a table { start, min, max }");
      const double v = read_one(n, kp);
      check_rule(n, v, kp, "");
      set(m_.coils[ci], key, v);
      return;
    }
    if (const auto* leader = t->get("same_as")) {
      if (t->size() != 1) fail(at(n), kp, "a tie { same_as = \"coil\" } takes no other keys");
      ties_.push_back({ci, key, string(*leader, kp + ".same_as"), at(*leader), kp});
      return;
    }
    for (auto&& [k, v] : *t)
      if (!contains(std::array<std::string_view, 3>{"start", "min", "max"}, k.str()))
        fail(at(k.source()), kp + "." + std::string(k.str()),
             "unknown key in a free parameter; it takes: start, min, max (or same_as alone)");
    const auto* mn = t->get("min");
    const auto* mx = t->get("max");
    if (!mn || !mx)
      fail(at(n), kp, fmt::format("a free parameter needs 'min' and 'max' (and optionally 'start'); '{}' is missing", mn ? "max" : "min"));
    FreeParameter fp;
    fp.coil = ci;
    fp.key = key;
    fp.integer = q.integer;
    fp.where = at(n);
    fp.min = read_one(*mn, kp + ".min");
    fp.max = read_one(*mx, kp + ".max");
    check_rule(*mn, fp.min, kp + ".min", "the min of ");
    if (!(fp.min < fp.max)) fail(at(*mn), kp, fmt::format("min {} must be less than max {}", shown(*mn), shown(*mx)));
    if (const auto* st = t->get("start")) {
      fp.start = read_one(*st, kp + ".start");
      if (fp.start < fp.min || fp.start > fp.max)
        fail(at(*st), kp, fmt::format("the start {} lies outside [{}, {}]", shown(*st), shown(*mn), shown(*mx)));
    } else {
      fp.start = 0.5 * (fp.min + fp.max);
      if (fp.integer) fp.start = std::floor(fp.start);
    }
    set(m_.coils[ci], key, fp.start);
    free_index_[{ci, key}] = m_.free_parameters.size();
    m_.free_parameters.push_back(fp);
  }

  bool coil_has(std::size_t ci, CoilKey key) const {
    switch (key) {
      case CoilKey::turns:
      case CoilKey::centre_x:
      case CoilKey::centre_y:
      case CoilKey::centre_z: return true;
      default: return given_[ci].count(key) != 0;
    }
  }

  std::optional<std::size_t> coil_index(const std::string& name) const {
    for (std::size_t i = 0; i < m_.coils.size(); ++i)
      if (m_.coils[i].name == name) return i;
    return std::nullopt;
  }

  void resolve_ties() {
    std::map<std::pair<std::size_t, CoilKey>, const PendingTie*> by_target;
    for (const auto& t : ties_) by_target[{t.coil, t.key}] = &t;
    for (const auto& tie : ties_) {
      std::vector<std::pair<std::size_t, CoilKey>> chain{{tie.coil, tie.key}};
      const PendingTie* cur = &tie;
      std::pair<std::size_t, CoilKey> root;
      while (true) {
        const auto leader = coil_index(cur->leader);
        if (!leader) {
          std::vector<std::string> names;
          for (const auto& c : m_.coils) names.push_back(c.name);
          fail(cur->where, cur->path + ".same_as", fmt::format("same_as names an unknown coil \"{}\"; declared coils: {}", cur->leader, join(names)));
        }
        if (!coil_has(*leader, cur->key))
          fail(cur->where, cur->path + ".same_as",
               fmt::format("coil \"{}\" (shape {}) has no {} to follow", cur->leader, to_string(m_.coils[*leader].shape), to_string(cur->key)));
        const std::pair<std::size_t, CoilKey> next{*leader, cur->key};
        if (std::find(chain.begin(), chain.end(), next) != chain.end()) {
          std::string cycle;
          for (const auto& [c, k] : chain) cycle += m_.coils[c].name + " -> ";
          cycle += m_.coils[next.first].name;
          fail(tie.where, tie.path + ".same_as", fmt::format("the ties of {} form a cycle: {}", to_string(tie.key), cycle));
        }
        chain.push_back(next);
        if (auto it = by_target.find(next); it != by_target.end()) {
          cur = it->second;
          continue;
        }
        root = next;
        break;
      }
      if (auto it = free_index_.find(root); it != free_index_.end()) {
        FreeParameter fp = m_.free_parameters[it->second];
        fp.coil = tie.coil;
        fp.same_as = it->second;
        fp.where = tie.where;
        set(m_.coils[tie.coil], tie.key, fp.start);
        m_.free_parameters.push_back(fp);
      } else {
        set(m_.coils[tie.coil], tie.key, get(m_.coils[root.first], root.second));
      }
    }
  }

  // Checks across keys, once ties are resolved.
  void check_coil(std::size_t ci) {
    const Coil& c = m_.coils[ci];
    const std::string path = "coil." + c.name;
    if ((c.shape == Shape::pack || c.multilayer()) && !(c.inner_radius_m < c.outer_radius_m))
      fail(m_.location_of(path + ".inner_radius"), path + ".inner_radius",
           fmt::format("inner_radius {:g} m must be less than outer_radius {:g} m", c.inner_radius_m, c.outer_radius_m));
  }

  // ---- [target] ----------------------------------------------------------------------
  void read_target(const toml::table& t) {
    m_.locations["target"] = at(t);
    check_keys(t, "target", kTargetKeys, "[target]");
    Target g;
    const auto* rn = t.get("region");
    if (!rn) fail(at(t), "target", fmt::format("[target] needs a 'region': one of {}", join(kRegions)));
    const std::string rname = string(*rn, "target.region");
    const auto region = region_from_string(rname);
    if (!region) fail(at(*rn), "target.region", fmt::format("unknown region \"{}\"; accepted: {}", rname, join(kRegions)));
    g.region = *region;
    const auto allowed = region_keys(g.region);
    for (auto&& [k, v] : t)
      if (!contains(allowed, k.str()))
        fail(at(k.source()), "target." + std::string(k.str()),
             fmt::format("key '{}' does not apply to region '{}'; it takes: {}", k.str(), rname, join_keys(allowed)));
    const auto need = [&](std::string_view key) -> const toml::node& {
      const auto* n = t.get(key);
      if (!n) fail(at(t), "target", fmt::format("region '{}' requires key '{}'", rname, key));
      return *n;
    };
    const auto positive = [&](const toml::node& n, double v, const std::string& key) {
      if (!(v > 0.0)) fail(at(n), key, fmt::format("must be > 0, found {}", shown(n)));
      return v;
    };
    if (const auto* n = t.get("centre")) g.centre_m = vec3_quantity(*n, "target.centre", Dimension::length);
    if (const auto* n = t.get("axis")) g.axis = direction(*n, "target.axis");
    if (const auto* n = t.get("reference")) {
      const Vec3 r = direction(*n, "target.reference");
      const Vec3 in_plane = across(r, g.axis);
      if (in_plane.isZero()) fail(at(*n), "target.reference", "reference is parallel to the axis; it must have a part across it");
      g.reference = in_plane;
    } else {
      g.reference = Frame::from_axis(g.axis).u;
    }
    switch (g.region) {
      case RegionKind::sphere: {
        const auto& n = need("radius");
        g.radius_m = positive(n, quantity(n, "target.radius", Dimension::length), "target.radius");
        break;
      }
      case RegionKind::cylinder: {
        const auto& r = need("radius");
        g.radius_m = positive(r, quantity(r, "target.radius", Dimension::length), "target.radius");
        const auto& l = need("length");
        g.length_m = positive(l, quantity(l, "target.length", Dimension::length), "target.length");
        break;
      }
      case RegionKind::box:
      case RegionKind::plane: {
        const auto& n = need("size");
        const std::size_t dims = g.region == RegionKind::box ? 3 : 2;
        const auto& a = array(n, "target.size", dims, dims == 3 ? "lengths [x, y, z]" : "lengths [u, v]");
        for (std::size_t i = 0; i < dims; ++i)
          g.size_m[static_cast<Eigen::Index>(i)] = positive(*a.get(i), quantity(*a.get(i), "target.size", Dimension::length), "target.size");
        break;
      }
      case RegionKind::points: {
        const auto& n = need("file");
        g.points_file = string(n, "target.file");
        const std::filesystem::path p = base_ / g.points_file;
        std::error_code ec;
        if (!std::filesystem::is_regular_file(p, ec))
          fail(at(n), "target.file", fmt::format("cannot find the points file \"{}\" (looked for {})", g.points_file, p.string()));
        g.points = read_points_csv(p);
        break;
      }
    }
    if (const auto* n = t.get("goal")) {
      const std::string s = string(*n, "target.goal");
      const auto goal = goal_from_string(s);
      if (!goal) fail(at(*n), "target.goal", fmt::format("unknown goal \"{}\"; accepted: {}", s, join(kGoals)));
      g.goal = *goal;
    }
    const std::string goal_name(to_string(g.goal));
    const auto* field = t.get("field");
    const auto* grad = t.get("gradient");
    if (g.goal != Goal::uniform && field)
      fail(at(*field), "target.field", fmt::format("key 'field' does not apply to goal '{}' (only to 'uniform')", goal_name));
    if (g.goal != Goal::gradient && grad)
      fail(at(*grad), "target.gradient", fmt::format("key 'gradient' does not apply to goal '{}' (only to 'gradient')", goal_name));
    if (g.goal == Goal::uniform) {
      if (!field) fail(at(t), "target", "goal 'uniform' requires key 'field' = [3 flux densities], e.g. [\"0 uT\", \"0 uT\", \"50 uT\"]");
      g.field_T = vec3_quantity(*field, "target.field", Dimension::flux_density);
      // The wanted field is also the scale of every relative figure: it cannot be zero.
      if (!(g.field_T.norm() > 0.0))
        fail(at(*field), "target.field",
             fmt::format("found {}, a zero field; accepted: a field with a non-zero component, e.g. [\"0 uT\", \"0 uT\", \"50 uT\"] "
                         "(to cancel a field, use goal = \"null\")",
                         shown(*field)));
    }
    if (g.goal == Goal::gradient) {
      if (!grad) fail(at(t), "target", "goal 'gradient' requires key 'gradient', e.g. \"10 mT/m\"");
      g.gradient_T_per_m = quantity(*grad, "target.gradient", Dimension::gradient);
      if (!(g.gradient_T_per_m != 0.0))
        fail(at(*grad), "target.gradient", fmt::format("found {}, a zero gradient; accepted: a non-zero gradient, e.g. \"10 mT/m\"", shown(*grad)));
    }
    if (const auto* n = t.get("tolerance")) g.tolerance = tolerance(*n);
    if (const auto* n = t.get("resolution")) {
      const long long r = integer(*n, "target.resolution");
      if (r < 2 || r > kMaxResolution)
        fail(at(*n), "target.resolution", fmt::format("found {}; accepted: an integer from 2 to {}", r, kMaxResolution));
      g.resolution = static_cast<int>(r);
    }
    // A thin box, a long cylinder or a fine resolution can ask for more samples than any
    // evaluation can afford: refuse it here rather than let a search run out of memory or time.
    if (const SampleCount c = count_samples(g); !c.within_limits()) {
      const auto* n = t.get("resolution");
      fail(n ? at(*n) : at(*rn), n ? "target.resolution" : "target.region",
           fmt::format("region '{}' at resolution {} would need {:.3g} sample points and a Gauss-Legendre order of {:.3g}; "
                       "accepted: at most {:g} points and order {}: lower the resolution or make the region less elongated",
                       rname, g.resolution > 0 ? g.resolution : kDefaultResolution, c.points, c.gauss_order,
                       kMaxSamplePoints, kMaxResolution));
    }
    if (const auto* n = t.get("ambient")) g.ambient = ambient(table(*n, "target.ambient"));
    m_.target = std::move(g);
  }

  Tolerance tolerance(const toml::node& n) {
    const std::string key = "target.tolerance";
    if (n.is_number())
      fail(at(n), key, fmt::format("found the bare number {}; write a relative tolerance (\"100 ppm\", \"0.01 %\") or an absolute one (\"20 nT\") as a string", shown(n)));
    const std::string text = string(n, key);
    Tolerance tol;
    try {
      tol.value = parse_quantity(text, Dimension::ratio);
      tol.relative = true;
    } catch (const UnitParseError&) {
      try {
        tol.value = parse_quantity(text, Dimension::flux_density);
        tol.relative = false;
      } catch (const UnitParseError&) {
        fail(at(n), key, fmt::format("\"{}\" is neither a relative tolerance ({}) nor a flux density ({})", text,
                                     accepted_units(Dimension::ratio), accepted_units(Dimension::flux_density)));
      }
    }
    if (!(tol.value > 0.0)) fail(at(n), key, fmt::format("the tolerance must be > 0, found \"{}\"", text));
    return tol;
  }

  AmbientField ambient(const toml::table& t) {
    m_.locations["target.ambient"] = at(t);
    check_keys(t, "target.ambient", kAmbientKeys, "[target.ambient]");
    AmbientField a;
    if (const auto* n = t.get("uniform")) a.uniform_T = vec3_quantity(*n, "target.ambient.uniform", Dimension::flux_density);
    if (const auto* n = t.get("gradient")) {
      const std::string key = "target.ambient.gradient";
      const auto& rows = array(*n, key, 3, "rows (a 3x3 array of gradients, row i = dB_i/dx_j)");
      for (std::size_t i = 0; i < 3; ++i) {
        const Vec3 row = vec3_quantity(*rows.get(i), key, Dimension::gradient);
        a.gradient_T_per_m.row(static_cast<Eigen::Index>(i)) = row.transpose();
      }
    }
    return a;
  }

  // ---- [tolerance] and a coil's `tolerance = { ... }` ---------------------------------
  ToleranceSpec read_tolerance(const toml::table& t, const std::string& path) {
    check_keys(t, path, kToleranceKeys, path == "tolerance" ? "[tolerance]" : "a coil's tolerance table");
    ToleranceSpec s;
    const auto size = [&](std::string_view key, Dimension d) -> std::optional<double> {
      const auto* n = t.get(key);
      if (!n) return std::nullopt;
      const std::string kp = path + "." + std::string(key);
      const double v = quantity(*n, kp, d);
      if (!(v >= 0.0)) fail(at(*n), kp, fmt::format("a tolerance must be >= 0, found {}", shown(*n)));
      return v;
    };
    s.position_m = size("position", Dimension::length);
    s.tilt_rad = size("tilt", Dimension::angle);
    s.radius_m = size("radius", Dimension::length);
    s.current_relative = size("current", Dimension::ratio);
    s.wire_diameter_m = size("wire_diameter", Dimension::length);
    if (const auto* n = t.get("turns")) {  // a count: 2 or 0.5
      s.turns = number(*n, path + ".turns");
      if (!(*s.turns >= 0.0)) fail(at(*n), path + ".turns", fmt::format("a tolerance must be >= 0, found {}", shown(*n)));
    }
    if (const auto* n = t.get("distribution")) {
      const std::string v = string(*n, path + ".distribution");
      s.distribution = distribution_from_string(v);
      if (!s.distribution) fail(at(*n), path + ".distribution", fmt::format("unknown distribution \"{}\"; accepted: normal, uniform", v));
    }
    return s;
  }

  // ---- [[map]] -----------------------------------------------------------------------
  void read_maps(const toml::array& arr) {
    for (std::size_t i = 0; i < arr.size(); ++i) {
      const auto& t = *arr.get(i)->as_table();
      const std::string tmp = fmt::format("map[{}]", i + 1);
      const auto* name_node = t.get("name");
      if (!name_node) fail(at(t), tmp, "a [[map]] needs a 'name' (it names the files: design-01-<name>.csv)");
      MapRequest r;
      r.name = string(*name_node, tmp + ".name");
      const bool name_ok = !r.name.empty() && r.name.size() <= 64 && r.name != "." && r.name != ".." &&
                           std::all_of(r.name.begin(), r.name.end(), [](char c) {
                             return std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.';
                           });
      if (!name_ok)
        fail(at(*name_node), tmp + ".name",
             fmt::format("the name {} is not a file-name stem; use 1 to 64 letters, digits, '-', '_' or '.'", shown(*name_node)));
      const std::string path = "map." + r.name;
      for (const auto& other : m_.maps)
        if (other.name == r.name)
          fail(at(*name_node), path, fmt::format("duplicate map name \"{}\" (first declared at {})", r.name, m_.location_of(path).str()));
      m_.locations[path] = at(t);
      check_keys(t, path, kMapKeys, "a [[map]]");
      const auto* kind = t.get("kind");
      if (!kind) fail(at(t), path, "a [[map]] needs a 'kind': \"line\", \"plane\" or \"grid\"");
      const std::string k = string(*kind, path + ".kind");
      if (k == "line")
        r.kind = MapKind::line;
      else if (k == "plane")
        r.kind = MapKind::plane;
      else if (k == "grid")
        r.kind = MapKind::grid;
      else
        fail(at(*kind), path + ".kind", fmt::format("unknown map kind \"{}\"; accepted: line, plane, grid", k));
      // Keys that belong to the other kinds are refused rather than silently ignored.
      const auto needs = [&](std::string_view key) -> const toml::node& {
        const auto* n = t.get(key);
        if (!n) fail(at(t), path, fmt::format("a {} map needs '{}'", k, key));
        return *n;
      };
      const auto refuse = [&](std::string_view key) {
        if (const auto* n = t.get(key)) fail(at(*n), path + "." + std::string(key), fmt::format("a {} map does not take '{}'", k, key));
      };
      const int dims = r.kind == MapKind::line ? 1 : r.kind == MapKind::plane ? 2 : 3;
      if (r.kind == MapKind::plane) {
        refuse("from");
        refuse("to");
        const auto& pl = needs("plane");
        r.plane = string(pl, path + ".plane");
        if (r.plane != "xy" && r.plane != "xz" && r.plane != "yz")
          fail(at(pl), path + ".plane", fmt::format("unknown plane \"{}\"; accepted: xy, xz, yz", r.plane));
        r.centre_m = m_.target ? m_.target->centre_m : Vec3::Zero();
        if (const auto* c = t.get("centre")) r.centre_m = vec3_quantity(*c, path + ".centre", Dimension::length);
        const auto& sz = array(needs("size"), path + ".size", 2, "length strings");
        for (std::size_t d = 0; d < 2; ++d) {
          r.size_m[d] = quantity(*sz.get(d), path + ".size", Dimension::length);
          if (!(r.size_m[d] > 0.0)) fail(at(*sz.get(d)), path + ".size", fmt::format("must be > 0, found {}", shown(*sz.get(d))));
        }
      } else {
        refuse("plane");
        refuse("centre");
        refuse("size");
        r.from_m = vec3_quantity(needs("from"), path + ".from", Dimension::length);
        r.to_m = vec3_quantity(needs("to"), path + ".to", Dimension::length);
        if (r.from_m == r.to_m) fail(at(*t.get("to")), path + ".to", "'to' must differ from 'from'");
      }
      // points: one count for every direction, or one per direction.
      const auto& pts = needs("points");
      const auto count = [&](const toml::node& n) {
        const long long v = integer(n, path + ".points");
        if (v < 2 || v > 100000) fail(at(n), path + ".points", fmt::format("a point count must be 2 to 100000, found {}", v));
        return static_cast<int>(v);
      };
      if (pts.is_array()) {
        const auto& a = array(pts, path + ".points", static_cast<std::size_t>(dims), "point counts");
        for (std::size_t d = 0; d < a.size(); ++d) r.points[d] = count(*a.get(d));
      } else {
        const int n = count(pts);
        for (int d = 0; d < dims; ++d) r.points[static_cast<std::size_t>(d)] = n;
      }
      const double total = static_cast<double>(r.points[0]) * r.points[1] * r.points[2];
      if (total > static_cast<double>(kMaxConfigMapPoints))
        fail(at(pts), path + ".points",
             fmt::format("{:.0f} points in one map; a config map takes at most {} (use 'coilwright map' for larger ones)", total,
                         kMaxConfigMapPoints));
      if (const auto* f = t.get("format")) {
        r.formats.clear();
        const auto one = [&](const toml::node& n) {
          const std::string v = string(n, path + ".format");
          if (v != "csv" && v != "vtk")
            fail(at(n), path + ".format", fmt::format("unknown map format \"{}\"; accepted: csv, vtk, or both as [\"csv\", \"vtk\"]", v));
          const MapFormat mf = v == "vtk" ? MapFormat::vtk : MapFormat::csv;
          if (std::find(r.formats.begin(), r.formats.end(), mf) == r.formats.end()) r.formats.push_back(mf);
        };
        if (const auto* fa = f->as_array()) {
          if (fa->empty()) fail(at(*f), path + ".format", "give at least one format: \"csv\", \"vtk\" or [\"csv\", \"vtk\"]");
          for (std::size_t j = 0; j < fa->size(); ++j) one(*fa->get(j));
        } else {
          one(*f);
        }
      }
      m_.maps.push_back(std::move(r));
    }
  }

  // ---- [search] ----------------------------------------------------------------------
  void read_search(const toml::table& t) {
    m_.locations["search"] = at(t);
    check_keys(t, "search", kSearchKeys, "[search]");
    SearchOptions& s = m_.search;
    const auto count = [&](std::string_view key, long long min_value) -> std::optional<long long> {
      const auto* n = t.get(key);
      if (!n) return std::nullopt;
      const std::string kp = "search." + std::string(key);
      const long long v = integer(*n, kp);
      if (v < min_value || v > 2147483647LL) fail(at(*n), kp, fmt::format("must be an integer >= {}, found {}", min_value, v));
      return v;
    };
    const auto length = [&](std::string_view key) -> std::optional<double> {
      const auto* n = t.get(key);
      if (!n) return std::nullopt;
      const std::string kp = "search." + std::string(key);
      const double v = quantity(*n, kp, Dimension::length);
      if (v < 0.0) fail(at(*n), kp, fmt::format("must be >= 0, found {}", shown(*n)));
      return v;
    };
    if (const auto* n = t.get("objective")) {
      const std::string v = string(*n, "search.objective");
      const auto o = objective_from_string(v);
      if (!o) fail(at(*n), "search.objective", fmt::format("unknown objective \"{}\"; accepted: {}", v, join(kObjectives)));
      s.objective = *o;
    }
    if (auto v = count("seed", 0)) s.seed = static_cast<unsigned>(*v);
    if (const auto* n = t.get("global")) {
      const std::string v = string(*n, "search.global");
      if (!is_global_algorithm(v)) fail(at(*n), "search.global", fmt::format("unknown global algorithm \"{}\"; accepted: {}", v, join(kGlobalAlgorithms)));
      s.global_algorithm = v;
    }
    if (const auto* n = t.get("local")) {
      const std::string v = string(*n, "search.local");
      if (!is_local_algorithm(v)) fail(at(*n), "search.local", fmt::format("unknown local algorithm \"{}\"; accepted: {}", v, join(kLocalAlgorithms)));
      s.local_algorithm = v;
    }
    if (auto v = count("starts", 1)) s.starts = static_cast<int>(*v);
    if (auto v = count("max_evaluations", 1)) s.max_evaluations = static_cast<int>(*v);
    if (auto v = count("designs", 1)) s.designs = static_cast<int>(*v);
    if (auto v = count("yield_samples", 2)) s.yield_samples = static_cast<int>(*v);
    if (const auto* n = t.get("rank_by")) {
      const std::string v = string(*n, "search.rank_by");
      const auto r = rank_by_from_string(v);
      if (!r) fail(at(*n), "search.rank_by", fmt::format("unknown ranking \"{}\"; accepted: objective, yield", v));
      s.rank_by = *r;
    }
    if (const auto* n = t.get("max_time")) {
      s.max_time_s = quantity(*n, "search.max_time", Dimension::time);
      if (!(s.max_time_s > 0.0)) fail(at(*n), "search.max_time", fmt::format("must be > 0, found {}", shown(*n)));
    }
    s.max_outer_radius_m = length("max_outer_radius");
    s.max_half_length_m = length("max_half_length");
    s.min_bore_radius_m = length("min_bore_radius");
    s.min_gap_m = length("min_gap");
    if (const auto* n = t.get("max_ampere_turns")) {
      s.max_ampere_turns = quantity(*n, "search.max_ampere_turns", Dimension::current);
      if (!(*s.max_ampere_turns > 0.0)) fail(at(*n), "search.max_ampere_turns", fmt::format("must be > 0, found {}", shown(*n)));
    }
    if (const auto* n = t.get("stray")) {
      const auto& arr = array_of_tables(*n, "search.stray");
      for (std::size_t i = 0; i < arr.size(); ++i) {
        const auto& st = *arr.get(i)->as_table();
        const std::string path = fmt::format("search.stray.{}", i + 1);
        m_.locations[path] = at(st);
        check_keys(st, path, kStrayKeys, "a [[search.stray]]");
        const auto* p = st.get("point");
        const auto* b = st.get("max_field");
        if (!p || !b) fail(at(st), path, fmt::format("a [[search.stray]] needs 'point' and 'max_field'; '{}' is missing", p ? "max_field" : "point"));
        StrayLimit lim;
        lim.point_m = vec3_quantity(*p, path + ".point", Dimension::length);
        lim.max_field_T = quantity(*b, path + ".max_field", Dimension::flux_density);
        if (!(lim.max_field_T > 0.0)) fail(at(*b), path + ".max_field", fmt::format("must be > 0, found {}", shown(*b)));
        s.stray.push_back(lim);
      }
    }
  }
};

// ---- intersections ---------------------------------------------------------------------

// One physical winding as a solid (or a filament or sheet, of no volume) for clash checks.
struct Body {
  std::size_t coil = 0;
  int half = 0;  // 0 or 1 for the windings of a pair
  bool circular = false;
  Vec3 centre = Vec3::Zero();
  Frame frame;
  // circular: the winding's cross-section in the meridian half-plane, [r0, r1] x [z0, z1]
  double r0 = 0, r1 = 0, z0 = 0, z1 = 0;
  // straight: closed polyline (world coordinates) with a rectangular cross-section
  std::vector<Vec3> corners;
  double half_depth = 0, half_thick = 0;
  double size = 0;  // bounding radius about centre

  [[nodiscard]] bool has_volume() const {
    return circular ? (r1 > r0 && z1 > z0) : (half_depth > 0 && half_thick > 0);
  }

  // Signed distance to a box centred at the origin with half sides h (negative inside).
  static double box_sd(const Vec3& q, const Vec3& h) {
    const Vec3 d = q.cwiseAbs() - h;
    return d.cwiseMax(0.0).norm() + std::min(d.maxCoeff(), 0.0);
  }

  [[nodiscard]] double sd(const Vec3& p) const {
    const Vec3 rel = p - centre;
    if (circular) {
      const double z = rel.dot(frame.w);
      const double rho = (rel - z * frame.w).norm();
      const Vec3 q(rho - 0.5 * (r0 + r1), z - 0.5 * (z0 + z1), 0.0);
      return box_sd(q, Vec3(0.5 * (r1 - r0), 0.5 * (z1 - z0), 0.0));
    }
    double best = 1e300;
    for (std::size_t i = 0; i < corners.size(); ++i) {
      const Vec3& a = corners[i];
      const Vec3& b = corners[(i + 1) % corners.size()];
      const double len = (b - a).norm();
      const Vec3 t = (b - a) / len;
      const Vec3 n = frame.w.cross(t);  // in the coil plane, across the side
      const Vec3 r = p - 0.5 * (a + b);
      const Vec3 q(r.dot(t), r.dot(n), r.dot(frame.w));
      best = std::min(best, box_sd(q, Vec3(0.5 * len + half_depth, half_depth, half_thick)));
    }
    return best;
  }

  // A point on the conductor's surface (or on the filament) for s, t in [0, 1).
  [[nodiscard]] Vec3 sample(double s, double t) const {
    s -= std::floor(s);
    t -= std::floor(t);
    if (circular) {
      const double dr = r1 - r0, dz = z1 - z0;
      const double per = 2.0 * (dr + dz);
      double u = s * per, rho = r0, z = z0;
      if (per <= 0.0) {
      } else if (u < dr) {
        rho = r0 + u;
      } else if ((u -= dr) < dz) {
        rho = r1, z = z0 + u;
      } else if ((u -= dz) < dr) {
        rho = r1 - u, z = z1;
      } else {
        u -= dr;
        z = z1 - u;
      }
      const double phi = 2.0 * std::numbers::pi * t;
      return centre + rho * (std::cos(phi) * frame.u + std::sin(phi) * frame.v) + z * frame.w;
    }
    // Walk the polyline by arc length, then around the cross-section.
    double total = 0.0;
    for (std::size_t i = 0; i < corners.size(); ++i) total += (corners[(i + 1) % corners.size()] - corners[i]).norm();
    double u = s * total;
    for (std::size_t i = 0; i < corners.size(); ++i) {
      const Vec3& a = corners[i];
      const Vec3& b = corners[(i + 1) % corners.size()];
      const double len = (b - a).norm();
      if (u > len && i + 1 < corners.size()) {
        u -= len;
        continue;
      }
      const Vec3 dir = (b - a) / len;
      const Vec3 n = frame.w.cross(dir);
      const double hd = half_depth, ht = half_thick, per = 4.0 * (hd + ht);
      double v = t * per, x = -hd, y = -ht;
      if (per <= 0.0) {
        x = y = 0.0;
      } else if (v < 2 * hd) {
        x = -hd + v;
      } else if ((v -= 2 * hd) < 2 * ht) {
        x = hd, y = -ht + v;
      } else if ((v -= 2 * ht) < 2 * hd) {
        x = hd - v, y = ht;
      } else {
        v -= 2 * hd;
        y = ht - v;
      }
      return a + std::min(u, len) * dir + x * n + y * frame.w;
    }
    return corners.front();
  }
  [[nodiscard]] std::pair<int, int> grid() const {
    if (circular) return {(r1 > r0 || z1 > z0) ? 32 : 1, 720};
    return {static_cast<int>(std::min<std::size_t>(4096, 128 * corners.size())), has_volume() ? 16 : 1};
  }
};

std::vector<Body> bodies_of(const Model& m) {
  std::vector<Body> out;
  for (std::size_t ci = 0; ci < m.coils.size(); ++ci) {
    const Coil& c = m.coils[ci];
    const auto ws = windings(c);
    for (std::size_t h = 0; h < ws.size(); ++h) {
      Body b;
      b.coil = ci;
      b.half = static_cast<int>(h);
      b.centre = ws[h].centre_m;
      b.frame = Frame::from_axis(c.axis, c.shape == Shape::rectangle ? c.width_axis : Vec3::Zero());
      switch (c.shape) {
        case Shape::loop:
          b.circular = true;
          b.r0 = b.r1 = c.radius_m;
          break;
        case Shape::pack:
          b.circular = true;
          b.r0 = c.inner_radius_m, b.r1 = c.outer_radius_m, b.z0 = -0.5 * c.width_m, b.z1 = 0.5 * c.width_m;
          break;
        case Shape::solenoid:
          b.circular = true;
          b.r0 = c.multilayer() ? c.inner_radius_m : c.radius_m;
          b.r1 = c.multilayer() ? c.outer_radius_m : c.radius_m;
          b.z0 = -0.5 * c.length_m, b.z1 = 0.5 * c.length_m;
          break;
        case Shape::rectangle: {
          const Vec3 u = 0.5 * c.width_m * b.frame.u, v = 0.5 * c.height_m * b.frame.v;
          b.corners = {b.centre - u - v, b.centre + u - v, b.centre + u + v, b.centre - u + v};
          b.half_depth = 0.5 * c.depth_m;
          b.half_thick = 0.5 * c.thickness_m;
          break;
        }
        case Shape::polygon:
          for (const auto& p : c.vertices_m) b.corners.push_back(b.centre + p);
          break;
      }
      if (b.circular) {
        b.size = std::hypot(b.r1, std::max(std::abs(b.z0), std::abs(b.z1)));
      } else {
        for (const auto& p : b.corners) b.size = std::max(b.size, (p - b.centre).norm());
        b.size += std::hypot(b.half_depth, b.half_thick) + b.half_depth;
      }
      out.push_back(std::move(b));
    }
  }
  return out;
}

// Exact test for coaxial circular windings: their meridian rectangles overlap (touching faces
// of two solids do not count; a filament or sheet on a solid's face does).
bool coaxial_overlap(const Body& a, const Body& b, double tol) {
  const double dz = (b.centre - a.centre).dot(a.frame.w);
  const double s = a.frame.w.dot(b.frame.w) > 0 ? 1.0 : -1.0;
  const double bz0 = dz + std::min(s * b.z0, s * b.z1), bz1 = dz + std::max(s * b.z0, s * b.z1);
  const auto overlap = [tol](double lo1, double hi1, double lo2, double hi2) {
    const double o = std::min(hi1, hi2) - std::max(lo1, lo2);
    const bool thin = hi1 - lo1 <= tol || hi2 - lo2 <= tol;
    return thin ? o >= -tol : o > tol;
  };
  return overlap(a.r0, a.r1, b.r0, b.r1) && overlap(a.z0, a.z1, bz0, bz1);
}

// The least signed distance to `a` of points of `b`, by sampling b's conductor on a grid, then
// polishing the best samples by a pattern search in the sample parameters.
double least_distance(const Body& a, const Body& b) {
  const auto [ns, nt] = b.grid();
  std::vector<std::tuple<double, double, double>> best;  // (distance, s, t)
  for (int i = 0; i < ns; ++i)
    for (int j = 0; j < nt; ++j) {
      const double s = (i + 0.5) / ns, t = (j + 0.5) / nt;
      best.emplace_back(a.sd(b.sample(s, t)), s, t);
    }
  const std::size_t keep = std::min<std::size_t>(6, best.size());
  std::partial_sort(best.begin(), best.begin() + static_cast<std::ptrdiff_t>(keep), best.end());
  double least = std::get<0>(best.front());
  for (std::size_t k = 0; k < keep; ++k) {
    auto [d, s, t] = best[k];
    double hs = 1.0 / ns, ht = nt > 1 ? 1.0 / nt : 0.0;
    for (int it = 0; it < 200 && (hs > 1e-15 || ht > 1e-15); ++it) {
      bool moved = false;
      for (const auto& [ds, dt] : {std::pair{hs, 0.0}, std::pair{-hs, 0.0}, std::pair{0.0, ht}, std::pair{0.0, -ht}}) {
        if (ds == 0.0 && dt == 0.0) continue;
        const double v = a.sd(b.sample(s + ds, t + dt));
        if (v < d) {
          d = v, s += ds, t += dt;
          moved = true;
        }
      }
      if (!moved) hs *= 0.5, ht *= 0.5;
    }
    least = std::min(least, d);
  }
  return least;
}

bool bodies_clash(const Body& a, const Body& b) {
  const double scale = std::max(a.size, b.size);
  const double tol = 1e-9 * scale;
  if ((a.centre - b.centre).norm() > a.size + b.size + tol) return false;
  const bool parallel = a.frame.w.cross(b.frame.w).norm() < 1e-12;
  const Vec3 d = b.centre - a.centre;
  const bool collinear = (d - d.dot(a.frame.w) * a.frame.w).norm() <= tol;
  if (a.circular && b.circular && parallel && collinear) return coaxial_overlap(a, b, tol);
  const double ab = least_distance(a, b);
  if (ab < (a.has_volume() ? -tol : tol)) return true;
  const double ba = least_distance(b, a);
  return ba < (b.has_volume() ? -tol : tol);
}

}  // namespace
}  // namespace detail

void check_no_intersections(const Model& model) {
  const auto bodies = detail::bodies_of(model);
  for (std::size_t j = 0; j < bodies.size(); ++j)
    for (std::size_t i = 0; i < j; ++i) {
      const auto& a = bodies[i];
      const auto& b = bodies[j];
      if (!detail::bodies_clash(a, b)) continue;
      const Coil& ca = model.coils[a.coil];
      const Coil& cb = model.coils[b.coil];
      const std::string path = "coil." + cb.name;
      if (a.coil == b.coil)
        throw InputError(model.location_of(path + ".separation"), path + ".separation",
                         fmt::format("the two windings of the pair \"{}\" overlap each other (separation {:g} m); "
                                     "increase the separation or make the winding thinner",
                                     cb.name, cb.separation_m.value_or(0.0)));
      const auto which = [](const Coil& c, const detail::Body& body) {
        return c.is_pair() ? fmt::format(" (winding {} of the pair)", body.half + 1) : std::string();
      };
      throw InputError(model.location_of(path), path,
                       fmt::format("coil \"{}\"{} intersects coil \"{}\"{} declared at {}", cb.name, which(cb, b), ca.name,
                                   which(ca, a), model.location_of("coil." + ca.name).str()));
    }
}

namespace detail {
namespace {

// toml++ 3.3.0 (Debian 12) reaches __builtin_unreachable, undefined behaviour, when it asks
// whether a non-ASCII character is whitespace: wherever whitespace may stand outside strings
// and comments ("a = 1 µ"), and after a backslash in a multi-line basic string (upstream
// marzer/tomlplusplus issues 190 and 295; found by fuzzing). Such text is never valid TOML, so
// refuse it before the parser sees it. Strings and comments may hold any UTF-8.
void refuse_non_ascii_outside_strings(std::string_view text, const std::string& source_name) {
  enum class In { code, comment, basic, literal, ml_basic, ml_literal } in = In::code;
  std::size_t line = 1, column = 0;
  // Outside strings the parser scans a bare value up to the next space, ',', ']', '}' or '#',
  // quotes included ("7i'µ'"): a quote glued to such a run opens no string. A dotted key may
  // glue one to a '.' ("a.'µ' = 1") before the '='.
  bool run = false, in_value = false;
  int depth = 0;  // arrays and inline tables opened in a value, which may span lines
  char prev = '\n';
  const auto refuse = [&](std::string_view where) {
    throw InputError(SourceLocation{source_name, line, column}, "",
                     fmt::format("a non-ASCII character {}; accepted: ASCII there (other characters only inside "
                                 "quoted strings and # comments)", where));
  };
  std::size_t i = text.starts_with("\xEF\xBB\xBF") ? 3 : 0;  // a UTF-8 byte-order mark
  const auto at = [&](std::string_view s) { return text.substr(i, s.size()) == s; };
  const auto skip_quotes = [&](char q) {  // up to two quotes may end a multi-line string's text
    for (int k = 0; k < 2 && i + 1 < text.size() && text[i + 1] == q; ++k) ++i, ++column;
  };
  for (; i < text.size(); ++i) {
    const auto c = static_cast<unsigned char>(text[i]);
    if ((c & 0xC0) != 0x80) ++column;  // columns count characters, not UTF-8 bytes
    if (c == '\n') {
      ++line;
      column = 0;
      if (in == In::comment || in == In::basic || in == In::literal) in = In::code;
      run = false;
      if (depth == 0) in_value = false;
      prev = '\n';
      continue;
    }
    switch (in) {
      case In::code:
        if (c >= 0x80) refuse("outside a quoted string or comment");
        if (c == '#') {
          in = In::comment;
        } else if ((c == '"' || c == '\'') && run && !(prev == '.' && !in_value)) {
          // part of a bare run: no string
        } else if (at(R"(""")")) {
          in = In::ml_basic, i += 2, column += 2, run = false;
        } else if (at("'''")) {
          in = In::ml_literal, i += 2, column += 2, run = false;
        } else if (c == '"') {
          in = In::basic, run = false;
        } else if (c == '\'') {
          in = In::literal, run = false;
        } else if (c == ' ' || c == '\t' || c == '\r' || c == ',' || c == ']' || c == '}') {
          if ((c == ']' || c == '}') && depth > 0) --depth;
          run = false;
        } else if (c == '=' && !in_value) {
          in_value = true, run = false;
        } else if ((c == '[' || c == '{') && !run) {
          if (in_value) ++depth;
        } else {
          run = true;
        }
        break;
      case In::comment:
        break;
      case In::basic:
        if (c == '\\' && i + 1 < text.size() && text[i + 1] != '\n') {
          ++i, ++column;
        } else if (c == '"') {
          in = In::code;
        }
        break;
      case In::literal:
        if (c == '\'') in = In::code;
        break;
      case In::ml_basic:
        if (c == '\\') {
          // The escaped character, or a line-ending backslash and the whitespace it removes.
          std::size_t j = i + 1;
          while (j < text.size() && (text[j] == ' ' || text[j] == '\t' || text[j] == '\r' || text[j] == '\n')) ++j;
          if (j < text.size() && static_cast<unsigned char>(text[j]) >= 0x80) {
            for (std::size_t k = i + 1; k < j; ++k) {
              if (text[k] == '\n') {
                ++line, column = 0;
              } else {
                ++column;
              }
            }
            ++column;
            refuse("after a backslash in a multi-line string");
          }
          if (i + 1 < text.size() && text[i + 1] != '\n') ++i, ++column;
        } else if (at(R"(""")")) {
          in = In::code, i += 2, column += 2;
          skip_quotes('"');
        }
        break;
      case In::ml_literal:
        if (at("'''")) {
          in = In::code, i += 2, column += 2;
          skip_quotes('\'');
        }
        break;
    }
    prev = static_cast<char>(c);
  }
}

}  // namespace
}  // namespace detail

Model parse_model(std::string_view toml_text, const std::string& source_name) {
  detail::refuse_non_ascii_outside_strings(toml_text, source_name);
  toml::table root;
  try {
    root = toml::parse(toml_text, std::string_view(source_name));
  } catch (const toml::parse_error& e) {
    const auto& b = e.source().begin;
    throw InputError(SourceLocation{source_name, b.line, b.column}, "",
                     fmt::format("TOML syntax error: {}; accepted: a TOML 1.0 text file (examples in configs/)", e.description()));
  }
  Model model;
  detail::Reader(source_name, model).read(root);
  check_no_intersections(model);
  check_target_clear(model);
  return model;
}

Model load_model(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(SourceLocation{file.string(), 0, 0}, "", "cannot open the config file");
  std::ostringstream text;
  text << in.rdbuf();
  return parse_model(text.str(), file.string());
}

}  // namespace coilwright
