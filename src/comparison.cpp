#include "coilwright/comparison.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "coilwright/ambient_fit.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/survey.hpp"

namespace coilwright {

MapComparison compare_with_map(const Model& design, const Survey& measured, const AmbientFit* background) {
  MapComparison c;
  c.points = measured.points;
  for (std::size_t i = 0; i < c.points.size(); ++i) {
    // One point at a time, so the message can name the map's line.
    PointSet one;
    one.push_back(c.points[i]);
    try {
      check_clear_of_windings(design.coils, one);
    } catch (const DomainError& e) {
      throw InputError(SourceLocation{measured.source_file, i < measured.lines.size() ? measured.lines[i] : 0, 1}, "",
                       fmt::format("{}; accepted: points outside every winding", e.what()));
    }
  }
  c.model_T = field_of_model(design, c.points);
  c.measured_T = measured.field;
  if (background) {
    const FieldSet bg = background->field_at(c.points);
    for (std::size_t i = 0; i < c.points.size(); ++i) {
      c.measured_T.bx[i] -= bg.bx[i];
      c.measured_T.by[i] -= bg.by[i];
      c.measured_T.bz[i] -= bg.bz[i];
    }
  }
  const std::size_t n = c.points.size();
  c.difference_T = FieldSet(n);
  double d2 = 0.0, m2 = 0.0, m_max = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    c.difference_T.bx[i] = c.measured_T.bx[i] - c.model_T.bx[i];
    c.difference_T.by[i] = c.measured_T.by[i] - c.model_T.by[i];
    c.difference_T.bz[i] = c.measured_T.bz[i] - c.model_T.bz[i];
    const double d = c.difference_T[i].norm();
    const double m = c.model_T[i].norm();
    d2 += d * d;
    m2 += m * m;
    m_max = std::max(m_max, m);
    if (d > c.worst_T) {
      c.worst_T = d;
      c.worst_point = i;
    }
  }
  if (n > 0) {
    c.rms_T = std::sqrt(d2 / static_cast<double>(n));
    const double model_rms = std::sqrt(m2 / static_cast<double>(n));
    c.relative_rms = model_rms > 0.0 ? c.rms_T / model_rms : 0.0;
    c.relative_worst = m_max > 0.0 ? c.worst_T / m_max : 0.0;
  }
  return c;
}

}  // namespace coilwright
