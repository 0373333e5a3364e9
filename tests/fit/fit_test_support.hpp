// Synthetic readings for the fit tests: the verified forward model (tests/models) plus seeded Gaussian noise.
#pragma once

#include <random>
#include <vector>

#include "models/forward.hpp"
#include "src/fit/fit_types.hpp"

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

/// Readings every `step` seconds up to `end`, released at t0, with noise of standard deviation sigma.
inline FitSeries synthetic(const TestSetup& setup, const Material& m, double sigma, unsigned seed, double t0 = 0.3,
                           double step = 2.0, double end = 60.0) {
  FitSeries s;
  s.setup = setup;
  for (double t = step; t <= end + 1e-9; t += step) s.times.push_back(t);
  std::vector<double> shifted;
  for (double t : s.times) shifted.push_back(t - t0);
  s.values = predict_readings(setup, m, shifted).readings;
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, 1.0);
  if (sigma > 0) {
    for (double& v : s.values) v += sigma * noise(rng);
    s.sigma = sigma;
  }
  return s;
}

inline const ParameterEstimate& estimate(const FitResult& r, const std::string& name) {
  for (const auto& p : r.parameters)
    if (p.name == name) return p;
  throw std::runtime_error("no parameter " + name);
}

}  // namespace spreadfit::testing
