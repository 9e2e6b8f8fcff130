// Fuzz target: the survey reader (and the unit-table splitter under it), then the ambient fit
// the survey feeds. Refusals must be InputError or DomainError; readings must be finite.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "coilwright/ambient_fit.hpp"
#include "coilwright/error.hpp"
#include "coilwright/survey.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  try {
    const coilwright::Survey s = coilwright::parse_survey_csv(text, "fuzz.csv");
    if (s.field.size() != s.size() || s.lines.size() != s.size()) std::abort();
    for (std::size_t i = 0; i < s.size(); ++i)
      if (!s.points[i].allFinite() || !s.field[i].allFinite()) std::abort();
    for (const double sg : s.sigma_T)
      if (!(sg > 0.0) || !std::isfinite(sg)) std::abort();
    (void)coilwright::fit_ambient(s);
  } catch (const coilwright::InputError&) {
  } catch (const coilwright::DomainError&) {
  }
  return 0;
}
