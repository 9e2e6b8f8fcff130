#include "coilwright/response.hpp"

#include <algorithm>
#include <cmath>

#include "coilwright/field.hpp"
#include "coilwright/kernels.hpp"
#include "coilwright/parallel.hpp"

namespace coilwright {

namespace {

constexpr std::size_t kChunk = 256;  // points per task: large enough to amortise, small enough to balance

// Point loops compiled for AVX-512, AVX2+FMA and the baseline like the kernels' (see
// kernels_loop.cpp): the loader picks the widest the CPU has.
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__) && !defined(__AVX512F__) && \
    !defined(COILWRIGHT_NO_MULTIVERSION)
#define COILWRIGHT_CLONES __attribute__((target_clones("arch=x86-64-v4", "arch=x86-64-v3", "default")))
#else
#define COILWRIGHT_CLONES
#endif

// Filament loops, the commonest searched coil, straight from the loop kernel in the winding's
// own axis: with r = d - (d·a) a the point's offset from the axis (d = p - centre),
//   B = (B_rho/rho) r + B_z a,
// the same field as add_coil_field's frame-rotating path (equal to rounding), whose transform
// around the kernel, compiled for the baseline ISA, cost half as much as the kernel itself. The
// windings of a pair share the axis, hence r and rho (one square root per point for both);
// winding k sits at offset[k] along the axis from `centre` and carries ampere_turns[k].
struct LoopBlock {
  double rho[kChunk], along[kChunk], z[kChunk], rx[kChunk], ry[kChunk], rz[kChunk], brr[kChunk], bw[kChunk];
};

COILWRIGHT_CLONES
void loop_block(double radius_m, const Vec3& centre, const Vec3& a, std::size_t nw, const double* offset,
                const double* ampere_turns, std::size_t n, const double* px, const double* py, const double* pz,
                double* bx, double* by, double* bz, LoopBlock& blk) {
  auto& [rho, along, z, rx, ry, rz, brr, bw] = blk;
  const double cx = centre.x(), cy = centre.y(), cz = centre.z(), ax = a.x(), ay = a.y(), az = a.z();
  for (std::size_t i = 0; i < n; ++i) {
    const double dx = px[i] - cx, dy = py[i] - cy, dz = pz[i] - cz;
    const double s = ax * dx + ay * dy + az * dz;
    rx[i] = dx - s * ax;
    ry[i] = dy - s * ay;
    rz[i] = dz - s * az;
    along[i] = s;
    rho[i] = std::sqrt(rx[i] * rx[i] + ry[i] * ry[i] + rz[i] * rz[i]);
  }
  for (std::size_t k = 0; k < nw; ++k) {
    for (std::size_t i = 0; i < n; ++i) z[i] = along[i] - offset[k];
    kernels::loop_field(radius_m, n, rho, z, brr, bw);
    const double nI = ampere_turns[k];
    for (std::size_t i = 0; i < n; ++i) {
      const double s = nI * brr[i], w = nI * bw[i];
      const double fx = s * rx[i] + w * ax, fy = s * ry[i] + w * ay, fz = s * rz[i] + w * az;
      bx[i] = k == 0 ? fx : bx[i] + fx;
      by[i] = k == 0 ? fy : by[i] + fy;
      bz[i] = k == 0 ? fz : bz[i] + fz;
    }
  }
}

// Calls body(begin, count) over chunks of kChunk points, in parallel only where a team can help:
// with one chunk, or inside a search's parallel starts (where a nested team would have one
// thread), starting a team costs more than the points. Chunks are fixed by n alone, as in
// parallel_chunks, so the result does not depend on which way they ran.
template <class Body>
void for_chunks(std::size_t n, Body&& body) {
#ifdef COILWRIGHT_HAVE_OPENMP
  if (n > kChunk && omp_get_active_level() == 0 && omp_get_max_threads() > 1) {
    parallel_chunks(n, kChunk, body);
    return;
  }
#endif
  for (std::size_t begin = 0; begin < n; begin += kChunk) body(begin, std::min(kChunk, n - begin));
}

// Writes the coil's field per ampere at the points into b[0, 3n).
void response_into(const Coil& coil, const PointSet& points, double* b) {
  const std::size_t n = points.size();
  if (coil.shape == Shape::loop) {  // every block is written by the first winding
    const Vec3 a = coil.axis.normalized();
    const auto wdg = windings(coil);
    double offset[2], ampere_turns[2];
    for (std::size_t k = 0; k < wdg.size(); ++k) {
      offset[k] = (wdg[k].centre_m - wdg[0].centre_m).dot(a);
      ampere_turns[k] = wdg[k].sign * coil.turns;
    }
    for_chunks(n, [&](std::size_t begin, std::size_t count) {
      LoopBlock blk;
      loop_block(coil.radius_m, wdg[0].centre_m, a, wdg.size(), offset, ampere_turns, count, points.x.data() + begin,
                 points.y.data() + begin, points.z.data() + begin, b + begin, b + n + begin, b + 2 * n + begin, blk);
    });
    return;
  }
  std::fill(b, b + 3 * n, 0.0);
  for_chunks(n, [&](std::size_t begin, std::size_t count) {
    add_coil_field(coil, 1.0, view(points, begin, count), FieldView{b + begin, b + n + begin, b + 2 * n + begin});
  });
}

}  // namespace

void coil_response(const Coil& coil, const PointSet& points, Eigen::VectorXd& out) {
  out.resize(static_cast<Eigen::Index>(3 * points.size()));
  response_into(coil, points, out.data());
}

Eigen::VectorXd coil_response(const Coil& coil, const PointSet& points) {
  Eigen::VectorXd col;
  coil_response(coil, points, col);
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
  const auto circuits = static_cast<Eigen::Index>(model.circuits.size());
  // A coil moved to another circuit (or a different model): everything again.
  bool rebuild = matrix_.rows() != rows || matrix_.cols() != circuits || coils_.size() != model.coils.size();
  for (std::size_t i = 0; i < model.coils.size() && !rebuild; ++i)
    rebuild = i >= column_of_.size() || column_of_[i] != static_cast<Eigen::Index>(model.circuit_index(model.coils[i].circuit));
  if (rebuild) {
    column_of_.clear();
    for (const Coil& c : model.coils) column_of_.push_back(static_cast<Eigen::Index>(model.circuit_index(c.circuit)));
    coils_.clear();
    per_coil_.assign(model.coils.size(), Eigen::VectorXd());
    coils_in_.assign(model.circuits.size(), 0);
    for (Eigen::Index k : column_of_) ++coils_in_[static_cast<std::size_t>(k)];
    matrix_.setZero(rows, circuits);
  }
  stale_.assign(model.circuits.size(), 0);
  for (std::size_t i = 0; i < model.coils.size(); ++i) {
    const Coil& c = model.coils[i];
    if (i < coils_.size() && same_geometry(coils_[i], c)) continue;
    const Eigen::Index k = column_of_[i];
    ++coil_evaluations_;
    // A circuit of one coil: its column is that coil's response, written in place.
    if (coils_in_[static_cast<std::size_t>(k)] == 1) {
      response_into(c, points_, matrix_.col(k).data());
    } else {
      coil_response(c, points_, per_coil_[i]);
      stale_[static_cast<std::size_t>(k)] = 1;
    }
    if (i < coils_.size())
      coils_[i] = c;
    else
      coils_.push_back(c);
  }
  // Circuits of several coils: the sum again, in coil order, when one of them moved.
  for (Eigen::Index k = 0; k < circuits; ++k)
    if (stale_[static_cast<std::size_t>(k)]) matrix_.col(k).setZero();
  for (std::size_t i = 0; i < model.coils.size(); ++i)
    if (stale_[static_cast<std::size_t>(column_of_[i])]) matrix_.col(column_of_[i]) += per_coil_[i];
  return matrix_;
}

}  // namespace coilwright
