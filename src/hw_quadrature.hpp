#pragma once
// Private to the hardware modules (inductance, forces): the project's one set of Gauss-Legendre
// rules (sampling.hpp), under the short names the formulas there use: x (nodes), w (weights).
#include <vector>

#include "coilwright/sampling.hpp"

namespace coilwright::hw_detail {

struct RuleRef {
  const std::vector<double>& x;  // nodes on [-1, 1]
  const std::vector<double>& w;  // weights, summing to 2
};

inline RuleRef gauss_legendre_rule(int n) {
  const GaussLegendre& g = gauss_legendre(n);
  return {g.nodes, g.weights};
}

}  // namespace coilwright::hw_detail
