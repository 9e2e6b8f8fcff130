// Fuzz target: the calibration readings reader (and the unit-table splitter under it), then the
// fit of the coupling matrix. Refusals must be InputError or DomainError; readings must be finite.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "coilwright/calibration.hpp"
#include "coilwright/error.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  try {
    const coilwright::CalibrationTable t = coilwright::parse_calibration_csv(text, "fuzz.csv");
    const auto n = static_cast<Eigen::Index>(t.size());
    if (t.currents_A.rows() != n || t.field_T.rows() != n || t.field_T.cols() != 3 ||
        t.currents_A.cols() != static_cast<Eigen::Index>(t.circuits.size()))
      std::abort();
    if (!t.currents_A.allFinite() || !t.field_T.allFinite()) std::abort();
    (void)coilwright::calibrate(t);
  } catch (const coilwright::InputError&) {
  } catch (const coilwright::DomainError&) {
  }
  return 0;
}
