// Predicted readings of a fitted material with a 95% band that carries the fit's uncertainty: the fit's parameter
// vectors drawn from its likelihood (FitResult::draws, src/fit/likelihood_draws.hpp; for an older result without
// them, draws from the log-space normal approximation), each run through the forward model; the band is the 2.5%
// and 97.5% quantiles at every time, widened to reach the prediction of every profile-walk point inside the 95%
// likelihood region (FitResult::ridge). Sampling rather than linear propagation because readings are strongly
// nonlinear in the parameters near arrest. Measured (tests/fit/test_prediction_band.cpp): from a plate test of a
// shear-thinning paste, the channel band at 30 s held the truth in 29 of 30 pastes at a median 14% of the reading.
#pragma once

#include <utility>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

struct PredictionBand {
  std::vector<double> times;            ///< [s] after the fitted release
  std::vector<double> reading;          ///< at the best fit [m]
  std::vector<double> lower, upper;     ///< 95% band [m]
  int samples = 0;                      ///< parameter draws that solved
  int outside_law = 0;                  ///< draws outside the law's range (e.g. a flow index above 2): left out
  int failed = 0;                       ///< draws whose forward solve failed: left out
  bool ok = true;
};

/// The central 95% range of a sample: its order statistics at 2.5% and 97.5% of the way from the smallest to the
/// largest, the index rounded outward (down at the low end, up at the high end), so that at least 95% of the
/// sample lies in the range (common practice, no source). The band and every text that quotes a range of draws
/// use it, so a header and the band it describes agree. `values` is taken by value and sorted; non-empty.
std::pair<double, double> central_95_range(std::vector<double> values);

/// The fit restricted to its material parameters: release times belong to the original test, so they are dropped
/// from `names`, `estimate` and `covariance` (the marginal covariance of the rest) before predicting another rig.
FitResult material_only(const FitResult& fit);

/// times are measured from the series' own clock; `series_index` picks which fitted release time applies (the
/// first one when the fit had fewer). samples = 0 gives the best-fit curve only. Fixed seed: reproducible output.
PredictionBand prediction_band(const FitResult& fit, const TestSetup& setup, const std::vector<double>& times,
                               std::size_t series_index = 0, int samples = 200, unsigned seed = 2024);

}  // namespace spreadfit::fit
