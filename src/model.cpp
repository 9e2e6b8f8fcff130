#include "coilwright/model.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <stdexcept>
#include <utility>

#include <fmt/format.h>

namespace coilwright {

namespace {
constexpr std::array<std::pair<CoilKey, std::string_view>, 12> kKeyNames{{
    {CoilKey::radius, "radius"},
    {CoilKey::inner_radius, "inner_radius"},
    {CoilKey::outer_radius, "outer_radius"},
    {CoilKey::width, "width"},
    {CoilKey::height, "height"},
    {CoilKey::length, "length"},
    {CoilKey::separation, "separation"},
    {CoilKey::turns, "turns"},
    {CoilKey::centre_x, "centre_x"},
    {CoilKey::centre_y, "centre_y"},
    {CoilKey::centre_z, "centre_z"},
    {CoilKey::wire, "wire"},
}};
}  // namespace

std::string_view to_string(CoilKey k) noexcept {
  for (const auto& [key, name] : kKeyNames)
    if (key == k) return name;
  return "?";
}

std::optional<CoilKey> coil_key_from_string(std::string_view s) noexcept {
  for (const auto& [key, name] : kKeyNames)
    if (name == s) return key;
  return std::nullopt;
}

double get(const Coil& c, CoilKey k) {
  switch (k) {
    case CoilKey::radius: return c.radius_m;
    case CoilKey::inner_radius: return c.inner_radius_m;
    case CoilKey::outer_radius: return c.outer_radius_m;
    case CoilKey::width: return c.width_m;
    case CoilKey::height: return c.height_m;
    case CoilKey::length: return c.length_m;
    case CoilKey::separation: return c.separation_m.value_or(0.0);
    case CoilKey::turns: return c.turns;
    case CoilKey::centre_x: return c.centre_m.x();
    case CoilKey::centre_y: return c.centre_m.y();
    case CoilKey::centre_z: return c.centre_m.z();
    case CoilKey::wire: return c.wire_choice;
  }
  throw std::logic_error("unknown coil key");
}

void set(Coil& c, CoilKey k, double value) {
  switch (k) {
    case CoilKey::radius: c.radius_m = value; return;
    case CoilKey::inner_radius: c.inner_radius_m = value; return;
    case CoilKey::outer_radius: c.outer_radius_m = value; return;
    case CoilKey::width: c.width_m = value; return;
    case CoilKey::height: c.height_m = value; return;
    case CoilKey::length: c.length_m = value; return;
    case CoilKey::separation: c.separation_m = value; return;
    case CoilKey::turns: c.turns = value; return;
    case CoilKey::centre_x: c.centre_m.x() = value; return;
    case CoilKey::centre_y: c.centre_m.y() = value; return;
    case CoilKey::centre_z: c.centre_m.z() = value; return;
    case CoilKey::wire:
      if (c.wire_options.empty()) return;
      c.wire_choice = std::clamp(static_cast<int>(std::lround(value)), 0, static_cast<int>(c.wire_options.size()) - 1);
      c.wire = c.wire_options[static_cast<std::size_t>(c.wire_choice)];
      return;
  }
  throw std::logic_error("unknown coil key");
}

std::string FreeParameter::label(const std::vector<Coil>& coils) const {
  return fmt::format("{}.{}", coils.at(coil).name, to_string(key));
}

std::size_t Model::circuit_index(const std::string& name) const {
  for (std::size_t i = 0; i < circuits.size(); ++i)
    if (circuits[i].name == name) return i;
  throw std::out_of_range("no circuit named '" + name + "'");
}

SourceLocation Model::location_of(const std::string& path) const {
  if (auto it = locations.find(path); it != locations.end()) return it->second;
  return SourceLocation{source_file, 0, 0};
}

}  // namespace coilwright
