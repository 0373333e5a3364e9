// Individuals control chart of one parameter over batches (Shewhart individuals chart with limits from the
// average moving range): centre = mean, limits = mean +/- 2.66 MR-bar (2.66 = 3 / d2, d2 = 1.128 for moving ranges
// of two; common practice, no source). Flags points beyond the limits and runs of 8 in a row on one side of the
// centre line (a common run rule, no source).
//
// On a log scale the same chart is computed on the logarithms of the values (centre = geometric mean, limits =
// centre x/÷ exp(2.66 MR-bar of the logarithms)), so the limits of a positive quantity stay positive; common
// practice for quantities that vary by factors, such as a viscosity (no source).
//
// Batches whose value cannot be charted (the fit failed, the law has no such parameter, or the readings left it
// undetermined) are kept as `left_out`, with their place in the batch order and the reason, so that a chart
// never drops a batch silently; they never enter the centre line or the limits.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace spreadfit::qc {

struct LeftOutBatch {
  std::string label;         ///< batch / sample id
  std::string reason;        ///< plain words, e.g. "power-law gives no yield_stress"
  std::size_t position = 0;  ///< place among all batches (charted and left out) in time order, from 0
};

struct ControlChart {
  std::string parameter;            ///< e.g. yield_stress
  std::string unit;                 ///< e.g. Pa
  std::vector<std::string> labels;  ///< charted batch / sample ids, in time order
  std::vector<double> values;
  double centre = 0, lower = 0,
         upper = 0;                 ///< centre line and control limits (lower may be negative on a linear scale)
  double mean_moving_range = 0;     ///< in the value's unit; on a log scale, of the natural logarithms
  std::vector<bool> beyond_limits;  ///< per point
  std::vector<bool> in_run;         ///< per point: part of a run of `run_length` on one side
  int run_length = 8;
  bool log_scale = false;                     ///< computed on the logarithms (and drawn on a log axis)
  std::string scale_reason;                   ///< why this scale, in plain words (set by the caller; may be empty)
  std::vector<LeftOutBatch> left_out;         ///< batches not charted, with their place in the order
  std::optional<double> spec_low, spec_high;  ///< the product's spec limits, drawn beside the control limits
  /// Place of charted point i among all batches (charted and left out), in time order.
  std::size_t position(std::size_t i) const;
  std::size_t batches() const { return values.size() + left_out.size(); }
};

/// Needs at least two values (all positive on a log scale); throws std::invalid_argument otherwise.
ControlChart individuals_chart(std::string parameter, std::string unit, std::vector<std::string> labels,
                               std::vector<double> values, int run_length = 8, bool log_scale = false);

/// Whether `parameter`'s chart belongs on a log scale, and why (or why not) in plain words in `why`:
/// viscosity and consistency always when every value is positive (they vary by factors and are fitted as their
/// logarithms); any other positive quantity when a linear lower control limit would fall to zero or below.
bool log_scale_suits(const std::string& parameter, const std::vector<double>& values, std::string& why);

}  // namespace spreadfit::qc
