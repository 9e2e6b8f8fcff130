#pragma once
// A survey: three-axis magnetometer readings of the ambient field at known points.
//
// File format (CSV): a header naming the columns x, y, z, Bx, By, Bz in any order, each with an
// optional unit in brackets ("x[mm]", "Bx[uT]"); without a unit, metres and tesla. Lengths: m,
// mm, cm (and the other length units of units.hpp); flux densities: T, mT, uT, nT, G (and the
// other flux-density units). An optional column `sigma` gives each reading's uncertainty: one
// standard deviation of each field component, with the same unit rules ("sigma[nT]"); it must
// be positive. Lines starting with '#' and blank lines are skipped; CRLF line ends are accepted.
// Any other column is an error (a misspelt `sigma` must not silently drop the uncertainties).
#include <cstddef>
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "coilwright/geometry.hpp"

namespace coilwright {

struct Survey {
  std::string source_file;          // for messages
  PointSet points;                  // [m]
  FieldSet field;                   // [T]
  std::vector<double> sigma_T;      // per reading [T]; empty when the file has no sigma column
  std::vector<std::size_t> lines;   // the file line of each reading, for messages

  [[nodiscard]] std::size_t size() const noexcept { return points.size(); }
  [[nodiscard]] bool has_uncertainty() const noexcept { return !sigma_T.empty(); }
};

// Parses survey text; `file` names it in messages. Throws InputError with file, line, column
// name, the text found and what is accepted.
[[nodiscard]] Survey parse_survey_csv(std::string_view text, std::string file);
[[nodiscard]] Survey read_survey_csv(const std::filesystem::path& file);

}  // namespace coilwright
