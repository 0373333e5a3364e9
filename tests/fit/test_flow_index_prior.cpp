// Product knowledge on the flow index (src/fit/flow_index_prior.hpp): the empirical-Bayes prior learned from a
// product's earlier batches, its effect on a new batch's intervals, and the flag on a batch that contradicts it.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <random>

#include "fit_test_support.hpp"
#include "src/fit/fit_law.hpp"
#include "src/fit/flow_index_prior.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

TEST_CASE("the learned prior follows DerSimonian & Laird's random-effects estimates") {
  // Five batches, n = 0.30, 0.40, 0.50, 0.35, 0.45, each with standard error 0.05 (95% interval +/- 1.96 se).
  // Hand-computed from DerSimonian & Laird (1986), eq. 3-4: fixed-effect mean 0.40, Q = 10, sum w = 2000,
  // sum w^2 = 800000, tau^2 = (10 - 4) / (2000 - 400) = 0.00375; random-effects weights 1 / 0.00625 each, mean
  // 0.40, predictive spread sqrt(0.00375 + 0.00625 / 5) = sqrt(0.005) = 0.070711.
  std::vector<fit::BatchFlowIndex> batches;
  for (double n : {0.30, 0.40, 0.50, 0.35, 0.45})
    batches.push_back({n, n - 1.959964 * 0.05, n + 1.959964 * 0.05, true});
  const auto prior = fit::learn_flow_index_prior(batches);
  REQUIRE(prior);
  CHECK(prior->typical == doctest::Approx(0.40).epsilon(1e-9));
  CHECK(prior->spread == doctest::Approx(std::sqrt(0.005)).epsilon(1e-6));

  SUBCASE("identical batches: no between-batch variance, the spread floored") {
    // Q = 0 gives tau^2 = 0; var(mean) = 0.05^2 / 5 = 0.0005, sd 0.022 > the 0.02 floor.
    for (auto& b : batches) b = {0.4, 0.4 - 1.959964 * 0.05, 0.4 + 1.959964 * 0.05, true};
    const auto p = learn_flow_index_prior(batches);
    REQUIRE(p);
    CHECK(p->spread == doctest::Approx(std::sqrt(0.0005)).epsilon(1e-6));
    for (auto& b : batches) b = {0.4, 0.39, 0.41, true};
    CHECK(learn_flow_index_prior(batches)->spread == fit::min_learned_spread);
  }
  SUBCASE("batches whose readings left n open do not count; too few give no prior and say why") {
    batches[0].determined = false;
    std::string why;
    CHECK_FALSE(learn_flow_index_prior(batches, &why));
    CHECK(why.find("4 earlier batches") != std::string::npos);
    CHECK(why.find("5 are needed") != std::string::npos);
  }
}

TEST_CASE("montecarlo: a prior learned from a product's history narrows a new batch's yield stress and flags a "
          "changed formulation") {
  // One product, a soft lotion of flow index 0.35 (batch-to-batch: yield stress 4-6 Pa, consistency 3-5 Pa.s^n),
  // tested on a plate (3 cm ring, 60 mL) read every 5 s to 60 s with 0.5 mm uncertainty: a short test that leaves
  // n, the consistency and the yield stress poorly separated. Six earlier batches on a longer plate test (150 mL,
  // every 2 s to 120 s) determine n; their fits teach the prior. (Stiffer pastes, 25-35 Pa, leave n open even on
  // that test: they stop before the flow has shown its shear thinning.)
  std::mt19937 rng(4242u);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  auto batch = [&](double n) { return Material{4.0 + 2.0 * u(rng), 3.0 + 2.0 * u(rng), n}; };
  std::vector<double> long_times, short_times;
  for (double t = 2.0; t <= 120.0 + 1e-9; t += 2.0) long_times.push_back(t);
  for (double t = 5.0; t <= 60.0 + 1e-9; t += 5.0) short_times.push_back(t);
  TestSetup plate;
  plate.rig = PlateRig{0.03, 6e-5};
  plate.density = 1050;
  plate.reading = Reading::Diameter;

  std::vector<fit::BatchFlowIndex> history;
  for (int k = 0; k < 6; ++k) {
    const fit::FitResult r =
        fit::fit_law({fit::synthetic_readings(plate_setup(), batch(0.35), long_times, 5e-4, 100u + unsigned(k), 0.3)},
                Law::HerschelBulkley);
    REQUIRE(r.converged());
    const fit::ParameterEstimate& n = estimate(r, "flow_index");
    std::printf("history batch %d: n %.3f [%.3f, %.3f]%s%s\n", k, n.value, n.lower, n.upper, n.lower_open ? " open below" : "", n.upper_open ? " open above" : "");
    history.push_back({n.value, n.lower, n.upper, n.identifiable && !n.lower_open && !n.upper_open});
  }
  std::string why;
  const auto prior = fit::learn_flow_index_prior(history, &why);
  INFO(why);
  REQUIRE(prior);
  std::printf("prior learned from 6 plate batches: n %.3f +/- %.3f\n", prior->typical, prior->spread);
  CHECK(std::abs(prior->typical - 0.35) < 2.0 * prior->spread);

  const int trials = 12;
  int covered = 0, narrower = 0, flagged_same = 0;
  std::vector<double> ratios;
  for (int k = 0; k < trials; ++k) {
    const Material truth = batch(0.35);
    const std::vector<fit::FitSeries> s = {fit::synthetic_readings(plate, truth, short_times, 5e-4, 500u + unsigned(k), 0.3)};
    const fit::FitResult without = fit_law(s, Law::HerschelBulkley);
    REQUIRE(without.converged());
    const fit::FitResult with = fit_with_prior(s, without, {}, *prior);
    REQUIRE(with.converged());
    if (std::find(with.quality.begin(), with.quality.end(), fit::FitQuality::PriorConflict) != with.quality.end())
      ++flagged_same;
    const fit::ParameterEstimate& a = estimate(without, "yield_stress");
    const fit::ParameterEstimate& b = estimate(with, "yield_stress");
    covered += b.lower <= truth.yield_stress && truth.yield_stress <= b.upper;
    const double wa = a.upper - a.lower, wb = b.upper - b.lower;
    ratios.push_back(wb / wa);
    narrower += wb < wa;
  }
  std::sort(ratios.begin(), ratios.end());
  std::printf("with the prior: yield stress held in %d of %d, narrower in %d, median width ratio %.2f, %d flagged\n",
              covered, trials, narrower, ratios[ratios.size() / 2], flagged_same);
  CHECK(double(covered) / trials >= 0.9);
  CHECK(ratios[ratios.size() / 2] < 0.9);
  CHECK(flagged_same <= 1);

  // A changed formulation: n 0.6 instead of 0.35, on a channel read every 2 s to 120 s (which determines n for
  // this soft product): flagged, and the prior is not applied, so the result is the readings' own.
  std::vector<double> channel_times;
  for (double t = 2.0; t <= 120.0 + 1e-9; t += 2.0) channel_times.push_back(t);
  int flagged = 0;
  for (int k = 0; k < 4; ++k) {
    const std::vector<fit::FitSeries> s = {
        fit::synthetic_readings(channel_setup(), batch(0.6), channel_times, 5e-4, 900u + unsigned(k), 0.3)};
    const fit::FitResult without = fit_law(s, Law::HerschelBulkley);
    REQUIRE(without.converged());
    const fit::FitResult with = fit_with_prior(s, without, {}, *prior);
    const bool flag =
        std::find(with.quality.begin(), with.quality.end(), fit::FitQuality::PriorConflict) != with.quality.end();
    flagged += flag;
    if (flag) {
      CHECK_FALSE(with.prior);
      CHECK(estimate(with, "flow_index").value == estimate(without, "flow_index").value);
    }
  }
  // The test's power is that of one channel test's n (a readings-alone interval that still reaches back towards
  // 0.35 cannot contradict the prior): 3 of 4 measured on a 90 s test, more on this 120 s one.
  std::printf("changed formulation (n 0.35 -> 0.6): %d of 4 flagged\n", flagged);
  CHECK(flagged >= 3);
}
