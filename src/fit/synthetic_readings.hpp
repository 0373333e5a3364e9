// Synthetic readings: the forward model's readings of a known material plus seeded Gaussian noise. Used to check a
// plan against refits (design_check.hpp) and by the fit tests; the noise stands for the reading resolution.
#pragma once

#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

/// Readings at `times` [s] of a sample released at t0 [s] (the model is evaluated at t - t0), each plus an
/// independent N(0, sigma^2) draw [m] from std::mt19937(seed) in time order; sigma = 0 gives the exact readings and
/// leaves FitSeries::sigma unset. A failed forward solve leaves `values` as the solver returned them (check
/// `values.size()`); the caller decides.
FitSeries synthetic_readings(const TestSetup& setup, const Material& material, const std::vector<double>& times,
                             double sigma, unsigned seed, double t0 = 0.0);

}  // namespace spreadfit::fit
