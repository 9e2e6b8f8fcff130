#include "coilwright/survey.hpp"

#include <array>
#include <cmath>
#include <utility>

#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/unit_table.hpp"

namespace coilwright {

namespace detail {
namespace {

constexpr std::array<std::string_view, 6> kSurveyColumns{"x", "y", "z", "Bx", "By", "Bz"};
constexpr std::string_view kSigmaColumn = "sigma";

Survey survey_from_table(const UnitTable& t) {
  const SourceLocation header{t.file, t.header_line, 0};
  for (const auto& c : t.columns) {
    bool known = same_column_name(c.name, kSigmaColumn);
    for (auto n : kSurveyColumns) known = known || same_column_name(c.name, n);
    if (!known)
      throw InputError(SourceLocation{t.file, t.header_line, c.column}, c.header,
                       "not a survey column; accepted: x, y, z, Bx, By, Bz and optionally sigma, each with an optional [unit]");
  }
  std::array<std::size_t, 6> col{};
  std::array<double, 6> scale{};
  for (std::size_t k = 0; k < 6; ++k) {
    col[k] = t.find(kSurveyColumns[k]);
    if (col[k] == UnitTable::npos)
      throw InputError(SourceLocation{t.file, t.header_line, 1}, std::string(kSurveyColumns[k]),
                       fmt::format("the header has no column '{}'; accepted: a header naming x, y, z, Bx, By, Bz "
                                   "(e.g. \"x[mm],y[mm],z[mm],Bx[uT],By[uT],Bz[uT]\")", kSurveyColumns[k]));
    scale[k] = column_scale(t, col[k], k < 3 ? Dimension::length : Dimension::flux_density);
  }
  const std::size_t sigma_col = t.find(kSigmaColumn);
  const double sigma_scale = sigma_col == UnitTable::npos ? 1.0 : column_scale(t, sigma_col, Dimension::flux_density);

  Survey s;
  s.source_file = t.file;
  s.points.reserve(t.rows.size());
  for (const auto& row : t.rows) {
    std::array<double, 6> v{};
    for (std::size_t k = 0; k < 6; ++k) {
      v[k] = cell_value(t, row, col[k], scale[k]);
      if (k < 3 && std::abs(v[k]) > kMaxLengthM)
        throw InputError(SourceLocation{t.file, row.line, row.columns[col[k]]}, t.columns[col[k]].header,
                         fmt::format("found \"{}\", {:g} m; accepted: positions up to {:g} m", row.cells[col[k]], v[k], kMaxLengthM));
    }
    s.points.push_back({v[0], v[1], v[2]});
    s.field.bx.push_back(v[3]);
    s.field.by.push_back(v[4]);
    s.field.bz.push_back(v[5]);
    if (sigma_col != UnitTable::npos) {
      const double sg = cell_value(t, row, sigma_col, sigma_scale);
      if (!(sg > 0.0))
        throw InputError(SourceLocation{t.file, row.line, row.columns[sigma_col]}, t.columns[sigma_col].header,
                         fmt::format("found \"{}\"; accepted: a positive uncertainty", row.cells[sigma_col]));
      s.sigma_T.push_back(sg);
    }
    s.lines.push_back(row.line);
  }
  if (s.size() == 0) throw InputError(header, "", "the survey has a header but no readings");
  return s;
}

}  // namespace
}  // namespace detail

Survey parse_survey_csv(std::string_view text, std::string file) {
  return detail::survey_from_table(parse_unit_table(text, std::move(file)));
}

Survey read_survey_csv(const std::filesystem::path& file) { return detail::survey_from_table(read_unit_table(file)); }

}  // namespace coilwright
