// Planning tests from the Fisher information (src/fit/test_design.hpp): its expected intervals must match the
// spread of real refits (Cramer-Rao; checked by Monte Carlo on one candidate) and rank designs sensibly.
#include <doctest/doctest.h>

#include <cmath>
#include <vector>

#include "src/fit/fit_law.hpp"
#include "src/fit/test_design.hpp"
#include "fit_test_support.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

TEST_CASE("the Fisher-information interval of the yield stress matches the spread of refits") {
  // Cramer-Rao: for a well-determined parameter the maximum-likelihood estimates scatter with the covariance
  // F^-1. Twenty noisy refits (fixed seeds) of a Bingham plate test: the log-width of the empirical 95% range
  // (2 x 1.96 x the sample standard deviation of ln tau) within a factor 1.6 of the planned one.
  const Material truth{20, 5.0, 1.0};
  std::vector<double> times;
  for (double t = 4; t <= 120; t += 4) times.push_back(t);
  const DesignEstimate plan = expected_intervals(plate_setup(), Law::Bingham, truth, times, 5e-4);
  REQUIRE(plan.ok);
  const double planned = std::log(plan.interval_ratio[0]);
  std::vector<double> logs;
  for (unsigned seed = 300; seed < 320; ++seed) {
    const FitResult r = fit_law({synthetic(plate_setup(), truth, 5e-4, seed, 0.0, 4.0, 120.0)}, Law::Bingham);
    if (r.converged()) logs.push_back(std::log(r.material.yield_stress));
  }
  REQUIRE(logs.size() >= 18);
  double mean = 0, var = 0;
  for (double v : logs) mean += v / double(logs.size());
  for (double v : logs) var += (v - mean) * (v - mean) / double(logs.size() - 1);
  const double empirical = 2 * 1.96 * std::sqrt(var);
  INFO("planned log-width " << planned << ", empirical " << empirical);
  CHECK(empirical / planned > 1 / 1.6);
  CHECK(empirical / planned < 1.6);
}

TEST_CASE("a longer plate test pins the yield stress down better than a short one") {
  // Common practice, no source: the yield stress shows in the approach to arrest, so readings must continue
  // until the sample (nearly) stops.
  const Material truth{20, 5.0, 1.0};
  std::vector<double> short_times, long_times;
  for (double t = 2; t <= 20; t += 2) short_times.push_back(t);
  for (double t = 2; t <= 180; t += 2) long_times.push_back(t);
  const DesignEstimate a = expected_intervals(plate_setup(), Law::Bingham, truth, short_times, 5e-4);
  const DesignEstimate b = expected_intervals(plate_setup(), Law::Bingham, truth, long_times, 5e-4);
  REQUIRE(a.ok);
  REQUIRE(b.ok);
  CHECK(b.interval_ratio[0] < a.interval_ratio[0]);
}
