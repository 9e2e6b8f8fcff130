// Control for the ThreadSanitizer setup (scripts/ci-hardening.sh). Built with -DRACE it has a
// data race inside an OpenMP region, which TSan must report. Without it, a correct parallel loop
// and a join, which TSan must accept: libomp is not instrumented, so without archer (the OpenMP
// tool that tells TSan about the runtime's barriers and joins) TSan reports the read after the
// join as a race. A clean run therefore also shows that archer was loaded.
#include <cstdio>
#include <vector>

int main() {
  std::vector<double> v(4096, 1.0), out(v.size());
  int shared = 0;
  for (int rep = 0; rep < 10; ++rep) {
#pragma omp parallel for schedule(dynamic, 1)
    for (int c = 0; c < 64; ++c)
      for (int i = c * 64; i < c * 64 + 64; ++i) out[i] = 2.0 * v[i];
  }
#pragma omp parallel num_threads(2)
  {
#ifdef RACE
    ++shared;
#else
#pragma omp atomic
    ++shared;
#endif
  }
  double sum = 0.0;
  for (const double x : out) sum += x;
  std::printf("%g %d\n", sum, shared);
  return 0;
}
