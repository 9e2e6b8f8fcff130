#pragma once
// OpenMP behind one small header, with a serial fallback when built without it.
#include <cstddef>
#ifdef COILWRIGHT_HAVE_OPENMP
#include <omp.h>
#endif

namespace coilwright {

[[nodiscard]] inline int max_threads() noexcept {
#ifdef COILWRIGHT_HAVE_OPENMP
  return omp_get_max_threads();
#else
  return 1;
#endif
}

inline void set_threads(int n) noexcept {
#ifdef COILWRIGHT_HAVE_OPENMP
  if (n > 0) omp_set_num_threads(n);
#else
  (void)n;
#endif
}

// Calls body(begin, count) for consecutive chunks of [0, n) in parallel. Chunks are fixed by
// n and chunk size alone (not by the thread count), so results written per chunk are
// reproducible with any number of threads.
template <class Body>
void parallel_chunks(std::size_t n, std::size_t chunk, Body&& body) {
  if (chunk == 0) chunk = 1;
  const std::size_t chunks = (n + chunk - 1) / chunk;
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp parallel for schedule(dynamic, 1) if (chunks > 1)
#endif
  for (std::size_t c = 0; c < chunks; ++c) {
    const std::size_t begin = c * chunk;
    body(begin, begin + chunk <= n ? chunk : n - begin);
  }
}

}  // namespace coilwright
