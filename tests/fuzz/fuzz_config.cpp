// Fuzz target: the config reader, then the sampling of the target it describes. Any text may be
// refused, but only with the documented input errors (InputError, DomainError); anything else
// escaping, a crash, a hang or a sanitizer report is a bug.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/sampling.hpp"

namespace {

// Sampling is only exercised below this many points, to keep each run short; above it the
// count alone is checked (the reader refuses anything beyond kMaxSamplePoints).
constexpr double kSampledHere = 2e5;

void check_samples(const coilwright::Model& model) {
  using namespace coilwright;
  const SampleCount count = count_samples(*model.target);
  if (!count.within_limits()) std::abort();  // the reader must have refused it
  if (count.points > kSampledHere) return;
  const SampleSet s = sample_region(*model.target, detect_symmetry(model));
  // count_samples is an upper bound of what sample_region makes.
  if (static_cast<double>(s.volume.size() + s.boundary.size()) > count.points) std::abort();
  if (s.weights.size() != s.volume.size()) std::abort();
  for (const double w : s.weights)
    if (!std::isfinite(w)) std::abort();
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  try {
    // A folder that does not exist, so a points file named in the input resolves nowhere unless
    // it is an absolute path.
    const coilwright::Model model = coilwright::parse_model(text, "/nonexistent-fuzz-input/fuzz.toml");
    if (model.target) check_samples(model);
  } catch (const coilwright::InputError&) {
  } catch (const coilwright::DomainError&) {
  }
  return 0;
}
