#pragma once
// Private to the hardware modules (inductance, forces): Gauss-Legendre rules on [-1, 1].
#include <cmath>
#include <map>
#include <mutex>
#include <utility>
#include <vector>

#include "coilwright/constants.hpp"

namespace coilwright::hw_detail {

struct Rule {
  std::vector<double> x, w;  // nodes and weights on [-1, 1]
};

// Newton's method on P_n from the Chebyshev-like first guesses (Numerical Recipes' gauleg);
// nodes to ~1e-15. Rules are built once per order and kept.
inline const Rule& gauss_legendre_rule(int n) {
  static std::mutex m;
  static std::map<int, Rule> cache;
  std::lock_guard lock(m);
  if (auto it = cache.find(n); it != cache.end()) return it->second;
  Rule r;
  r.x.resize(n);
  r.w.resize(n);
  for (int i = 0; i < (n + 1) / 2; ++i) {
    double z = std::cos(pi * (i + 0.75) / (n + 0.5)), dp = 0.0;
    for (int it = 0; it < 100; ++it) {
      double p0 = 1.0, p1 = 0.0;
      for (int j = 1; j <= n; ++j) {
        const double p2 = p1;
        p1 = p0;
        p0 = ((2.0 * j - 1.0) * z * p1 - (j - 1.0) * p2) / j;
      }
      dp = n * (z * p0 - p1) / (z * z - 1.0);
      const double dz = p0 / dp;
      z -= dz;
      if (std::abs(dz) < 1e-16) break;
    }
    r.x[i] = -z;
    r.x[n - 1 - i] = z;
    r.w[i] = r.w[n - 1 - i] = 2.0 / ((1.0 - z * z) * dp * dp);
  }
  return cache.emplace(n, std::move(r)).first->second;
}

}  // namespace coilwright::hw_detail
