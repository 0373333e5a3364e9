// Synthetic readings for the fit tests: the verified forward model (tests/models) plus seeded Gaussian noise.
#pragma once

#include <random>
#include <vector>

#include "models/forward.hpp"
#include "src/fit/fit_types.hpp"
#include "src/fit/synthetic_readings.hpp"

namespace spreadfit::testing {

inline TestSetup channel_setup() {
  TestSetup s;
  s.rig = ChannelRig{0.05, 0.05, 1e-4, true};
  s.density = 1100;
  s.reading = Reading::Front;
  return s;
}

inline TestSetup plate_setup() {
  TestSetup s;
  s.rig = PlateRig{0.03, 1.5e-4};
  s.density = 1050;
  s.reading = Reading::Diameter;
  return s;
}

inline TestSetup squeeze_setup() {
  TestSetup s;
  s.rig = SqueezeRig{2e-6, 4.903325, 8e-3};  // 2 mL under 500 g, from an 8 mm gap
  s.density = 1000;
  s.reading = Reading::Diameter;
  return s;
}

/// Readings every `step` seconds up to `end`, released at t0, with noise of standard deviation sigma
/// (src/fit/synthetic_readings.hpp).
inline fit::FitSeries synthetic(const TestSetup& setup, const Material& m, double sigma, unsigned seed, double t0 = 0.3,
                           double step = 2.0, double end = 60.0) {
  std::vector<double> times;
  for (double t = step; t <= end + 1e-9; t += step) times.push_back(t);
  return fit::synthetic_readings(setup, m, times, sigma, seed, t0);
}

inline const fit::ParameterEstimate& estimate(const fit::FitResult& r, const std::string& name) {
  for (const auto& p : r.parameters)
    if (p.name == name) return p;
  throw std::runtime_error("no parameter " + name);
}

}  // namespace spreadfit::testing
