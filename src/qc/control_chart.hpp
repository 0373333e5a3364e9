// Individuals control chart of one parameter over batches (Shewhart individuals chart with limits from the
// average moving range): centre = mean, limits = mean +/- 2.66 MR-bar (2.66 = 3 / d2, d2 = 1.128 for moving ranges
// of two; common practice, no source). Flags points beyond the limits and runs of 8 in a row on one side of the
// centre line (a common run rule, no source).
#pragma once

#include <string>
#include <vector>

namespace spreadfit {

struct ControlChart {
  std::string parameter;             ///< e.g. yield_stress
  std::string unit;                  ///< e.g. Pa
  std::vector<std::string> labels;   ///< batch / sample ids, in time order
  std::vector<double> values;
  double centre = 0, lower = 0, upper = 0;  ///< centre line and control limits (lower may be negative)
  double mean_moving_range = 0;
  std::vector<bool> beyond_limits;   ///< per point
  std::vector<bool> in_run;          ///< per point: part of a run of `run_length` on one side
  int run_length = 8;
};

/// Needs at least two values; throws std::invalid_argument otherwise.
ControlChart individuals_chart(std::string parameter, std::string unit, std::vector<std::string> labels,
                               std::vector<double> values, int run_length = 8);

}  // namespace spreadfit
