// SVG map of one reading over two parameters (`translate`'s map), 900 px wide: contour lines of the reading at
// round levels over a grid of parameter values, drawn by marching squares (contour.hpp) in the axis coordinates
// (the logarithm of the value on a logarithmic axis, the value on a linear one).
//
// Header: the title, the caller's notes, a line with the grid size and the reading's range, and a line naming the
// grid points where the model failed; then a legend. Plot (classes for tests and style sheets):
//   "contour"        one path a round level (contour::round_levels, about 7), thin, solid; "contour-label" its
//                    value along the line, in cm when the largest reading reaches 3 cm, else mm (as fit_plot)
//   "in-limits"      the region low <= reading <= high shaded, as sub-cell polygons (contour::band): exact on
//                    the marching-squares contours, so the shading ends on the bold lines
//   "limit-contour"  the reading limits as bold contours, labelled ("limit-label")
//   "param-box"      the parameter limits as a dashed box; an absent pair spans the whole axis
//   "failed"         grid cells with a corner where the model failed, hatched; no contours or shading there
//   "x-tick"/"y-tick" tick labels: 1, 2, 5 x 10^k as plain numbers on a logarithmic axis (svg::LogScale), round
//                    linear ticks on a linear one; the plot spans exactly the grid's range
// Footer: the bench caution (fit_outcome.hpp), since reading limits may feed a release decision.
// Colours: blues for the reading, a dark orange dashed box, grey hatching; every element also differs in line
// weight, dash or texture, so the map reads in grey scale and without telling colours apart.
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

namespace spreadfit::report {

struct ReadingMap {
  std::string title;                         ///< e.g. "front at 30 s on channel, herschel-bulkley"
  std::vector<std::string> notes;            ///< lines under the title, e.g. "flow_index held at 0.45"
  std::string x_name, y_name;                ///< axis labels with the unit, e.g. "yield stress [Pa]"
  bool x_log = false, y_log = false;         ///< logarithmic axis (every grid value > 0) or linear
  std::vector<double> x, y;                  ///< grid values, strictly ascending, at least 2 each, in the unit shown
  std::vector<std::vector<double>> reading;  ///< reading[j][i] at (x[i], y[j]) [m]; NaN where the model failed
  std::string reading_name;                  ///< "front", "radius", "diameter", "gap", "slump"
  std::optional<std::pair<double, double>> reading_limits;  ///< [m], low <= high: shaded between, bold lines at both
  std::optional<std::pair<double, double>> x_limits, y_limits;  ///< parameter limits (axis unit), low <= high
};

/// The map as a complete SVG document. Throws std::invalid_argument naming the field when the grid breaks the
/// conventions above (sizes, order, non-positive values on a logarithmic axis) or a limit pair is not finite or
/// has low > high. Non-finite readings are never printed: they mark failed cells.
std::string reading_map_svg(const ReadingMap& map);

}  // namespace spreadfit::report
