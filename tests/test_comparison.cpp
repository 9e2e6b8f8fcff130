// A measured map against the model: differences point by point and in summary.
#include <catch2/catch.hpp>

#include "coilwright/ambient_fit.hpp"
#include "coilwright/comparison.hpp"
#include "coilwright/config.hpp"
#include "coilwright/field.hpp"
#include "coilwright/nulling.hpp"
#include "coilwright/survey.hpp"

using namespace coilwright;

namespace {

Survey map_of(const PointSet& pts, const FieldSet& b) {
  Survey s;
  s.source_file = "map";
  s.points = pts;
  s.field = b;
  s.lines.assign(pts.size(), 1);
  return s;
}

}  // namespace

TEST_CASE("compare: a map equal to the model differs by nothing; a known offset shows in full", "[compare]") {
  const Model cage = with_currents(load_model(COILWRIGHT_SOURCE_DIR "/configs/cage-null.toml"), {0.3, -0.2, 0.6});
  PointSet pts;
  for (int i = -2; i <= 2; ++i)
    for (int j = -2; j <= 2; ++j) pts.push_back(Vec3(0.03 * i, 0.03 * j, 0.01 * (i - j)));
  const FieldSet model = field_of_model(cage, pts);
  const MapComparison same = compare_with_map(cage, map_of(pts, model));
  CHECK(same.worst_T < 1e-20);  // identical numbers: only exact cancellation

  // Measured = model + (30, -40, 0) nT everywhere: worst = RMS = 50 nT (a 3-4-5 triangle).
  FieldSet shifted = model;
  for (std::size_t i = 0; i < pts.size(); ++i) {
    shifted.bx[i] += 30e-9;
    shifted.by[i] -= 40e-9;
  }
  const MapComparison c = compare_with_map(cage, map_of(pts, shifted));
  // Differences of ~50 uT numbers: rounding ~1e-20 T, so 1e-6 relative to 50 nT is loose.
  CHECK(c.worst_T == Approx(50e-9).epsilon(1e-6));
  CHECK(c.rms_T == Approx(50e-9).epsilon(1e-6));
  CHECK(c.relative_rms > 0.0);
  CHECK(c.relative_rms < 0.01);
}

TEST_CASE("compare: a background survey is subtracted before comparing", "[compare]") {
  const Model cage = with_currents(load_model(COILWRIGHT_SOURCE_DIR "/configs/cage-null.toml"), {0.3, -0.2, 0.6});
  // A uniform background of (20, 0, -40) uT (our choice), surveyed on a 3 x 3 x 3 grid.
  const Vec3 bg(20e-6, 0.0, -40e-6);
  Survey background;
  background.source_file = "bg";
  for (int i = -1; i <= 1; ++i)
    for (int j = -1; j <= 1; ++j)
      for (int k = -1; k <= 1; ++k) {
        background.points.push_back(0.1 * Vec3(i, j, k));
        background.field.bx.push_back(bg.x());
        background.field.by.push_back(bg.y());
        background.field.bz.push_back(bg.z());
        background.lines.push_back(1);
      }
  const AmbientFit fit = fit_ambient(background);
  PointSet pts;
  for (int i = -3; i <= 3; ++i) pts.push_back(Vec3(0.02 * i, 0.01, -0.015 * i));
  FieldSet measured = field_of_model(cage, pts);
  for (std::size_t i = 0; i < pts.size(); ++i) {
    measured.bx[i] += bg.x();
    measured.bz[i] += bg.z();
  }
  const MapComparison c = compare_with_map(cage, map_of(pts, measured), &fit);
  // The fit reproduces an exact uniform field to rounding (~1e-20 T); 1e-15 T is loose.
  CHECK(c.worst_T < 1e-15);
}
