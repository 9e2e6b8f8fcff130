// Fuzz target: the points CSV reader (region = "points", `coilwright field --points`). Refusals
// must be InputError; every point read must be finite.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  try {
    const coilwright::PointSet pts = coilwright::parse_points_csv(text, "fuzz.csv");
    for (std::size_t i = 0; i < pts.size(); ++i)
      if (!pts[i].allFinite()) std::abort();
  } catch (const coilwright::InputError&) {
  }
  return 0;
}
