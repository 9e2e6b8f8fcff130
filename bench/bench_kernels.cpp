// Throughput of the loop and segment kernels: ns per filament-point and per segment-point, on
// one thread and on all threads. The points are the ones bench/loop_numpy.py uses.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "coilwright/kernels.hpp"
#include "coilwright/parallel.hpp"

namespace {

using Clock = std::chrono::steady_clock;
constexpr std::size_t kPoints = 1u << 16;
constexpr double kRadius = 1.0;  // [m]

// Low-discrepancy points in the meridian half-plane rho in [0, 2a), z in [-a, a): the same
// formula as bench/loop_numpy.py.
void make_points(std::vector<double>& rho, std::vector<double>& z) {
  rho.resize(kPoints);
  z.resize(kPoints);
  for (std::size_t i = 0; i < kPoints; ++i) {
    const double u = std::fmod(0.1234 + static_cast<double>(i) * 0.6180339887498949, 1.0);
    const double v = std::fmod(0.3456 + static_cast<double>(i) * 0.7548776662466927, 1.0);
    rho[i] = 2.0 * kRadius * u;
    z[i] = kRadius * (2.0 * v - 1.0);
  }
}

// Best of `reps` timings of `body(begin, count)` run over all points on `threads`; each
// timing makes kSweeps passes inside one parallel region (one chunk per thread), so that the
// region's start-up and a busy machine's scheduling noise are amortised.
constexpr int kSweeps = 20;
template <class Body>
double best_ns_per_point(int threads, int reps, Body&& body) {
  coilwright::set_threads(threads);
  const std::size_t chunk = (kPoints + static_cast<std::size_t>(threads) - 1) / static_cast<std::size_t>(threads);
  double best = 1e300;
  for (int r = 0; r < reps; ++r) {
    const auto t0 = Clock::now();
    coilwright::parallel_chunks(kPoints, chunk, [&](std::size_t begin, std::size_t count) {
      for (int s = 0; s < kSweeps; ++s) body(begin, count);
    });
    const auto t1 = Clock::now();
    best = std::min(best, std::chrono::duration<double, std::nano>(t1 - t0).count() / (kPoints * kSweeps));
  }
  return best;
}

}  // namespace

int main(int argc, char** argv) {
  const int reps = argc > 1 ? std::atoi(argv[1]) : 10;
  std::vector<double> rho, z;
  make_points(rho, z);
  std::vector<double> br(kPoints), bz(kPoints);
  // 3-D points for the segment: the meridian points tilted out of the plane.
  std::vector<double> x(kPoints), y(kPoints), zz(kPoints);
  for (std::size_t i = 0; i < kPoints; ++i) {
    x[i] = rho[i];
    y[i] = 0.3 * z[i] + 0.1;
    zz[i] = z[i];
  }
  std::vector<double> ox(kPoints, 0.0), oy(kPoints, 0.0), oz(kPoints, 0.0);
  const coilwright::Vec3 a(-0.7, -0.2, 0.1), b(0.9, 0.4, -0.3);

  auto loop = [&](std::size_t begin, std::size_t count) {
    coilwright::kernels::loop_field(kRadius, count, rho.data() + begin, z.data() + begin, br.data() + begin,
                                    bz.data() + begin);
  };
  auto segment = [&](std::size_t begin, std::size_t count) {
    coilwright::kernels::add_segment_field(a, b, 1.0, {x.data() + begin, y.data() + begin, zz.data() + begin, count},
                                           {ox.data() + begin, oy.data() + begin, oz.data() + begin});
  };
  const int all = coilwright::max_threads();
  const double loop1 = best_ns_per_point(1, reps, loop);
  const double loopn = best_ns_per_point(all, reps, loop);
  const double seg1 = best_ns_per_point(1, reps, segment);
  const double segn = best_ns_per_point(all, reps, segment);
  double check = 0.0;
  for (std::size_t i = 0; i < kPoints; ++i) check += bz[i] + ox[i];
  std::printf("points %zu, threads %d (checksum %.6e)\n", kPoints, all, check);
  std::printf("loop_ns_1thread %.3f\n", loop1);
  std::printf("loop_ns_allthreads %.3f\n", loopn);
  std::printf("segment_ns_1thread %.3f\n", seg1);
  std::printf("segment_ns_allthreads %.3f\n", segn);
  return 0;
}
