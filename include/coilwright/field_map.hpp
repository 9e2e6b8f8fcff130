#pragma once
// Field maps: the field of a design on a line, a plane or a 3-D lattice of points, with the
// deviation from the target's goal, written as CSV or as legacy VTK (STRUCTURED_GRID, ASCII)
// that common scientific viewers open.
#include <array>
#include <filesystem>
#include <string>
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/map_request.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

// A regular lattice: point (i, j, k) = origin + i/(n0-1) edge0 + j/(n1-1) edge1 + k/(n2-1) edge2;
// an edge with one point contributes nothing. i runs fastest (the VTK order).
struct MapLattice {
  MapKind kind = MapKind::plane;
  Vec3 origin_m = Vec3::Zero();
  std::array<Vec3, 3> edge_m{Vec3::Zero(), Vec3::Zero(), Vec3::Zero()};  // full span of each direction [m]
  std::array<int, 3> count{1, 1, 1};                                       // points per direction (>= 1)
  // Throws InputError naming the field, its value and the rule broken (counts >= 1, at most
  // kMaxMapPoints points, an edge of non-zero length wherever there is more than one point).
  void validate() const;
  [[nodiscard]] std::size_t size() const noexcept;
  [[nodiscard]] Vec3 point(int i, int j, int k) const;
  [[nodiscard]] PointSet points() const;
};

inline constexpr std::size_t kMaxMapPoints = 4'000'000;

// A line from `from` to `to` with `n` points.
[[nodiscard]] MapLattice line_lattice(const Vec3& from_m, const Vec3& to_m, int n);
// A plane through `centre` spanned by two of x, y, z (`axes` = "xy", "xz" or "yz"), of the given
// size along each, with n0 x n1 points. Throws InputError for other axes.
[[nodiscard]] MapLattice plane_lattice(const std::string& axes, const Vec3& centre_m, double size0_m, double size1_m, int n0, int n1);
// A plane through `centre` spanned by the unit vectors u and v (general orientation).
[[nodiscard]] MapLattice plane_lattice(const Vec3& centre_m, const Vec3& u, const Vec3& v, double size0_m, double size1_m, int n0,
                                       int n1);
// An axis-aligned box from corner `from` to corner `to` with n[0] x n[1] x n[2] points.
[[nodiscard]] MapLattice grid_lattice(const Vec3& from_m, const Vec3& to_m, std::array<int, 3> n);
// The lattice a config's [[map]] asks for.
[[nodiscard]] MapLattice lattice_of(const MapRequest& request);

// The field of a design on a lattice.
struct FieldMap {
  MapLattice lattice;
  PointSet points;                 // lattice order [m]
  FieldSet field_T;                // coils plus ambient [T]; NaN where a point lies on or in a winding
  std::vector<double> deviation;   // |B - B_goal| / reference (relative); NaN without a target or on a winding
  std::vector<bool> in_winding;    // the point lies on a filament or inside a winding pack
  double reference_T = 0.0;        // the goal's scale (0 without a target)
  double tolerance_relative = 0.0; // the target's tolerance over the reference (0 without a target)
};

// Computes the map (in parallel over points). Points on or inside windings are marked, not
// refused, so a plane may cut through the rig.
[[nodiscard]] FieldMap compute_field_map(const Model& model, const MapLattice& lattice);

// "# " comment lines naming the tool, then x,y,z,Bx,By,Bz,|B|,deviation (m, T, relative), 17 digits.
[[nodiscard]] std::string field_map_csv(const FieldMap& map, const std::string& title);
// Legacy VTK 3.0, ASCII, DATASET STRUCTURED_GRID; POINT_DATA: VECTORS B (T), SCALARS B_magnitude
// (T) and SCALARS deviation (relative). NaN values are written as "nan".
[[nodiscard]] std::string field_map_vtk(const FieldMap& map, const std::string& title);

// Writes the map as CSV or VTK by the file's extension (.csv, .vtk), atomically. Throws
// InputError for another extension.
void write_field_map(const std::filesystem::path& file, const FieldMap& map, const std::string& title);

// <stem>-<name>.<format>: the file a [[map]] is written to.
[[nodiscard]] std::string map_file_name(const std::string& stem, const MapRequest& request, MapFormat format);

// Computes and writes every [[map]] of `model` into `dir` as <stem>-<name>.<format>, atomically;
// returns the files written, in config order.
std::vector<std::filesystem::path> write_config_maps(const std::filesystem::path& dir, const std::string& stem, const Model& model);

}  // namespace coilwright
