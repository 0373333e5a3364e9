// Moving a spec between parameters and readings on one rig at one time (`spreadfit translate`).
//
// Forward: parameter limits become reading limits: the smallest and largest reading over a grid of materials
// (reading_range). Reverse: reading limits become limits of one parameter (solve_parameter_limits): for every
// combination of the other parameters, the set of values of the solved parameter whose reading lies within the
// limits is found by sampling its search range and refining every crossing of a limit with TOMS 748 (Alefeld,
// Potra & Shi 1995; boost::math::tools::toms748_solve). Over the combinations two answers matter:
//   possible  the values that give a reading within limits for at least one combination (the union): a reading
//             within limits says no more than that the parameter lies here
//   assured   the values that give a reading within limits for every combination (the intersection): a parameter
//             here passes the reading test whatever the others are
// The reading need not be monotone in the solved parameter; when the in-limits set of some combination is not one
// interval, the result says so and reports the hull.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "models/forward.hpp"

namespace spreadfit::qc {

/// The reading of `material` at `time` [s] after the release, or nothing when the forward model fails.
std::optional<double> reading_at(const TestSetup& setup, const Material& material, double time);

/// reading_at for every material, on the machine's cores (the forward model is pure); one entry per material.
std::vector<std::optional<double>> readings_at(const TestSetup& setup, const std::vector<Material>& materials,
                                               double time);

struct ReadingRange {
  double low = 0, high = 0;  ///< [m]
  std::vector<double> readings;  ///< [m], one per material in the order given (when ok)
  int solves = 0;
  std::string failure;  ///< non-empty when some material's forward solve failed (then low/high are unset)
  bool ok() const { return failure.empty(); }
};

/// Smallest and largest reading at `time` over `materials` (a grid spanning the parameter limits).
ReadingRange reading_range(const TestSetup& setup, const std::vector<Material>& materials, double time);

/// The parameter solved for and where to look for it.
struct SearchRange {
  std::string parameter;   ///< yield_stress | viscosity | consistency | flow_index
  double lo = 0, hi = 0;   ///< [SI], lo < hi
  bool log_spaced = true;  ///< sample in log (ratio-scaled parameters with lo > 0) or linearly
  int samples = 17;        ///< sampling points before refinement (>= 3)
};

struct Interval {
  double lo = 0, hi = 0;
};

struct ParameterLimits {
  std::optional<Interval> possible;  ///< hull of the union over the combinations; nothing if no value fits any
  std::optional<Interval> assured;   ///< hull of the intersection; nothing if no value fits every combination
  bool possible_at_low_edge = false, possible_at_high_edge = false;  ///< touches the search range: widen it
  bool single_interval = true;  ///< every combination's in-limits set was one interval
  bool assured_single_interval = true;
  int solves = 0;
  std::string failure;  ///< non-empty when a forward solve failed (no limits then)
  bool ok() const { return failure.empty(); }
};

/// `others`: one material per combination of the other parameters (the solved parameter's value in them is
/// ignored). Reading limits [reading_low, reading_high] in m. Crossings are located to 1e-6 of the search
/// coordinate (log or linear). Throws std::invalid_argument for an empty `others`, a bad range or limits.
ParameterLimits solve_parameter_limits(const TestSetup& setup, double time, const std::vector<Material>& others,
                                       const SearchRange& search, double reading_low, double reading_high);

}  // namespace spreadfit::qc
