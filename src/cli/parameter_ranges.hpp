// The grid of materials that --vary ranges span (translate, plan; the ranges themselves are read by
// src/cli/command_line_values.hpp): log-spaced for yield stress, viscosity and consistency, which are judged by
// ratios; linear for the flow index, which is judged by differences.
#pragma once

#include <string>
#include <vector>

#include "models/rheology.hpp"
#include "src/cli/command_line_values.hpp"

namespace spreadfit::cli {

/// Throws io::InputError naming `option` unless 2 <= points <= 25 (a grid of points^k forward solves).
void check_grid_points(int points, const std::string& option);

/// True when the range is spaced in log: not the flow index, and starting above zero.
bool log_spaced(const ParameterRange& range);

/// The value at fraction f in [0, 1] of the range: lo (hi/lo)^f, or lo + f (hi - lo) for the flow index or a range
/// that starts at zero.
double range_value(const ParameterRange& range, double f);


/// One grid point: the material and, per range, the index of its value (0..points-1).
struct GridPoint {
  Material material;
  std::vector<int> index;
};

/// Every combination of `points` values per range over `base` (points^k materials; the first range varies
/// fastest). No ranges gives the base alone.
std::vector<GridPoint> parameter_grid(const Material& base, const std::vector<ParameterRange>& ranges, int points);

}  // namespace spreadfit::cli
