#pragma once
// Figures of designs as SVG (drawn with PLplot's SVG driver): axial profile and deviation,
// deviation maps on planes through the target, the coil layout in two views, a comparison of
// ranked designs, the residual of a nulling and the distribution of a tolerance study's worst
// deviation. Text is written as character references, so the SVG can be inlined in HTML.
#include <string>
#include <vector>

#include "coilwright/geometry.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

struct FigureOptions {
  double width_pt = 300.0;    // page width; a journal column is about 250 pt
  double height_pt = 225.0;   // page height
  double text_scale = 1.2;    // PLplot character scale (1.2 gives about 9 pt on this page)
  int map_points = 101;       // points per side of a deviation map
  int profile_points = 301;   // points along an axial profile
  // Throws InputError naming the field, its value and the rule broken.
  void validate() const;
};

struct Figure {
  std::string name;     // file stem: "profile", "map-axial", ...
  std::string caption;  // one sentence saying what is shown (no user text)
  std::string svg;      // a complete SVG document
};

// B along the target axis (through the target centre), with the relative deviation from the
// goal on a second panel, the tolerance band and the region's extent. Throws InputError
// without a target.
[[nodiscard]] Figure axial_profile_figure(const Model& design, const FigureOptions& options = {});

// |B - B_goal| / reference on two planes through the target centre: one containing the target
// axis, one normal to it; log colour scale in ppm (or % for tolerances above 0.1 %), the
// tolerance contour, the target region outlined.
[[nodiscard]] std::vector<Figure> deviation_map_figures(const Model& design, const FigureOptions& options = {});

// The windings in a side view (target axis horizontal) and an end view, to scale, with the
// target region; each circuit in its own colour.
[[nodiscard]] Figure layout_figure(const Model& design, const FigureOptions& options = {});

// The relative deviation along the target axis of several designs (ranked first to last, at
// most six are drawn).
[[nodiscard]] Figure profile_comparison_figure(const std::vector<Model>& designs, const FigureOptions& options = {});

// The residual |coils + ambient| on the plane through the target containing its axis, for a
// model whose currents null `ambient` (expanded about `ambient_centre_m`); contour at
// `tolerance_T`. Throws InputError without a target.
[[nodiscard]] Figure residual_map_figure(const Model& nulled, const AmbientField& ambient, const Vec3& ambient_centre_m,
                                         double tolerance_T, const FigureOptions& options = {});

// Histogram of the worst relative deviation over many perturbed builds, with the tolerance
// marked. Throws InputError for an empty or non-finite sample.
[[nodiscard]] Figure worst_deviation_histogram(const std::vector<double>& worst_relative, double tolerance_relative,
                                               const FigureOptions& options = {});

// The figures of one design: profile, both deviation maps, layout (without a target: layout only).
[[nodiscard]] std::vector<Figure> design_figures(const Model& design, const FigureOptions& options = {});

// The SVG without its XML declaration and DOCTYPE, ready to inline in HTML.
[[nodiscard]] std::string inline_svg(const std::string& svg);

}  // namespace coilwright
