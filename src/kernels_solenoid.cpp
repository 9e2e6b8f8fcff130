// Finite cylindrical current sheet (Derby-Olbert closed form through cel).
#include <cmath>

#include "coilwright/constants.hpp"
#include "coilwright/kernels.hpp"

namespace coilwright::kernels {

namespace {

constexpr double kTol = 1.5e-8;  // sqrt(eps), as in cel()

// Contribution of one end of the sheet at axial offset zeta = z -+ L/2:
// returns z/sqrt(D) cel(kc, gamma^2, 1, gamma) in *q and cel(kc,1,1,-1)/k^2 / D^{3/2} in *pr.
inline void sheet_end(double a, double rho, double zeta, double gamma, double* q, double* pr) noexcept {
  const double ap = a + rho, am = a - rho;
  const double z2 = zeta * zeta;
  const double D = ap * ap + z2;
  const double d = am * am + z2;
  const double kc = std::sqrt(d / D);
  const double sD = std::sqrt(D);
  // Two cel evaluations with the same kc share the AGM (qc, em, e); their p differ.
  // Q = cel(kc, gamma^2, 1, gamma): Bulirsch's p > 0 start.
  double p = std::fabs(gamma);
  double qa = 1.0, qb = gamma / p;
  // P = cel(kc, 1, 1, -1): first step by hand with k^2 = 1 - kc^2 divided out:
  // a -> 0, b -> -2 (1 - kc)/k^2 = -2/(1 + kc); its p then equals em (see loop kernel).
  double qc = kc, e = kc, em = 1.0;
  // First step for Q (general p).
  {
    const double f = qa;
    qa += qb / p;
    const double g = e / p;
    qb = 2.0 * (qb + f * g);
    p = g + p;
  }
  double pa = 0.0, pb = -2.0 / (1.0 + kc);
  double g = em;
  em += qc;
  bool done = std::fabs(g - qc) <= g * kTol;
  for (int step = 0; !done && step < 64; ++step) {
    qc = 2.0 * std::sqrt(e);
    e = qc * em;
    {
      const double f = qa;
      qa += qb / p;
      const double gg = e / p;
      qb = 2.0 * (qb + f * gg);
      p = gg + p;
    }
    {
      const double f = pa;
      pa += pb / em;
      pb = 2.0 * (pb + f * qc);
    }
    g = em;
    em += qc;
    done = std::fabs(g - qc) <= g * kTol;
  }
  const double Q = 0.5 * pi * (qb + qa * em) / (em * (em + p));
  const double P = 0.25 * pi * (pb + pa * em) / (em * em);
  *q = zeta / sD * Q;
  *pr = P / (D * sD);
}

}  // namespace

void solenoid_sheet_field(double radius_m, double length_m, double turns_per_m, std::size_t n,
                          const double* rho, const double* z, double* brho_over_rho,
                          double* bz) noexcept {
  const double a = radius_m;
  const double b0 = mu0 * turns_per_m / pi;
  const double h = 0.5 * length_m;
  for (std::size_t i = 0; i < n; ++i) {
    const double r = rho[i];
    double gamma = (a - r) / (a + r);
    // On the cylinder beyond the sheet's ends gamma = 0; cel has a jump of pi/kc across gamma = 0
    // that cancels between the two ends there, so either side will do.
    if (std::fabs(gamma) < 1e-150) gamma = 1e-150;
    double qp, pp, qm, pm;
    sheet_end(a, r, z[i] + h, gamma, &qp, &pp);
    sheet_end(a, r, z[i] - h, gamma, &qm, &pm);
    bz[i] = b0 * a / (a + r) * (qp - qm);
    brho_over_rho[i] = b0 * 4.0 * a * a * (pp - pm);
  }
}

}  // namespace coilwright::kernels
