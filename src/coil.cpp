#include "coilwright/coil.hpp"

#include <array>
#include <utility>

namespace coilwright {

namespace {
constexpr std::array<std::pair<Shape, std::string_view>, 5> kShapeNames{{
    {Shape::loop, "loop"},
    {Shape::pack, "pack"},
    {Shape::solenoid, "solenoid"},
    {Shape::rectangle, "rectangle"},
    {Shape::polygon, "polygon"},
}};
}  // namespace

std::string_view to_string(Shape s) noexcept {
  for (const auto& [shape, name] : kShapeNames)
    if (shape == s) return name;
  return "?";
}

std::optional<Shape> shape_from_string(std::string_view s) noexcept {
  for (const auto& [shape, name] : kShapeNames)
    if (name == s) return shape;
  return std::nullopt;
}

std::vector<Winding> windings(const Coil& c) {
  if (!c.is_pair()) return {Winding{&c, c.centre_m, 1.0}};
  const Vec3 half = 0.5 * *c.separation_m * c.axis;
  return {Winding{&c, c.centre_m - half, 1.0}, Winding{&c, c.centre_m + half, c.opposed ? -1.0 : 1.0}};
}

}  // namespace coilwright
