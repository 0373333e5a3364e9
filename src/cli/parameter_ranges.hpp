// Parameter ranges on the command line, `--vary PARAM=LOW:HIGH` (translate, plan): each end a number in SI or a
// quantity with a unit, converted and range-checked by the same rules as `--set` (simulate_command.hpp), and the
// grid of materials the ranges span (log-spaced for yield stress, viscosity and consistency, which are judged by
// ratios; linear for the flow index, which is judged by differences).
#pragma once

#include <string>
#include <vector>

#include "models/rheology.hpp"
#include "src/cli/simulate_command.hpp"
#include "src/fit/parameter_names.hpp"

namespace spreadfit::cli {

/// One --vary PARAM=LOW:HIGH.
struct ParameterRange {
  std::string name;       ///< yield_stress | viscosity | consistency | flow_index
  std::string low, high;  ///< the ends as written
  double lo = 0, hi = 0;  ///< the ends in SI, lo <= hi
};

/// The ranges of `vary` for `law`, with the parameters of `fixed` (PARAM=VALUE, as for --set) held. Throws
/// io::InputError located at the command line, with the field "--vary PARAM=LOW:HIGH" as written, for a malformed
/// range, an unknown parameter or one the law does not have, time_origin (the release time is not a material
/// property), an end that is not a quantity of the parameter's dimension or out of its range, and low above high.
/// Parameters the law needs that are neither fixed nor varied are reported as by parse_simulation_parameters.
std::vector<ParameterRange> parse_parameter_ranges(Law law, const std::vector<std::string>& fixed,
                                                   const std::vector<std::string>& vary);

/// The fixed parameters with every range at its low end (law, material, release time).
SimulationParameters range_base(Law law, const std::vector<std::string>& fixed,
                                const std::vector<ParameterRange>& ranges);

/// Throws io::InputError naming `option` unless 2 <= points <= 25 (a grid of points^k forward solves).
void check_grid_points(int points, const std::string& option);

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
