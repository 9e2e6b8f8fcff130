// Fuzz target: quantities with units and the other string specs a config holds (wire, ramp
// rate, insulation class, AWG gauge, material). The first byte picks the parser, the rest is the
// text. Refusals must be UnitParseError or InputError, and an accepted value must be finite.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "coilwright/error.hpp"
#include "coilwright/hardware_options.hpp"
#include "coilwright/thermal.hpp"
#include "coilwright/units.hpp"
#include "coilwright/wire.hpp"

namespace {

constexpr int kDimensions = static_cast<int>(coilwright::Dimension::heat_transfer) + 1;

void require_finite(double v) {
  if (!std::isfinite(v)) std::abort();
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size == 0) return 0;
  const int which = data[0] % (kDimensions + 5);
  const std::string_view text(reinterpret_cast<const char*>(data) + 1, size - 1);
  using namespace coilwright;
  try {
    if (which < kDimensions) {
      require_finite(parse_quantity(text, static_cast<Dimension>(which)));
    } else if (which == kDimensions) {
      require_finite(parse_ramp_rate(text));
    } else if (which == kDimensions + 1) {
      const Wire w = parse_wire(text);
      require_finite(w.bare_diameter_m);
    } else if (which == kDimensions + 2) {
      (void)awg_gauge_from_string(text);
    } else if (which == kDimensions + 3) {
      (void)thermal_class_from_string(text);
    } else {
      (void)material_from_string(text);
    }
  } catch (const UnitParseError&) {
  } catch (const InputError&) {
  }
  return 0;
}
