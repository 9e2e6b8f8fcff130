// Throughput of the loop and segment kernels: ns per filament-point and per segment-point, on
// one thread and on all threads. The points are the ones bench/loop_numpy.py uses.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include <time.h>
#ifdef COILWRIGHT_HAVE_OPENMP
#include <omp.h>
#endif

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

// Best of `reps` timings of `body(begin, count)` over all points on `threads`, in one parallel
// region with one contiguous chunk per thread; each timing makes kSweeps passes so that the
// region's start-up is amortised. Two figures per timing:
//   wall: the region's elapsed time per point (what a user waits for);
//   cpu:  from each thread's own CPU time (CLOCK_THREAD_CPUTIME_ID), 1 / sum_t(points_t / cpu_t):
//         the throughput of the threads while they held a core. On a machine shared with other
//         jobs (load > cores) a thread often waits milliseconds for a core, which inflates the
//         wall figure but not this one; on an idle machine the two agree.
// 1 thread: short timings (about 1 ms) so that the best of them is one no other job interrupted.
// All threads: longer timings (about 5 ms per thread; the best of reps/5), so that the wait for the second thread to get a core
// when the region starts is amortised.
int sweeps_for(int threads) {
  const char* env = std::getenv("COILWRIGHT_BENCH_SWEEPS");
  if (env && threads > 1) return std::max(1, std::atoi(env));
  return threads > 1 ? 40 : 4;
}
struct Timing {
  double wall_ns = 1e300, cpu_ns = 1e300;
};

double thread_cpu_s() {
  timespec t{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t);
  return static_cast<double>(t.tv_sec) + 1e-9 * static_cast<double>(t.tv_nsec);
}

template <class Body>
Timing best_ns_per_point(int threads, int reps, Body&& body) {
  Timing best;
  const int kSweeps = sweeps_for(threads);
  std::vector<double> rate(static_cast<std::size_t>(threads), 0.0);
  for (int r = 0; r < reps; ++r) {
    const auto t0 = Clock::now();
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp parallel num_threads(threads) if (threads > 1)
#endif
    {
#ifdef COILWRIGHT_HAVE_OPENMP
      const int t = omp_get_thread_num(), nt = omp_get_num_threads();
#else
      const int t = 0, nt = 1;
#endif
      const std::size_t chunk = (kPoints + static_cast<std::size_t>(nt) - 1) / static_cast<std::size_t>(nt);
      const std::size_t begin = std::min(kPoints, chunk * static_cast<std::size_t>(t));
      const std::size_t count = std::min(kPoints - begin, chunk);
      const double c0 = thread_cpu_s();
      for (int s = 0; s < kSweeps; ++s) body(begin, count);
      const double cpu = thread_cpu_s() - c0;
      rate[static_cast<std::size_t>(t)] = static_cast<double>(count) * kSweeps / std::max(cpu, 1e-9);
    }
    const auto t1 = Clock::now();
    double total_rate = 0.0;
    for (double v : rate) total_rate += v;
    best.wall_ns = std::min(best.wall_ns, std::chrono::duration<double, std::nano>(t1 - t0).count() / (kPoints * kSweeps));
    best.cpu_ns = std::min(best.cpu_ns, 1e9 / total_rate);
  }
  return best;
}

}  // namespace

int main(int argc, char** argv) {
  const int reps = argc > 1 ? std::atoi(argv[1]) : 50;
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
  const Timing loop1 = best_ns_per_point(1, reps, loop);
  const Timing loopn = best_ns_per_point(all, std::max(3, reps / 5), loop);
  const Timing seg1 = best_ns_per_point(1, reps, segment);
  const Timing segn = best_ns_per_point(all, std::max(3, reps / 5), segment);
  double check = 0.0;
  for (std::size_t i = 0; i < kPoints; ++i) check += bz[i] + ox[i];
  std::printf("points %zu, threads %d (checksum %.6e)\n", kPoints, all, check);
  std::printf("loop_ns_1thread %.3f\n", loop1.wall_ns);
  std::printf("loop_ns_1thread_cpu %.3f\n", loop1.cpu_ns);
  std::printf("loop_ns_allthreads %.3f\n", loopn.wall_ns);
  std::printf("loop_ns_allthreads_cpu %.3f\n", loopn.cpu_ns);
  std::printf("segment_ns_1thread %.3f\n", seg1.wall_ns);
  std::printf("segment_ns_allthreads %.3f\n", segn.wall_ns);
  std::printf("segment_ns_allthreads_cpu %.3f\n", segn.cpu_ns);
  return 0;
}
