// Planning a test: the expected 95% interval of each parameter for a candidate test (rig, fill, duration,
// reading interval, reading uncertainty), from the Fisher information of the forward model's sensitivities at a
// guessed material: F = J^T J / sigma^2 with J = d reading / d (log parameters, release time), covariance F^-1
// (the Cramer-Rao bound, which the fit's own intervals approach for well-determined parameters).
#pragma once

#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit {

struct DesignEstimate {
  std::vector<std::string> names;       ///< material parameters (log-space in the information matrix)
  std::vector<double> interval_ratio;   ///< expected upper/lower of the 95% interval; infinity if undetermined
  int solves = 0;
  bool ok = true;
};

/// `times` are the reading times after the release [s]; sigma the reading standard uncertainty [m]. The release
/// time is included as a nuisance parameter when fit_time_origin is true.
DesignEstimate expected_intervals(const TestSetup& setup, Law law, const Material& guess,
                                  const std::vector<double>& times, double sigma, bool fit_time_origin = true);

}  // namespace spreadfit
