// Moving specs between parameters and readings (src/qc/spec_translation.hpp): reading limits solved back to
// yield-stress limits against the Pashias et al. (1996) slump relation, and the forward and reverse directions
// against each other on a channel. Rigs and materials are invented for the checks; the values checked come from
// the published relation or from the forward model itself.
#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>
#include <vector>

#include "src/qc/spec_translation.hpp"
#include "tests/fit/fit_test_support.hpp"

using namespace spreadfit;
using spreadfit::testing::channel_setup;  // the fit tests' channel: 5 cm wide, 5 cm block, 100 mL

namespace {

TestSetup slump_setup() {
  TestSetup s;
  s.rig = SlumpRig{0.05, 0.1};
  s.density = 1100;
  s.reading = Reading::Slump;
  return s;
}

// Slump of a cylinder as high as wide (Pashias, Boger, Summers & Glenister 1996, J. Rheol. 40, eq. for the
// cylinder): s/H0 = 1 - 2 tau'(1 - ln 2 tau'), tau' = tau_y / (rho g H0).
double pashias_slump(double tau, double rho, double height) {
  const double t = tau / (rho * 9.80665 * height);
  return height * (1 - 2 * t * (1 - std::log(2 * t)));
}

}  // namespace

TEST_CASE("slump limits solve back to the yield stresses that give them by Pashias et al. (1996)") {
  // The slump falls as the yield stress rises: slumps between s(500 Pa) and s(100 Pa) mean 100 to 500 Pa, with no
  // other parameter involved, so the possible and assured ranges coincide.
  const double low = pashias_slump(500, 1100, 0.1), high = pashias_slump(100, 1100, 0.1);
  const Material others{0, 5.0, 1.0};
  const qc::ParameterLimits limits =
      qc::solve_parameter_limits(slump_setup(), 300, {others}, {"yield_stress", 10, 1000, true, 17}, low, high);
  REQUIRE(limits.ok());
  REQUIRE(limits.possible);
  REQUIRE(limits.assured);
  CHECK(limits.possible->lo == doctest::Approx(100).epsilon(1e-4));
  CHECK(limits.possible->hi == doctest::Approx(500).epsilon(1e-4));
  CHECK(limits.assured->lo == doctest::Approx(100).epsilon(1e-4));
  CHECK(limits.assured->hi == doctest::Approx(500).epsilon(1e-4));
  CHECK(limits.single_interval);
  CHECK_FALSE(limits.possible_at_low_edge);
  CHECK_FALSE(limits.possible_at_high_edge);
}

TEST_CASE("reading limits out of reach of the search range give no possible value") {
  const Material others{0, 5.0, 1.0};
  const double unreachable = pashias_slump(5, 1100, 0.1);  // needs a yield stress below the search range
  const qc::ParameterLimits limits =
      qc::solve_parameter_limits(slump_setup(), 300, {others}, {"yield_stress", 100, 1000, true, 9}, unreachable, 0.1);
  REQUIRE(limits.ok());
  CHECK_FALSE(limits.possible);
  CHECK_FALSE(limits.assured);
}

TEST_CASE("channel: yield-stress limits become reading limits and solve back to the same limits") {
  // Forward, yield stress 20-35 Pa with the consistency anywhere in 2-12 Pa.s (Bingham): the reading limits are
  // the extremes over the grid. Reverse: the front at 30 s falls as either parameter rises (a stiffer material
  // flows less far), so the yield stresses assured to read within those limits for every consistency are exactly
  // 20-35 Pa, and the possible ones reach beyond them (a low yield stress with a high consistency reads inside).
  const TestSetup setup = channel_setup();
  std::vector<Material> grid, consistencies;
  for (double k : {2.0, 12.0}) {
    consistencies.push_back({0, k, 1.0});
    for (double tau : {20.0, 35.0}) grid.push_back({tau, k, 1.0});
  }
  const qc::ReadingRange range = qc::reading_range(setup, grid, 30);
  REQUIRE(range.ok());
  CHECK(range.low < range.high);
  const qc::ParameterLimits limits =
      qc::solve_parameter_limits(setup, 30, consistencies, {"yield_stress", 2, 200, true, 17}, range.low, range.high);
  REQUIRE(limits.ok());
  REQUIRE(limits.assured);
  REQUIRE(limits.possible);
  CHECK(limits.assured->lo == doctest::Approx(20).epsilon(1e-3));
  CHECK(limits.assured->hi == doctest::Approx(35).epsilon(1e-3));
  CHECK(limits.possible->lo < 19);
  CHECK(limits.possible->hi > 36);
  SUBCASE("with the consistency fixed, possible and assured coincide") {
    const qc::ParameterLimits one =
        qc::solve_parameter_limits(setup, 30, {{0, 2.0, 1.0}}, {"yield_stress", 2, 200, true, 17},
                               *qc::reading_at(setup, {35, 2.0, 1.0}, 30), *qc::reading_at(setup, {20, 2.0, 1.0}, 30));
    REQUIRE(one.possible);
    CHECK(one.possible->lo == doctest::Approx(20).epsilon(1e-4));
    CHECK(one.possible->hi == doctest::Approx(35).epsilon(1e-4));
  }
}

TEST_CASE("bad search ranges and limits are refused") {
  const Material m{0, 5.0, 1.0};
  CHECK_THROWS_AS(qc::solve_parameter_limits(slump_setup(), 300, {}, {"yield_stress", 10, 1000, true, 9}, 0, 0.1),
                  std::invalid_argument);
  CHECK_THROWS_AS(qc::solve_parameter_limits(slump_setup(), 300, {m}, {"yield_stress", 0, 1000, true, 9}, 0, 0.1),
                  std::invalid_argument);
  CHECK_THROWS_AS(qc::solve_parameter_limits(slump_setup(), 300, {m}, {"yield_stress", 10, 1000, true, 9}, 0.1, 0.05),
                  std::invalid_argument);
}
