// Planning tests from the Fisher information (src/fit/expected_intervals.hpp): its expected intervals must match the
// spread of real refits (Cramer-Rao; checked by Monte Carlo through src/fit/design_check.hpp), rank designs
// sensibly for one guess and for a range of guesses, and agree with the plastic limit of the plate test.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <vector>

#include "fit_test_support.hpp"
#include "src/fit/design_check.hpp"
#include "src/fit/fit_law.hpp"
#include "src/fit/expected_intervals.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

namespace {

std::vector<double> every(double step, double end) {
  std::vector<double> t;
  for (double x = step; x <= end + 1e-9; x += step) t.push_back(x);
  return t;
}

}  // namespace

TEST_CASE("the Fisher-information interval of the yield stress matches the spread of refits") {
  // Cramer-Rao: for a well-determined parameter the maximum-likelihood estimates scatter with the covariance
  // F^-1. Twenty noisy refits (fixed seeds) of a Bingham plate test: the log-width of the empirical 95% range
  // (2 x 1.96 x the sample standard deviation of ln tau) within a factor 1.6 of the planned one.
  const Material truth{20, 5.0, 1.0};
  const fit::DesignCheck check = fit::check_design(plate_setup(), Law::Bingham, truth, every(4, 120), 5e-4, 20, 300);
  REQUIRE(check.planned_ratio.size() == 2);
  REQUIRE(check.converged >= 18);
  for (std::size_t i = 0; i < check.names.size(); ++i)
    MESSAGE(check.names[i] << ": planned " << check.planned_ratio[i] << "x, refits " << check.empirical_ratio[i]
                           << "x (" << check.converged << "/" << check.replicates << " converged)");
  const double planned = std::log(check.planned_ratio[0]);
  const double empirical = std::log(check.empirical_ratio[0]);
  INFO("planned log-width " << planned << ", empirical " << empirical);
  CHECK(check.names[0] == "yield_stress");
  CHECK(empirical / planned > 1 / 1.6);
  CHECK(empirical / planned < 1.6);
}

TEST_CASE("a longer plate test pins the yield stress down better than a short one") {
  // Common practice, no source: the yield stress shows in the approach to arrest, so readings must continue
  // until the sample (nearly) stops.
  const Material truth{20, 5.0, 1.0};
  const fit::DesignEstimate a = fit::expected_intervals(plate_setup(), Law::Bingham, truth, every(2, 20), 5e-4);
  const fit::DesignEstimate b = fit::expected_intervals(plate_setup(), Law::Bingham, truth, every(2, 180), 5e-4);
  REQUIRE(a.ok);
  REQUIRE(b.ok);
  CHECK(b.interval_ratio[0] < a.interval_ratio[0]);
}

TEST_CASE("over a range of yield stresses, the longer plate test wins on the worst case") {
  // The approach to arrest is slow (perturbations decay like t^-n; Matson & Hogg 2007, J. Non-Newt. Fluid Mech.
  // 142), and the arrested spread is what fixes the yield stress (Roussel & Coussot 2005, J. Rheol. 49), so a
  // 20 s test leaves the lower yield stresses of the range unresolved where a 180 s test does not.
  std::vector<Material> guesses;
  for (double tau : {5.0, 10.0, 20.0, 40.0}) guesses.push_back({tau, 5.0, 1.0});
  const fit::WorstCaseEstimate short_test = fit::worst_case_intervals(plate_setup(), Law::Bingham, guesses, every(2, 20), 5e-4);
  const fit::WorstCaseEstimate long_test = fit::worst_case_intervals(plate_setup(), Law::Bingham, guesses, every(2, 180), 5e-4);
  REQUIRE(short_test.ok());
  REQUIRE(long_test.ok());
  INFO("worst yield-stress ratio: 20 s " << short_test.worst_ratio[0] << " (guess " << short_test.worst_guess[0]
                                         << "), 180 s " << long_test.worst_ratio[0] << " (guess "
                                         << long_test.worst_guess[0] << "); stopped " << short_test.stopped << " vs "
                                         << long_test.stopped);
  CHECK(long_test.worst_ratio[0] < short_test.worst_ratio[0]);
  CHECK(long_test.score() < short_test.score());
  // More of the range has stopped by the end of the longer test.
  CHECK(long_test.stopped > short_test.stopped);
}

TEST_CASE("the worst case over a range is the largest single-guess ratio, and it names that guess") {
  // A property of the maximum (no source needed): every guess's ratio is at most the worst case, and the guess the
  // worst case names has exactly that ratio.
  std::vector<Material> guesses;
  for (double tau : {5.0, 20.0})
    for (double k : {2.0, 8.0}) guesses.push_back({tau, k, 0.6});
  const std::vector<double> times = every(5, 120);
  const fit::WorstCaseEstimate w = fit::worst_case_intervals(plate_setup(), Law::HerschelBulkley, guesses, times, 5e-4);
  REQUIRE(w.ok());
  REQUIRE(w.guesses.size() == guesses.size());
  for (std::size_t p = 0; p < w.names.size(); ++p) {
    for (std::size_t g = 0; g < guesses.size(); ++g) {
      // The same computation again for one guess: the range evaluation adds nothing of its own.
      const fit::DesignEstimate single = fit::expected_intervals(plate_setup(), Law::HerschelBulkley, guesses[g], times, 5e-4);
      REQUIRE(single.ok);
      CHECK(single.interval_ratio[p] == w.guesses[g].interval_ratio[p]);
      CHECK(single.interval_ratio[p] <= w.worst_ratio[p]);
    }
    CHECK(w.guesses[w.worst_guess[p]].interval_ratio[p] == w.worst_ratio[p]);
  }
}

TEST_CASE("a plate test that reaches arrest gives no wider a yield-stress interval than its final reading alone") {
  // Roussel & Coussot (2005), J. Rheol. 49, plastic limit of the axisymmetric spread: tau_y = 225 rho g V^2 /
  // (128 pi^2 R^5), so an arrested diameter D carries the yield stress with d ln D / d ln tau_y = -1/5 and no
  // other parameter: one reading of uncertainty sigma gives sd(ln tau_y) = 5 sigma / D. The information of the
  // whole curve adds to that of its last reading (the Schur complement is concave), so the planned interval can
  // be no wider than exp(2 x 1.96 x 5 sigma / D).
  const TestSetup setup = plate_setup();
  const auto& plate = std::get<PlateRig>(setup.rig);
  const double sigma = 5e-4;
  const double rho_g = setup.density * setup.gravity;
  for (double tau : {5.0, 10.0}) {
    const Material guess{tau, 1.0, 1.0};
    const fit::DesignEstimate e = fit::expected_intervals(setup, Law::Bingham, guess, every(10, 600), sigma);
    REQUIRE(e.ok);
    const double arrest_diameter =
        2 *
        std::pow(225 * rho_g * plate.volume * plate.volume / (128 * std::numbers::pi * std::numbers::pi * tau), 0.2);
    // The model's plastic limit is within 1% of the relation where the whole sample yields (tests/models,
    // test_thin_film.cpp), and the same 1% holds here: the final diameter is over three times the ring's.
    constexpr double arrest_tolerance = 0.01;
    // Finite differences (2% steps) and a front that still creeps by less than sigma: 5% on the log-width.
    constexpr double width_tolerance = 1.05;
    const double bound = std::exp(width_tolerance * 2 * 1.96 * 5 * sigma / arrest_diameter);
    INFO("tau_y " << tau << ": last reading " << e.readings.back() << " m, arrest diameter " << arrest_diameter
                  << " m; planned ratio " << e.interval_ratio[0] << ", final-reading bound " << bound);
    CHECK(e.stopped);
    CHECK(e.readings.back() == doctest::Approx(arrest_diameter).epsilon(arrest_tolerance));
    CHECK(e.interval_ratio[0] <= bound);
  }
}

TEST_CASE("a guess whose forward solve fails is reported, not thrown") {
  // Step bound (models/forward.hpp, ForwardOptions::max_steps: steps between two requested times, most of them
  // spent before the first reading): a thin, shear-thinning guess needs several times the steps of a viscous
  // Newtonian one; with the bound between the two, only the former fails, and the candidate is marked failed.
  const std::vector<double> times = every(10, 120);
  const std::vector<Material> guesses{{0, 100.0, 1.0}, {0, 0.01, 0.3}};
  const std::size_t cheap = predict_readings(plate_setup(), guesses[0], {times.front()}).steps;
  const std::size_t costly = predict_readings(plate_setup(), guesses[1], {times.front()}).steps;
  INFO("steps to the first reading: " << cheap << " and " << costly);
  REQUIRE(costly > 3 * cheap);
  ForwardOptions bounded;
  bounded.max_steps = 2 * cheap;
  const fit::WorstCaseEstimate w = fit::worst_case_intervals(plate_setup(), Law::PowerLaw, guesses, times, 5e-4, true, bounded);
  CHECK(w.failed == 1);
  CHECK(w.first_failure == 1);
  CHECK_FALSE(w.ok());
  CHECK_FALSE(std::isfinite(w.score()));
  CHECK_FALSE(w.guesses[1].message.empty());
  CHECK(w.guesses[0].ok);
}
