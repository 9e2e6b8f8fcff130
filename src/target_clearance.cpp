// The target region must be clear of every winding: a config whose region a conductor passes
// through asks for a field where the model has none.
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "coilwright/clearance.hpp"
#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"

namespace coilwright {

namespace {

// Signed distance from p to a box centred at the origin with half sides h (negative inside).
double box_sd(const Vec3& q, const Vec3& h) {
  const Vec3 d = q.cwiseAbs() - h;
  return d.cwiseMax(0.0).norm() + std::min(d.maxCoeff(), 0.0);
}

// Signed distance to a solid region (negative inside); planes are handled by crossings.
double region_sd(const Target& t, const Frame& f, const Vec3& p) {
  const Vec3 d = p - t.centre_m;
  const Vec3 local(d.dot(f.u), d.dot(f.v), d.dot(f.w));
  switch (t.region) {
    case RegionKind::sphere: return d.norm() - t.radius_m;
    case RegionKind::cylinder: {
      const double rho = std::hypot(local.x(), local.y());
      return box_sd(Vec3(rho, local.z(), 0.0), Vec3(t.radius_m, 0.5 * t.length_m, 0.0));
    }
    case RegionKind::box: return box_sd(local, 0.5 * t.size_m);
    case RegionKind::plane:
    case RegionKind::points: break;
  }
  return 1.0;
}

// Whether the segment a-b crosses the plane rectangle (size u x v about the centre, normal w).
bool crosses_plane(const Target& t, const Frame& f, const Vec3& a, const Vec3& b) {
  const double za = (a - t.centre_m).dot(f.w), zb = (b - t.centre_m).dot(f.w);
  if ((za > 0 && zb > 0) || (za < 0 && zb < 0) || za == zb) return false;
  const Vec3 x = a + (b - a) * (za / (za - zb)) - t.centre_m;
  return std::abs(x.dot(f.u)) <= 0.5 * t.size_m.x() && std::abs(x.dot(f.v)) <= 0.5 * t.size_m.y();
}

std::string size_key(RegionKind r) {
  switch (r) {
    case RegionKind::sphere:
    case RegionKind::cylinder: return "target.radius";
    case RegionKind::box:
    case RegionKind::plane: return "target.size";
    case RegionKind::points: return "target.points";
  }
  return "target";
}

}  // namespace

void check_target_clear(const Model& model) {
  if (!model.target) return;
  const Target& t = *model.target;
  const std::string key = size_key(t.region);
  const SourceLocation where = model.locations.count(key) ? model.location_of(key) : model.location_of("target");
  if (t.region == RegionKind::points) {
    try {
      check_clear_of_windings(model.coils, t.points);
    } catch (const DomainError& e) {
      throw InputError(where, key, fmt::format("a target point is not clear of the windings: {}; accepted: points outside every winding", e.what()));
    }
    return;
  }
  const Frame f = Frame::from_axis(t.axis, t.reference);
  for (const Coil& c : model.coils)
    for (const Winding& w : windings(c)) {
      const WindingBody body = body_of(w);
      const auto& path = body.path_m;
      for (std::size_t i = 0; i < path.size(); ++i) {
        const bool hit = t.region == RegionKind::plane ? crosses_plane(t, f, path[i], path[(i + 1) % path.size()])
                                                       : region_sd(t, f, path[i]) < 0.0;
        if (hit)
          throw InputError(where, key,
                           fmt::format("the target {} is crossed by the winding of coil \"{}\" (its conductor passes through "
                                       "({:.6g}, {:.6g}, {:.6g}) m); accepted: a region clear of every winding",
                                       to_string(t.region), c.name, path[i].x(), path[i].y(), path[i].z()));
      }
    }
}

}  // namespace coilwright
