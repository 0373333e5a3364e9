// Cylinder slump: Pashias et al. (1996, J. Rheol. 40) in the slump regime, Roussel & Coussot (2005, J. Rheol. 49) in
// the spread regime, the regime switch, and the validity warnings.
#include <doctest/doctest.h>

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <string>

#include "models/closed_forms.hpp"
#include "models/slump.hpp"

using namespace spreadfit;
using std::numbers::pi;

namespace {

constexpr double density = 1100.0;  // a thick sauce [kg/m^3]
constexpr double g = standard_gravity;

// The common bench cylinder: 100 mm high, 100 mm across (H0 = D).
SlumpRig square_cylinder() { return SlumpRig{0.05, 0.1}; }

Material bingham(double tau_y) { return Material{tau_y, 5.0, 1.0}; }

// Yield stress giving the dimensionless yield stress tau' = tau_y / (rho g H0) on a rig.
double yield_for(double tau_prime, const SlumpRig& rig) { return tau_prime * density * g * rig.height; }

// Order in which the regimes follow one another as the yield stress rises on a H0 = D cylinder.
int regime_order(SlumpRegime r) {
  switch (r) {
    case SlumpRegime::Unbounded: return 0;
    case SlumpRegime::Spread: return 1;
    case SlumpRegime::Slump: return 2;
    case SlumpRegime::NoFlow: return 3;
  }
  return -1;
}

bool has_warning_with(const SlumpPrediction& p, const std::string& text) {
  for (const auto& w : p.warnings)
    if (w.find(text) != std::string::npos) return true;
  return false;
}

}  // namespace

TEST_CASE("slump: the slump regime follows Pashias et al. (1996)") {
  // s/H0 = 1 - 2 tau' (1 - ln(2 tau')) (Pashias, Boger, Summers & Glenister 1996, J. Rheol. 40), evaluated here from
  // the formula. tau' = 0.25 by hand: 1 - 0.5 (1 + ln 2) = 0.153426.
  const SlumpRig rig = square_cylinder();
  CHECK(1 - 0.5 * (1 + std::log(2.0)) == doctest::Approx(0.153426).epsilon(1e-5));
  for (double tau_prime : {0.08, 0.1, 0.2, 0.25, 0.3, 0.45}) {
    const auto p = predict_slump(rig, bingham(yield_for(tau_prime, rig)), density, g);
    const double expected = rig.height * (1 - 2 * tau_prime * (1 - std::log(2 * tau_prime)));
    INFO("tau' = " << tau_prime << ", slump " << p.slump << " m, expected " << expected << " m");
    CHECK(p.regime == SlumpRegime::Slump);
    CHECK(p.slump == doctest::Approx(expected).epsilon(1e-12));
    CHECK(p.dimensionless_yield_stress == doctest::Approx(tau_prime).epsilon(1e-14));
    CHECK(p.final_height == doctest::Approx(rig.height - expected).epsilon(1e-12));
    CHECK(p.warnings.empty());  // a H0 = D cylinder in the slump regime is inside every validity range
    // The closed form the model reuses agrees with the formula written out here.
    CHECK(closed_form::pashias_dimensionless_slump(tau_prime) == doctest::Approx(expected / rig.height).epsilon(1e-14));
  }
}

TEST_CASE("slump: no flow from tau' = 0.5, as Pashias et al. (1996) state") {
  // The base of the column yields when rho g H0 exceeds 2 tau_y (Pashias et al. 1996): no slump at tau' >= 0.5.
  const SlumpRig rig = square_cylinder();
  for (double tau_prime : {0.5, 0.7, 3.0}) {
    const auto p = predict_slump(rig, bingham(yield_for(tau_prime, rig)), density, g);
    INFO("tau' = " << tau_prime);
    CHECK(p.regime == SlumpRegime::NoFlow);
    CHECK(p.slump == 0.0);
    CHECK(p.final_height == rig.height);
  }
  // Just below 0.5 the slump is small and positive: s/H0 ~ (1 - 2 tau')^2 / 2 there (expanding the relation).
  const double eps = 1e-3;
  const auto p = predict_slump(rig, bingham(yield_for(0.5 - eps, rig)), density, g);
  CHECK(p.regime == SlumpRegime::Slump);
  CHECK(p.slump / rig.height == doctest::Approx(2 * eps * eps).epsilon(2e-3));
}

TEST_CASE("slump: the spread regime matches Roussel & Coussot (2005)") {
  // Final radius R = (225 rho g V^2 / (128 pi^2 tau_y))^(1/5) and centre height sqrt(2 tau_y R / (rho g)) of the
  // plastic profile h = sqrt(2 tau_y (R - r) / (rho g)) (Roussel & Coussot 2005, J. Rheol. 49), written out here.
  const SlumpRig rig = square_cylinder();
  const double V = pi * rig.radius * rig.radius * rig.height;
  for (double tau_y : {3.0, 10.0, 30.0}) {
    const auto p = predict_slump(rig, bingham(tau_y), density, g);
    const double R = std::pow(225 * density * g * V * V / (128 * pi * pi * tau_y), 0.2);
    const double h0 = std::sqrt(2 * tau_y * R / (density * g));
    INFO("tau_y = " << tau_y << " Pa, tau' = " << p.dimensionless_yield_stress);
    CHECK(p.regime == SlumpRegime::Spread);
    CHECK(p.final_radius == doctest::Approx(R).epsilon(1e-12));
    CHECK(p.final_height == doctest::Approx(h0).epsilon(1e-12));
    CHECK(p.slump == doctest::Approx(rig.height - h0).epsilon(1e-12));
    // The profile holds the sample's volume: integral_0^R 2 pi r h(r) dr = V.
    const double profile_volume = boost::math::quadrature::gauss_kronrod<double, 31>::integrate(
        [&](double r) { return 2 * pi * r * std::sqrt(2 * tau_y * (R - r) / (density * g)); }, 0.0, R, 15, 1e-13);
    CHECK(profile_volume == doctest::Approx(V).epsilon(1e-9));
  }
}

TEST_CASE("slump: the slump falls continuously and monotonically with the yield stress across the regime switch") {
  const SlumpRig rig = square_cylinder();
  // Sweep tau' over four decades: the slump never rises, and the regimes come in order spread -> slump -> no flow.
  double previous_slump = rig.height;
  SlumpRegime previous_regime = SlumpRegime::Spread;
  double switch_low = 0, switch_high = 0;
  for (double lt = -4; lt <= 0; lt += 0.01) {
    const double tau_prime = std::pow(10.0, lt);
    const auto p = predict_slump(rig, bingham(yield_for(tau_prime, rig)), density, g);
    INFO("tau' = " << tau_prime << ", regime " << slump_regime_name(p.regime) << ", slump " << p.slump);
    CHECK(p.slump <= previous_slump);
    CHECK(regime_order(p.regime) >= regime_order(previous_regime));
    if (previous_regime == SlumpRegime::Spread && p.regime == SlumpRegime::Slump) {
      switch_low = std::pow(10.0, lt - 0.01);
      switch_high = tau_prime;
    }
    previous_slump = p.slump;
    previous_regime = p.regime;
  }
  REQUIRE(switch_high > 0);
  // Bisect to the switch and measure the jump across it (the model takes the larger final height, so none is
  // expected beyond rounding).
  for (int i = 0; i < 60; ++i) {
    const double mid = std::sqrt(switch_low * switch_high);
    const auto p = predict_slump(rig, bingham(yield_for(mid, rig)), density, g);
    (p.regime == SlumpRegime::Spread ? switch_low : switch_high) = mid;
  }
  const auto below = predict_slump(rig, bingham(yield_for(switch_low, rig)), density, g);
  const auto above = predict_slump(rig, bingham(yield_for(switch_high, rig)), density, g);
  const double jump = std::abs(below.slump - above.slump) / rig.height;
  MESSAGE("regime switch at tau' = " << switch_high << ", slump jump " << jump << " H0");
  CHECK(below.regime == SlumpRegime::Spread);
  CHECK(above.regime == SlumpRegime::Slump);
  CHECK(jump < 1e-9);
}

TEST_CASE("slump: warnings for a cylinder far from H0 = D") {
  SUBCASE("tall") {
    const SlumpRig tall{0.02, 0.12};  // 3x its diameter
    const auto p = predict_slump(tall, bingham(yield_for(0.2, tall)), density, g);
    REQUIRE(p.regime == SlumpRegime::Slump);
    INFO("warnings: " << p.warnings.size());
    CHECK(has_warning_with(
        p, "cylinder height 3.0x its diameter; the slump relation of Pashias et al. (1996) assumes about 1x"));
  }
  SUBCASE("squat") {
    const SlumpRig squat{0.1, 0.05};  // a quarter of its diameter
    const auto p = predict_slump(squat, bingham(yield_for(0.6, squat)), density, g);
    REQUIRE(p.regime == SlumpRegime::NoFlow);
    CHECK(has_warning_with(p, "cylinder height 0.25x its diameter"));
  }
  SUBCASE("within the band: no aspect warning") {
    const SlumpRig near{0.05, 0.12};  // 1.2x
    const auto p = predict_slump(near, bingham(yield_for(0.2, near)), density, g);
    CHECK_FALSE(has_warning_with(p, "its diameter"));
  }
}

TEST_CASE("slump: a thin final layer is flagged for surface tension") {
  // Capillary length sqrt(gamma / (rho g)) with the assumed gamma = 0.072 N/m: 2.6 mm at 1100 kg/m^3.
  const SlumpRig rig = square_cylinder();
  const auto thin = predict_slump(rig, bingham(0.5), density, g);
  REQUIRE(thin.regime == SlumpRegime::Spread);
  INFO("final height " << thin.final_height);
  CHECK(thin.final_height < 3 * std::sqrt(0.072 / (density * g)));
  CHECK(has_warning_with(thin, "capillary lengths"));
  const auto thick = predict_slump(rig, bingham(30.0), density, g);
  CHECK_FALSE(has_warning_with(thick, "capillary lengths"));
  // Zero surface tension assumed: no capillary warning.
  SlumpOptions dry;
  dry.surface_tension = 0;
  CHECK_FALSE(has_warning_with(predict_slump(rig, bingham(0.5), density, g, dry), "capillary lengths"));
}

TEST_CASE("slump: a material without yield stress slumps without bound") {
  const SlumpRig rig = square_cylinder();
  const auto p = predict_slump(rig, Material{0.0, 2.0, 0.7}, density, g);
  CHECK(p.regime == SlumpRegime::Unbounded);
  CHECK(p.slump == rig.height);
  CHECK(has_warning_with(p, "a slump test cannot measure a material without yield stress"));
  CHECK(slump_regime_name(p.regime) == "unbounded");
  CHECK(slump_regime_name(SlumpRegime::NoFlow) == "no-flow");
  CHECK(slump_regime_name(SlumpRegime::Slump) == "slump");
  CHECK(slump_regime_name(SlumpRegime::Spread) == "spread");
}

TEST_CASE("slump: invalid inputs throw std::invalid_argument naming the field") {
  auto throws_naming = [](auto&& call, const std::string& field) {
    try {
      call();
    } catch (const std::invalid_argument& e) {
      INFO("message: " << e.what());
      CHECK(std::string(e.what()).find(field) == 0);
      return;
    }
    FAIL("no std::invalid_argument for " << field);
  };
  const Material m = bingham(50.0);
  throws_naming([&] { predict_slump(SlumpRig{-0.05, 0.1}, m, density, g); }, "radius");
  throws_naming([&] { predict_slump(SlumpRig{0.05, 0.0}, m, density, g); }, "height");
  throws_naming([&] { predict_slump(SlumpRig{0.05, NAN}, m, density, g); }, "height");
  throws_naming([&] { predict_slump(square_cylinder(), m, -1000.0, g); }, "density");
  throws_naming([&] { predict_slump(square_cylinder(), m, density, 0.0); }, "gravity");
  throws_naming([&] { predict_slump(square_cylinder(), Material{-5.0, 1.0, 1.0}, density, g); }, "yield_stress");
  SlumpOptions bad;
  bad.aspect_band = 0.5;
  throws_naming([&] { predict_slump(square_cylinder(), m, density, g, bad); }, "aspect_band");
}
