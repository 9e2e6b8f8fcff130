#pragma once
// Physical constants used by the field kernels.

namespace coilwright {

// Vacuum magnetic permeability [N/A^2 = T m/A].
// Source: CODATA 2018 recommended values (E. Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)),
// mu0 = 1.25663706212(19)e-6 N/A^2.
inline constexpr double mu0 = 1.25663706212e-6;

inline constexpr double pi = 3.141592653589793238462643383279502884;

}  // namespace coilwright
