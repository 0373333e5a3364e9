// Squeeze flow under a dead load: checks against the published limits (Stefan's law, Scott 1931, the perfectly
// plastic limit; as collected in Engmann, Servais & Burbidge 2005, J. Non-Newt. Fluid Mech. 132) and against a
// direct integration of the slit flux of models/rheology.hpp, which the scaled yield-stress form must reproduce.
#include <doctest/doctest.h>

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/tools/roots.hpp>
#include <cmath>
#include <cstdint>
#include <numbers>
#include <stdexcept>
#include <vector>

#include "models/closed_forms.hpp"
#include "models/rheology.hpp"
#include "models/squeeze_flow.hpp"

using namespace spreadfit;
using std::numbers::pi;

namespace {

// A bench squeeze of a thick paste: 2 mL between plates at 3 mm, 0.5 kg load (disc radius 14.6 mm, R/h ~ 5).
SqueezeRig bench_rig() { return SqueezeRig{2e-6, 5.0, 3e-3}; }

std::vector<double> bench_times() {  // a 120 s test read every 4 s
  std::vector<double> t;
  for (int i = 0; i <= 30; ++i) t.push_back(4.0 * i);
  return t;
}

double rel_diff(double a, double b) { return std::abs(a - b) / std::abs(b); }

// Direct (slow) evaluation of the load carried at gap h when the gap closes at rate v, from the definitions alone:
// at each r the pressure gradient G solves 2 film_flux(m, G, h/2) = r v / 2, and F = integral_0^R pi r^2 G dr.
double direct_load(const Material& m, double volume, double h, double v) {
  const double R = std::sqrt(volume / (pi * h));
  auto gradient_at = [&](double r) {
    const double target = r * v / 2;
    const double G_yield = 2 * m.yield_stress / h;  // film_flux is 0 up to here
    if (target <= 0) return G_yield;
    auto residual = [&](double G) { return 2 * film_flux(m, G, h / 2) - target; };
    double hi = std::max(G_yield, 1.0) * 2;
    while (residual(hi) < 0) hi *= 2;
    std::uintmax_t iterations = 200;
    const auto bracket = boost::math::tools::toms748_solve(residual, G_yield, hi,
                                                           boost::math::tools::eps_tolerance<double>(50), iterations);
    return 0.5 * (bracket.first + bracket.second);
  };
  auto integrand = [&](double r) { return pi * r * r * gradient_at(r); };
  return boost::math::quadrature::gauss_kronrod<double, 31>::integrate(integrand, 0.0, R, 12, 1e-11);
}

}  // namespace

TEST_CASE("squeeze: a Newtonian sample follows Stefan's law at constant volume") {
  // Stefan's law (Engmann et al. 2005, eq. for a Newtonian liquid, no slip): F = 3 pi mu R^4 (-dh/dt) / (2 h^3);
  // at constant volume 1/h^4 - 1/h0^4 = 8 pi F t / (3 mu V^2) (closed_form::stefan_gap). The brief asks for 0.1%;
  // the integrator reaches ~1e-9 at its default tolerance, so a much tighter bound is checked.
  constexpr double tolerance = 1e-6;
  const SqueezeRig rig = bench_rig();
  const Material paste{0.0, 1000.0, 1.0};
  const auto times = bench_times();
  const auto sol = solve_squeeze(rig, paste, times);
  REQUIRE(sol.ok());
  INFO("steps: " << sol.steps);
  REQUIRE(sol.gaps.size() == times.size());
  CHECK_FALSE(sol.arrested);
  CHECK(sol.arrest_gap == 0.0);
  double worst = 0;
  for (std::size_t i = 0; i < times.size(); ++i) {
    const double exact = closed_form::stefan_gap(paste.consistency, rig.force, rig.volume, rig.initial_gap, times[i]);
    worst = std::max(worst, rel_diff(sol.gaps[i], exact));
  }
  INFO("worst relative difference from Stefan: " << worst);
  CHECK(worst < tolerance);
  // The gap must have moved substantially for the comparison to mean something.
  CHECK(sol.gaps.back() < 0.5 * rig.initial_gap);

  // The rate itself, against Stefan's force law solved for -dh/dt (written out here, not through the library).
  const double h = 1.7e-3;
  const double R = std::sqrt(rig.volume / (pi * h));
  const double stefan_rate = 2 * rig.force * h * h * h / (3 * pi * paste.consistency * std::pow(R, 4));
  CHECK(rel_diff(squeeze_rate(rig, paste, h), stefan_rate) < 1e-12);
}

TEST_CASE("squeeze: a power-law sample follows Scott (1931) for several flow indices") {
  // Scott (1931), in the full-gap form of Engmann et al. (2005):
  // F = [2 pi K R^(n+3)/(n+3)] ((2n+1)/n)^n (-dh/dt)^n / h^(2n+1), integrated at constant volume
  // (closed_form::scott_gap).
  constexpr double tolerance = 1e-6;  // brief: 0.1%; the integrator does far better
  const SqueezeRig rig = bench_rig();
  const auto times = bench_times();
  for (double n : {0.3, 0.5, 0.8, 1.5}) {
    SUBCASE(("n = " + std::to_string(n)).c_str()) {
      const Material m{0.0, 200.0, n};
      const auto sol = solve_squeeze(rig, m, times);
      REQUIRE(sol.ok());
      double worst = 0;
      for (std::size_t i = 0; i < times.size(); ++i) {
        const double exact = closed_form::scott_gap(m.consistency, n, rig.force, rig.volume, rig.initial_gap, times[i]);
        worst = std::max(worst, rel_diff(sol.gaps[i], exact));
      }
      INFO("n = " << n << ", steps: " << sol.steps << ", worst relative difference from Scott: " << worst);
      CHECK(worst < tolerance);
      CHECK(sol.gaps.back() < 0.8 * rig.initial_gap);

      // Rate against Scott's force law solved for -dh/dt, written out here.
      const double h = 1.2e-3;
      const double R = std::sqrt(rig.volume / (pi * h));
      const double scott_rate =
          n / (2 * n + 1) *
          std::pow(rig.force * (n + 3) * std::pow(h, 2 * n + 1) / (2 * pi * m.consistency * std::pow(R, n + 3)), 1 / n);
      CHECK(rel_diff(squeeze_rate(rig, m, h), scott_rate) < 1e-12);
    }
  }
}

TEST_CASE("squeeze: the scaled slit flux is the film flux on the half gap, doubled") {
  // film_flux (Liu & Mei 1989; Balmforth et al. 2006) on the half gap h/2, doubled, scaled by
  // (tau_y/K)^(1/n) (h/2)^2 at G = (2 tau_y / h) g, must equal phi(g) (derivation in models/squeeze_flow.cpp).
  for (double n : {0.3, 1.0, 1.7}) {
    const Material m{30.0, 4.0, n};
    const double h = 2e-3;
    for (double g : {1.0, 1.0001, 1.3, 3.0, 50.0, 1e4}) {
      const double G = 2 * m.yield_stress / h * g;
      const double scaled = 2 * film_flux(m, G, h / 2) / (std::pow(m.yield_stress / m.consistency, 1 / n) * h * h / 4);
      INFO("n = " << n << ", g = " << g);
      CHECK(squeeze_detail::slit_flux(n, g) == doctest::Approx(scaled).epsilon(1e-12));
    }
  }
}

TEST_CASE("squeeze: the load function starts at the plastic limit 1/3, increases, and tends to Scott's law") {
  using squeeze_detail::load_function;
  for (double n : {0.2, 0.5, 1.0, 2.0}) {
    INFO("n = " << n);
    // Psi(1) = 1/3 is F = 2 pi tau_y R^3 / (3 h), the perfectly plastic limit (Engmann et al. 2005).
    CHECK(load_function(n, 1.0) == doctest::Approx(1.0 / 3.0).epsilon(1e-15));
    // Near 1: Psi - 1/3 = (g_w - 1)(n+1)/(4n+3) to first order (phi ~ (g-1)^(1+1/n) in the integral form).
    const double eps = 1e-7;
    CHECK((load_function(n, 1 + eps) - 1.0 / 3.0) / eps == doctest::Approx((n + 1) / (4 * n + 3)).epsilon(1e-5));
    // Increasing, and between the bounds g_w/(n+3) <= Psi <= g_w/3 derived in squeeze_flow.cpp.
    double previous = load_function(n, 1.0);
    for (double lg = -6; lg <= 8; lg += 0.25) {
      const double g_w = 1 + std::pow(10.0, lg);
      const double psi = load_function(n, g_w);
      CHECK(psi > previous);
      CHECK(psi <= g_w / 3 * (1 + 1e-14));
      CHECK(psi >= g_w / (n + 3) * (1 - 1e-14));
      previous = psi;
    }
    // Large g_w (negligible yield stress): Psi -> g_w/(n+3), which is Scott's law in these variables.
    CHECK(load_function(n, 1e12) / (1e12 / (n + 3)) == doctest::Approx(1.0).epsilon(1e-9));
  }
}

TEST_CASE("squeeze: the load function equals the direct integral of s^2 g over the disc") {
  // Psi = integral_0^1 s^2 g(s) ds with phi(g(s)) = s phi(g_w): the definition before the integration by parts.
  for (double n : {0.4, 1.0, 1.8}) {
    for (double g_w : {1.05, 2.0, 30.0}) {
      const double beta = squeeze_detail::slit_flux(n, g_w);
      auto g_at = [&](double s) {
        if (s <= 0) return 1.0;
        auto residual = [&](double g) { return squeeze_detail::slit_flux(n, g) - s * beta; };
        std::uintmax_t iterations = 200;
        const auto bracket = boost::math::tools::toms748_solve(
            residual, 1.0, g_w * (1 + 1e-12), boost::math::tools::eps_tolerance<double>(50), iterations);
        return 0.5 * (bracket.first + bracket.second);
      };
      const double direct = boost::math::quadrature::gauss_kronrod<double, 31>::integrate(
          [&](double s) { return s * s * g_at(s); }, 0.0, 1.0, 12, 1e-12);
      INFO("n = " << n << ", g_w = " << g_w);
      CHECK(squeeze_detail::load_function(n, g_w) == doctest::Approx(direct).epsilon(1e-9));
    }
  }
}

TEST_CASE("squeeze: the yield-stress rate balances the load of a direct slit-flux integration") {
  // Independent of the scaling: the rate returned must make F = integral_0^R pi r^2 G(r) dr equal the load, with G
  // from inverting 2 film_flux(m, G, h/2) = r (-dh/dt)/2 at each r (DEVELOPERS.md, "Gravity spreading").
  const SqueezeRig rig = bench_rig();
  for (const Material& m : {Material{50.0, 100.0, 1.0}, Material{20.0, 150.0, 0.45}, Material{5.0, 60.0, 1.6}}) {
    const double h_a = closed_form::squeeze_arrest_gap(m.yield_stress, rig.force, rig.volume);
    for (double ratio : {1.02, 1.5, 4.0}) {
      const double h = ratio * h_a;
      const double v = squeeze_rate(rig, m, h);
      INFO("tau_y = " << m.yield_stress << ", n = " << m.flow_index << ", h/h_a = " << ratio << ", rate = " << v);
      REQUIRE(v > 0);
      CHECK(direct_load(m, rig.volume, h, v) == doctest::Approx(rig.force).epsilon(1e-7));
    }
  }
}

TEST_CASE("squeeze: Bingham and Herschel-Bulkley samples stop at the plastic-limit gap") {
  // Perfectly plastic limit (Engmann et al. 2005): F = 2 pi tau_y R^3 / (3 h), i.e. h_a^(5/2) = 2 pi tau_y
  // (V/pi)^(3/2) / (3 F) (closed_form::squeeze_arrest_gap). The lubrication solution approaches it like t^-n, so
  // the last reading is taken late.
  constexpr double tolerance = 5e-3;  // brief: within 0.5% of the arrest gap
  const SqueezeRig rig = bench_rig();
  const std::vector<double> times{0, 1, 10, 100, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8};
  for (const Material& m : {Material{50.0, 100.0, 1.0}, Material{20.0, 150.0, 0.6}, Material{10.0, 30.0, 1.4}}) {
    SUBCASE(("tau_y = " + std::to_string(m.yield_stress) + ", n = " + std::to_string(m.flow_index)).c_str()) {
      const auto sol = solve_squeeze(rig, m, times);
      REQUIRE(sol.ok());
      const double h_a = closed_form::squeeze_arrest_gap(m.yield_stress, rig.force, rig.volume);
      CHECK(sol.arrest_gap == doctest::Approx(h_a).epsilon(1e-14));
      // The plastic-limit force law written out: the load at h_a is carried exactly by the yield stress.
      const double R_a = std::sqrt(rig.volume / (pi * h_a));
      CHECK(2 * pi * m.yield_stress * std::pow(R_a, 3) / (3 * h_a) == doctest::Approx(rig.force).epsilon(1e-12));
      REQUIRE(h_a < rig.initial_gap);
      INFO("steps: " << sol.steps << ", last gap / arrest gap - 1 = " << sol.gaps.back() / h_a - 1);
      CHECK(rel_diff(sol.gaps.back(), h_a) < tolerance);
      CHECK(sol.arrested);
      for (std::size_t i = 0; i < times.size(); ++i) {
        CHECK(sol.gaps[i] >= h_a);  // never below the arrest gap
        if (i > 0) CHECK(sol.gaps[i] <= sol.gaps[i - 1]);
      }
      // The approach is algebraic, not finite-time: still above the arrest gap at the last reading.
      CHECK(sol.gaps.back() > h_a);
    }
  }
}

TEST_CASE("squeeze: a Herschel-Bulkley sample with a tiny yield stress approaches the power-law result") {
  // As tau_y -> 0 the rim gradient g_w -> infinity and Psi -> g_w/(n+3): Scott's law (1931). The relative effect of
  // the yield stress on the rate is O(1/g_w); here g_w ~ 1e7, so 1e-6 is ample.
  const SqueezeRig rig = bench_rig();
  const auto times = bench_times();
  for (double n : {0.4, 1.0, 1.6}) {
    const Material tiny{1e-6, 200.0, n};
    const Material power_law{0.0, 200.0, n};
    const auto a = solve_squeeze(rig, tiny, times);
    const auto b = solve_squeeze(rig, power_law, times);
    REQUIRE(a.ok());
    REQUIRE(b.ok());
    CHECK_FALSE(a.arrested);
    double worst = 0;
    for (std::size_t i = 0; i < times.size(); ++i) worst = std::max(worst, rel_diff(a.gaps[i], b.gaps[i]));
    INFO("n = " << n << ", worst relative difference: " << worst);
    CHECK(worst < 1e-6);
    CHECK(worst > 0);  // the yield stress is still seen: the HB branch, not the power-law one, ran
  }
  // A yield stress so small that the scaled variables would overflow gives the power-law gaps, not NaN.
  const auto vanishing = solve_squeeze(rig, Material{1e-300, 200.0, 0.5}, times);
  const auto power_law = solve_squeeze(rig, Material{0.0, 200.0, 0.5}, times);
  REQUIRE(vanishing.ok());
  for (std::size_t i = 0; i < times.size(); ++i)
    CHECK(vanishing.gaps[i] == doctest::Approx(power_law.gaps[i]).epsilon(1e-14));
  CHECK(squeeze_rate(rig, Material{1e-300, 200.0, 0.5}, 1e-3) ==
        doctest::Approx(squeeze_rate(rig, Material{0.0, 200.0, 0.5}, 1e-3)).epsilon(1e-14));
}

TEST_CASE("squeeze: no motion when the initial gap is already below the arrest gap") {
  SqueezeRig rig = bench_rig();
  const Material stiff{400.0, 100.0, 0.5};
  const double h_a = closed_form::squeeze_arrest_gap(stiff.yield_stress, rig.force, rig.volume);
  rig.initial_gap = 0.8 * h_a;
  const auto sol = solve_squeeze(rig, stiff, bench_times());
  REQUIRE(sol.ok());
  CHECK(sol.arrested);
  CHECK(sol.steps == 0);
  CHECK(sol.arrest_gap == doctest::Approx(h_a));
  for (double g : sol.gaps) CHECK(g == rig.initial_gap);
  CHECK(squeeze_rate(rig, stiff, rig.initial_gap) == 0.0);
}

TEST_CASE("squeeze: the rate is zero at the arrest gap and grows continuously above it") {
  const SqueezeRig rig = bench_rig();
  const Material m{50.0, 100.0, 1.0};
  const double h_a = closed_form::squeeze_arrest_gap(m.yield_stress, rig.force, rig.volume);
  CHECK(squeeze_rate(rig, m, h_a) == 0.0);
  CHECK(squeeze_rate(rig, m, 0.5 * h_a) == 0.0);
  // Above h_a the rate rises from 0 like (h - h_a)^(1+1/n) (phi ~ (g_w - 1)^(1+1/n), g_w - 1 proportional to h - h_a).
  double previous = 0;
  for (double excess : {1e-9, 1e-6, 1e-3, 1e-1, 1.0}) {
    const double v = squeeze_rate(rig, m, h_a * (1 + excess));
    INFO("excess " << excess << ", rate " << v);
    CHECK(std::isfinite(v));
    CHECK(v > previous);
    previous = v;
  }
  const double v1 = squeeze_rate(rig, m, h_a * (1 + 1e-6));
  const double v2 = squeeze_rate(rig, m, h_a * (1 + 2e-6));
  CHECK(v2 / v1 == doctest::Approx(4.0).epsilon(1e-4));  // exponent 1 + 1/n = 2 for a Bingham sample
  // Volume is conserved by construction: pi R^2 h = V at every gap.
  for (double h : {h_a, 2 * h_a, rig.initial_gap})
    CHECK(pi * std::pow(squeeze_disc_radius(rig.volume, h), 2) * h == doctest::Approx(rig.volume).epsilon(1e-14));
}

TEST_CASE("squeeze: a tighter tolerance changes the gaps by less than 1e-6") {
  const SqueezeRig rig = bench_rig();
  const auto times = bench_times();
  for (const Material& m : {Material{0.0, 1000.0, 1.0}, Material{20.0, 150.0, 0.45}, Material{50.0, 100.0, 1.0}}) {
    SqueezeOptions tight;
    tight.rel_tol = 1e-12;
    const auto a = solve_squeeze(rig, m, times);
    const auto b = solve_squeeze(rig, m, times, tight);
    REQUIRE(a.ok());
    REQUIRE(b.ok());
    double worst = 0;
    for (std::size_t i = 0; i < times.size(); ++i) worst = std::max(worst, rel_diff(a.gaps[i], b.gaps[i]));
    INFO("tau_y = " << m.yield_stress << ", n = " << m.flow_index << ", steps " << a.steps << " vs " << b.steps
                    << ", worst relative change " << worst);
    CHECK(worst < 1e-6);
    CHECK(b.steps >= a.steps);  // equal for Stefan's law, which is exactly linear in the stretched time
  }
}

TEST_CASE("squeeze: the step bound is reported by name") {
  SqueezeOptions few;
  few.max_steps = 3;
  const auto sol = solve_squeeze(bench_rig(), Material{20.0, 150.0, 0.45}, bench_times(), few);
  CHECK_FALSE(sol.ok());
  CHECK(sol.gaps.empty());
  CHECK(sol.message.find("max_steps = 3") != std::string::npos);
  CHECK(sol.status == SolveStatus::StepLimit);
}

TEST_CASE("squeeze: the default initial gap is a disc as high as it is wide") {
  SqueezeRig rig = bench_rig();
  rig.initial_gap = 0;
  const double h0 = squeeze_initial_gap(rig);
  CHECK(2 * squeeze_disc_radius(rig.volume, h0) == doctest::Approx(h0).epsilon(1e-14));
  const auto sol = solve_squeeze(rig, Material{0.0, 1000.0, 1.0}, {0.0, 10.0});
  REQUIRE(sol.ok());
  CHECK(sol.gaps[0] == h0);
  CHECK(sol.gaps[1] == doctest::Approx(closed_form::stefan_gap(1000.0, rig.force, rig.volume, h0, 10.0)).epsilon(1e-6));
}

TEST_CASE("squeeze: invalid inputs throw std::invalid_argument naming the field") {
  const Material m{10.0, 100.0, 1.0};
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
  SUBCASE("rig") {
    SqueezeRig rig = bench_rig();
    rig.volume = -1e-6;
    throws_naming([&] { solve_squeeze(rig, m, {0.0}); }, "volume");
    rig = bench_rig();
    rig.force = -2;
    throws_naming([&] { solve_squeeze(rig, m, {0.0}); }, "force");
    rig.force = 0;
    throws_naming([&] { squeeze_rate(rig, m, 1e-3); }, "force");
    rig = bench_rig();
    rig.initial_gap = -1e-3;
    throws_naming([&] { solve_squeeze(rig, m, {0.0}); }, "initial_gap");
    rig.initial_gap = std::nan("");
    throws_naming([&] { solve_squeeze(rig, m, {0.0}); }, "initial_gap");
  }
  SUBCASE("times") {
    throws_naming([&] { solve_squeeze(bench_rig(), m, {0.0, 2.0, 1.0}); }, "times[2]");
    throws_naming([&] { solve_squeeze(bench_rig(), m, {-1.0}); }, "times[0]");
    throws_naming([&] { solve_squeeze(bench_rig(), m, {0.0, INFINITY}); }, "times[1]");
  }
  SUBCASE("material, options and gap") {
    throws_naming([&] { solve_squeeze(bench_rig(), Material{10.0, 100.0, 0.0}, {0.0}); }, "flow_index");
    throws_naming([&] { solve_squeeze(bench_rig(), Material{-1.0, 100.0, 1.0}, {0.0}); }, "yield_stress");
    SqueezeOptions bad;
    bad.rel_tol = 0;
    throws_naming([&] { solve_squeeze(bench_rig(), m, {0.0}, bad); }, "rel_tol");
    bad = {};
    bad.max_steps = 0;
    throws_naming([&] { solve_squeeze(bench_rig(), m, {0.0}, bad); }, "max_steps");
    throws_naming([&] { squeeze_rate(bench_rig(), m, 0.0); }, "gap");
  }
}
