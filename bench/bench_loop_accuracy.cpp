// Accuracy of the loop kernel against the 40-digit values of bench/loop_accuracy.py (run by
// bench/loop_accuracy.sh). Prints the largest errors relative to |B| (and of B_rho/rho relative
// to itself), beyond 0.1 a of the wire and everywhere, for the clone the loader picked.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <vector>

#include "coilwright/kernels.hpp"

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: bench_loop_accuracy <values.txt from loop_accuracy.py>\n");
    return 2;
  }
  std::ifstream in(argv[1]);
  std::vector<double> rho, z, ref_brr, ref_bz;
  double a = 0, b = 0, c = 0, d = 0;
  while (in >> a >> b >> c >> d) {
    rho.push_back(a);
    z.push_back(b);
    ref_brr.push_back(c);
    ref_bz.push_back(d);
  }
  const std::size_t n = rho.size();
  std::vector<double> brr(n), bz(n);
  coilwright::kernels::loop_field(1.0, n, rho.data(), z.data(), brr.data(), bz.data());
  double far_bz = 0, far_brho = 0, far_brr = 0, all = 0;
  std::size_t nonfinite = 0;
  for (std::size_t i = 0; i < n; ++i) {
    if (!std::isfinite(bz[i]) || !std::isfinite(brr[i])) ++nonfinite;
    const double B = std::hypot(ref_bz[i], ref_brr[i] * rho[i]);
    const double e_bz = std::abs(bz[i] - ref_bz[i]) / B;
    const double e_brho = std::abs(brr[i] - ref_brr[i]) * rho[i] / B;
    all = std::max({all, e_bz, e_brho});
    if (std::hypot(rho[i] - 1.0, z[i]) > 0.1) {
      far_bz = std::max(far_bz, e_bz);
      far_brho = std::max(far_brho, e_brho);
      if (ref_brr[i] != 0.0) far_brr = std::max(far_brr, std::abs(brr[i] - ref_brr[i]) / std::abs(ref_brr[i]));
    }
  }
  std::printf("points %zu, non-finite %zu\n", n, nonfinite);
  std::printf("beyond 0.1 a of the wire: max |dB_z|/|B| %.2e, max |dB_rho|/|B| %.2e, max |d(B_rho/rho)|/|B_rho/rho| %.2e\n",
              far_bz, far_brho, far_brr);
  std::printf("all points (incl. 1e-6 a from the wire): max error / |B| %.2e\n", all);
  return nonfinite == 0 ? 0 : 1;
}
