#pragma once
// The response matrix: field per ampere of each independently driven circuit at every sample
// point. The field is linear in the currents, so B = A·I; a search that changes geometry only
// recomputes the columns of coils whose geometry changed.
#include <vector>

#include <Eigen/Core>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

// Rows: [Bx of every point; By of every point; Bz of every point]; columns: circuits. [T/A]
using ResponseMatrix = Eigen::MatrixXd;

// Caches each coil's field per ampere at a fixed point set, so that update() recomputes only
// coils whose geometry differs from the last call (in place: a search's evaluations allocate
// nothing here once the first has sized the columns).
class ResponseCache {
 public:
  explicit ResponseCache(PointSet points) : points_(std::move(points)) {}
  // The response matrix of `model`'s circuits at the cached points.
  [[nodiscard]] const ResponseMatrix& update(const Model& model);
  [[nodiscard]] const PointSet& points() const noexcept { return points_; }
  [[nodiscard]] std::size_t coil_evaluations() const noexcept { return coil_evaluations_; }

 private:
  PointSet points_;
  std::vector<Coil> coils_;                 // geometry each column was computed for
  std::vector<Eigen::VectorXd> per_coil_;   // field per ampere of each coil (3n) in a circuit of several
  std::vector<Eigen::Index> column_of_;     // circuit (column) of each coil
  std::vector<int> coils_in_;               // coils per circuit; a circuit of one is computed in its column
  std::vector<char> stale_;                 // per circuit: a coil of it changed in this update
  ResponseMatrix matrix_;
  std::size_t coil_evaluations_ = 0;
};

// The field per ampere of one coil at the points (3n rows as above), parallel over points.
[[nodiscard]] Eigen::VectorXd coil_response(const Coil& coil, const PointSet& points);
// The same into `out` (resized to 3n; no allocation when it already has that size).
void coil_response(const Coil& coil, const PointSet& points, Eigen::VectorXd& out);

// True when two coils have the same geometry and turns (the field per ampere is then equal).
[[nodiscard]] bool same_geometry(const Coil& a, const Coil& b) noexcept;

}  // namespace coilwright
