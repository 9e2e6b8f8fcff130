#include "coilwright/response.hpp"

#include "coilwright/field.hpp"
#include "coilwright/parallel.hpp"

namespace coilwright {

namespace {
constexpr std::size_t kChunk = 256;  // points per task: large enough to amortise, small enough to balance
}

Eigen::VectorXd coil_response(const Coil& coil, const PointSet& points) {
  const std::size_t n = points.size();
  Eigen::VectorXd col = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(3 * n));
  double* bx = col.data();
  parallel_chunks(n, kChunk, [&](std::size_t begin, std::size_t count) {
    add_coil_field(coil, 1.0, view(points, begin, count), FieldView{bx + begin, bx + n + begin, bx + 2 * n + begin});
  });
  return col;
}

bool same_geometry(const Coil& a, const Coil& b) noexcept {
  return a.shape == b.shape && a.centre_m == b.centre_m && a.axis == b.axis && a.width_axis == b.width_axis &&
         a.turns == b.turns && a.radius_m == b.radius_m && a.inner_radius_m == b.inner_radius_m &&
         a.outer_radius_m == b.outer_radius_m && a.width_m == b.width_m && a.height_m == b.height_m &&
         a.length_m == b.length_m && a.depth_m == b.depth_m && a.thickness_m == b.thickness_m &&
         a.vertices_m == b.vertices_m && a.separation_m == b.separation_m && a.opposed == b.opposed;
}

const ResponseMatrix& ResponseCache::update(const Model& model) {
  const auto rows = static_cast<Eigen::Index>(3 * points_.size());
  if (coils_.size() != model.coils.size()) {
    coils_.clear();
    per_coil_.clear();
  }
  for (std::size_t i = 0; i < model.coils.size(); ++i) {
    const Coil& c = model.coils[i];
    if (i < coils_.size() && same_geometry(coils_[i], c)) continue;
    Eigen::VectorXd col = coil_response(c, points_);
    ++coil_evaluations_;
    if (i < coils_.size()) {
      coils_[i] = c;
      per_coil_[i] = std::move(col);
    } else {
      coils_.push_back(c);
      per_coil_.push_back(std::move(col));
    }
  }
  matrix_.setZero(rows, static_cast<Eigen::Index>(model.circuits.size()));
  for (std::size_t i = 0; i < model.coils.size(); ++i)
    matrix_.col(static_cast<Eigen::Index>(model.circuit_index(model.coils[i].circuit))) += per_coil_[i];
  return matrix_;
}

}  // namespace coilwright
