#pragma once
// A field map asked for in the config ([[map]]): where to sample and which files to write.
// Plain data, as written by the user, so a design file can carry it back unchanged; the
// lattice of points it stands for is built by lattice_of() in field_map.hpp.
#include <array>
#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "coilwright/geometry.hpp"

namespace coilwright {

enum class MapKind { line, plane, grid };
[[nodiscard]] std::string_view to_string(MapKind k) noexcept;

enum class MapFormat { csv, vtk };
[[nodiscard]] std::string_view to_string(MapFormat f) noexcept;  // also the file extension

// A map in a config is written with every design, so it is kept modest.
inline constexpr std::size_t kMaxConfigMapPoints = 1'000'000;

struct MapRequest {
  std::string name;  // file-name stem: design-01-<name>.csv; letters, digits, '-', '_' and '.'
  MapKind kind = MapKind::plane;
  Vec3 from_m = Vec3::Zero();  // line and grid: first end / corner [m]
  Vec3 to_m = Vec3::Zero();    // line and grid: second end / opposite corner [m]
  std::string plane = "xz";    // plane: the two axes it spans (xy, xz or yz)
  Vec3 centre_m = Vec3::Zero();                // plane: its centre [m]
  std::array<double, 2> size_m{0.0, 0.0};      // plane: its extent along the two axes [m]
  std::array<int, 3> points{1, 1, 1};          // points per direction (unused directions 1)
  std::vector<MapFormat> formats{MapFormat::csv};
};

}  // namespace coilwright
