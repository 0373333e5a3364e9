// Checking a plan against refits: the Fisher-information interval of each parameter (expected_intervals.hpp) is the
// Cramer-Rao bound of the estimates' spread, which maximum-likelihood estimates approach when the parameter is well
// determined. Simulate noisy reading sets of the planned test for a known material (synthetic_readings.hpp), refit
// each with fit_law, and compare the planned 95% ratio with the empirical one, exp(2 x 1.96 x sd(ln estimate)).
#pragma once

#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

struct DesignCheck {
  std::vector<std::string> names;       ///< material parameters, as in DesignEstimate
  std::vector<double> planned_ratio;    ///< expected upper/lower of the 95% interval (empty if the plan failed)
  std::vector<double> empirical_ratio;  ///< exp(2 x 1.96 x sample sd of ln estimate) over the converged refits;
                                        ///< NaN with fewer than 2 converged
  int replicates = 0;                   ///< reading sets simulated
  int converged = 0;                    ///< refits that converged (only these enter empirical_ratio)
  std::string message;                  ///< why the plan's forward solves failed (empty when they did not)
};

/// `replicates` noisy reading sets of the test (setup, times [s], Gaussian noise of standard deviation sigma [m],
/// released at 0; seeds first_seed, first_seed + 1, ...), each refitted with `law` under `options` (the release
/// time is a nuisance parameter when options.fit_time_origin, as in the plan). Deterministic for fixed seeds.
/// Throws std::invalid_argument for replicates < 1 or sigma <= 0.
DesignCheck check_design(const TestSetup& setup, Law law, const Material& truth, const std::vector<double>& times,
                         double sigma, int replicates, unsigned first_seed = 1000, const FitOptions& options = {});

}  // namespace spreadfit::fit
