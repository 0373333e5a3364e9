#include "src/fit/synthetic_readings.hpp"

#include <random>

namespace spreadfit::fit {

FitSeries synthetic_readings(const TestSetup& setup, const Material& material, const std::vector<double>& times,
                             double sigma, unsigned seed, double t0) {
  FitSeries s;
  s.setup = setup;
  s.times = times;
  std::vector<double> shifted;
  shifted.reserve(times.size());
  for (double t : times) shifted.push_back(t - t0);
  s.values = predict_readings(setup, material, shifted).readings;
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, 1.0);
  if (sigma > 0) {
    for (double& v : s.values) v += sigma * noise(rng);
    s.sigma = sigma;
  }
  return s;
}

}  // namespace spreadfit::fit
