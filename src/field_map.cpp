// Field maps on lines, planes and lattices, written as CSV or legacy VTK.
// VTK layout: "The VTK User's Guide", Kitware, 11th ed. (2010), chapter 19 "VTK File Formats",
// legacy format: header line, title line, ASCII|BINARY, DATASET, POINT_DATA attributes.
#include "coilwright/field_map.hpp"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "coilwright/atomic_file.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/metrics.hpp"

namespace coilwright {

std::string_view to_string(MapKind k) noexcept {
  switch (k) {
    case MapKind::line: return "line";
    case MapKind::plane: return "plane";
    case MapKind::grid: return "grid";
  }
  return "?";
}

std::string_view to_string(MapFormat f) noexcept { return f == MapFormat::vtk ? "vtk" : "csv"; }

void MapLattice::validate() const {
  static constexpr const char* kDir[] = {"first", "second", "third"};
  std::size_t total = 1;
  for (int d = 0; d < 3; ++d) {
    if (count[d] < 1)
      throw InputError(fmt::format("map: {} point count is {}; it must be at least 1", kDir[d], count[d]));
    if (count[d] > 1 && !(edge_m[d].norm() > 0.0))
      throw InputError(fmt::format("map: the {} direction has {} points but zero length; give it an extent", kDir[d], count[d]));
    if (!edge_m[d].allFinite() || !origin_m.allFinite()) throw InputError("map: coordinates must be finite");
    total *= static_cast<std::size_t>(count[d]);
    if (total > kMaxMapPoints)
      throw InputError(fmt::format("map: more than {} points; use fewer points per direction", kMaxMapPoints));
  }
}

std::size_t MapLattice::size() const noexcept {
  return static_cast<std::size_t>(count[0]) * static_cast<std::size_t>(count[1]) * static_cast<std::size_t>(count[2]);
}

Vec3 MapLattice::point(int i, int j, int k) const {
  const int idx[3] = {i, j, k};
  Vec3 p = origin_m;
  for (int d = 0; d < 3; ++d)
    if (count[d] > 1) p += edge_m[d] * (static_cast<double>(idx[d]) / (count[d] - 1));
  return p;
}

PointSet MapLattice::points() const {
  PointSet pts;
  pts.reserve(size());
  for (int k = 0; k < count[2]; ++k)
    for (int j = 0; j < count[1]; ++j)
      for (int i = 0; i < count[0]; ++i) pts.push_back(point(i, j, k));
  return pts;
}

MapLattice line_lattice(const Vec3& from_m, const Vec3& to_m, int n) {
  MapLattice l;
  l.kind = MapKind::line;
  l.origin_m = from_m;
  l.edge_m[0] = to_m - from_m;
  l.count = {n, 1, 1};
  l.validate();
  return l;
}

MapLattice plane_lattice(const Vec3& centre_m, const Vec3& u, const Vec3& v, double size0_m, double size1_m, int n0, int n1) {
  MapLattice l;
  l.kind = MapKind::plane;
  l.edge_m[0] = u.normalized() * size0_m;
  l.edge_m[1] = v.normalized() * size1_m;
  l.origin_m = centre_m - 0.5 * l.edge_m[0] - 0.5 * l.edge_m[1];
  l.count = {n0, n1, 1};
  l.validate();
  return l;
}

MapLattice plane_lattice(const std::string& axes, const Vec3& centre_m, double size0_m, double size1_m, int n0, int n1) {
  auto unit = [&axes](char c) -> Vec3 {
    switch (c) {
      case 'x': return Vec3::UnitX();
      case 'y': return Vec3::UnitY();
      case 'z': return Vec3::UnitZ();
      default: throw InputError(fmt::format("map: plane '{}' is not one of xy, xz, yz", axes));
    }
  };
  if (axes != "xy" && axes != "xz" && axes != "yz")
    throw InputError(fmt::format("map: plane '{}' is not one of xy, xz, yz", axes));
  return plane_lattice(centre_m, unit(axes[0]), unit(axes[1]), size0_m, size1_m, n0, n1);
}

MapLattice grid_lattice(const Vec3& from_m, const Vec3& to_m, std::array<int, 3> n) {
  MapLattice l;
  l.kind = MapKind::grid;
  l.origin_m = from_m;
  const Vec3 d = to_m - from_m;
  l.edge_m = {Vec3(d.x(), 0, 0), Vec3(0, d.y(), 0), Vec3(0, 0, d.z())};
  l.count = n;
  l.validate();
  return l;
}

MapLattice lattice_of(const MapRequest& r) {
  switch (r.kind) {
    case MapKind::line: return line_lattice(r.from_m, r.to_m, r.points[0]);
    case MapKind::plane: return plane_lattice(r.plane, r.centre_m, r.size_m[0], r.size_m[1], r.points[0], r.points[1]);
    case MapKind::grid: return grid_lattice(r.from_m, r.to_m, r.points);
  }
  throw InputError("map: unknown kind");
}

FieldMap compute_field_map(const Model& model, const MapLattice& lattice) {
  lattice.validate();
  FieldMap map;
  map.lattice = lattice;
  map.points = lattice.points();
  const std::size_t n = map.points.size();
  map.in_winding.assign(n, false);
  for (std::size_t i = 0; i < n; ++i) {
    PointSet one;
    one.push_back(map.points[i]);
    try {
      check_clear_of_windings(model.coils, one);
    } catch (const DomainError&) {
      map.in_winding[i] = true;
    }
  }
  map.field_T = field_of_model(model, map.points);
  std::optional<GoalSpec> goal;
  // A null goal's scale is its ambient field: without one there is nothing to deviate from, and
  // the map holds the coils' field alone.
  const auto& t = model.target;
  const bool has_scale = t && !(t->goal == Goal::null && !(t->ambient && t->ambient->uniform_T.norm() > 0.0));
  if (has_scale) {
    goal = GoalSpec::from(*model.target);
    map.reference_T = goal->reference_T;
    map.tolerance_relative = goal->tolerance_T / goal->reference_T;
  }
  constexpr double nan = std::numeric_limits<double>::quiet_NaN();
  map.deviation.assign(n, nan);
  for (std::size_t i = 0; i < n; ++i) {
    if (map.in_winding[i]) {
      map.field_T.bx[i] = map.field_T.by[i] = map.field_T.bz[i] = nan;
      continue;
    }
    if (!goal) continue;
    const Vec3 p = map.points[i];
    const Vec3 b = map.field_T[i] + goal->ambient_at(p);
    map.field_T.bx[i] = b.x();
    map.field_T.by[i] = b.y();
    map.field_T.bz[i] = b.z();
    map.deviation[i] = goal->deviation_T(p, b) / goal->reference_T;
  }
  return map;
}

namespace {

std::string number(double v) { return std::isfinite(v) ? fmt::format("{:.17g}", v) : std::string("nan"); }

std::string one_line(std::string s) {
  for (char& c : s)
    if (c == '\n' || c == '\r') c = ' ';
  return s;
}

}  // namespace

std::string field_map_csv(const FieldMap& map, const std::string& title) {
  std::string out = fmt::format("# coilwright {} ({}) field map: {}\n", COILWRIGHT_VERSION, COILWRIGHT_GIT_REVISION, one_line(title));
  out += fmt::format("# {} of {} x {} x {} points; x,y,z in m; Bx,By,Bz,|B| in T (coils plus ambient); "
                     "deviation = |B - B_goal| / {:.6g} T (relative); nan on or inside a winding\n",
                     to_string(map.lattice.kind), map.lattice.count[0], map.lattice.count[1], map.lattice.count[2], map.reference_T);
  out += "x,y,z,Bx,By,Bz,|B|,deviation\n";
  for (std::size_t i = 0; i < map.points.size(); ++i) {
    const Vec3 b = map.field_T[i];
    out += fmt::format("{},{},{},{},{},{},{},{}\n", number(map.points.x[i]), number(map.points.y[i]), number(map.points.z[i]),
                       number(b.x()), number(b.y()), number(b.z()), number(b.norm()), number(map.deviation[i]));
  }
  return out;
}

std::string field_map_vtk(const FieldMap& map, const std::string& title) {
  const std::size_t n = map.points.size();
  std::string out = "# vtk DataFile Version 3.0\n";
  // The title line is at most 256 characters and ends at the line break.
  std::string head = one_line(fmt::format("coilwright {} field map: {}", COILWRIGHT_VERSION, title));
  if (head.size() > 255) head.resize(255);
  out += head + "\nASCII\nDATASET STRUCTURED_GRID\n";
  out += fmt::format("DIMENSIONS {} {} {}\nPOINTS {} double\n", map.lattice.count[0], map.lattice.count[1], map.lattice.count[2], n);
  for (std::size_t i = 0; i < n; ++i)
    out += fmt::format("{} {} {}\n", number(map.points.x[i]), number(map.points.y[i]), number(map.points.z[i]));
  out += fmt::format("POINT_DATA {}\nVECTORS B double\n", n);
  for (std::size_t i = 0; i < n; ++i)
    out += fmt::format("{} {} {}\n", number(map.field_T.bx[i]), number(map.field_T.by[i]), number(map.field_T.bz[i]));
  out += "SCALARS B_magnitude double 1\nLOOKUP_TABLE default\n";
  for (std::size_t i = 0; i < n; ++i) out += number(map.field_T[i].norm()) + "\n";
  out += "SCALARS deviation double 1\nLOOKUP_TABLE default\n";
  for (std::size_t i = 0; i < n; ++i) out += number(map.deviation[i]) + "\n";
  return out;
}

void write_field_map(const std::filesystem::path& file, const FieldMap& map, const std::string& title) {
  const std::string ext = file.extension().string();
  if (ext == ".csv")
    write_file_atomic(file, field_map_csv(map, title));
  else if (ext == ".vtk")
    write_file_atomic(file, field_map_vtk(map, title));
  else
    throw InputError(fmt::format("map: output '{}' must end in .csv or .vtk", file.string()));
}

std::string map_file_name(const std::string& stem, const MapRequest& request, MapFormat format) {
  return fmt::format("{}-{}.{}", stem, request.name, to_string(format));
}

std::vector<std::filesystem::path> write_config_maps(const std::filesystem::path& dir, const std::string& stem, const Model& model) {
  std::vector<std::filesystem::path> files;
  for (const MapRequest& r : model.maps) {
    const FieldMap map = compute_field_map(model, lattice_of(r));
    for (const MapFormat f : r.formats) {
      files.push_back(dir / map_file_name(stem, r, f));
      write_file_atomic(files.back(), f == MapFormat::vtk ? field_map_vtk(map, model.project.name) : field_map_csv(map, model.project.name));
    }
  }
  return files;
}

}  // namespace coilwright
