// Thin-film spreading (models/thin_film.hpp) against published similarity solutions and plastic arrest laws.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <vector>

#include "models/closed_forms.hpp"
#include "models/side_wall.hpp"
#include "models/thin_film.hpp"

using namespace spreadfit;
using std::numbers::pi;

namespace {
constexpr double rho_g = 1100.0 * standard_gravity;

SpreadingProblem block(Geometry g, Material m) {
  SpreadingProblem p;
  p.geometry = g;
  p.initial_extent = 0.03;
  p.initial_height = 0.03;
  p.rho_g = rho_g;
  p.material = m;
  return p;
}

double initial_volume(const SpreadingProblem& p) {
  return p.geometry == Geometry::Planar ? p.initial_extent * p.initial_height
                                        : pi * p.initial_extent * p.initial_extent * p.initial_height;
}
}  // namespace

TEST_CASE("similarity front constants reproduce the published prefactors") {
  // Huppert (1982), J. Fluid Mech. 121: x_N = 1.411 (rho g A^3 t / 3 mu)^(1/5), r_N = 0.894 (rho g V^3 t / 3 mu)^(1/8).
  CHECK(std::pow(3.0 * closed_form::planar_front_constant(1.0), 0.2) == doctest::Approx(1.411).epsilon(5e-4));
  CHECK(std::pow(3.0 * closed_form::axisymmetric_front_constant(1.0), 0.125) == doctest::Approx(0.894).epsilon(5e-4));
  // Power-law constants P_p(n), P_a(n) (Gratton, Minotti & Mahajan 1999; Di Federico et al. 2006), as tabulated in
  // DEVELOPERS.md ("Gravity spreading") from the similarity solution.
  const double n[] = {0.2, 0.3, 0.4, 0.5, 0.6, 0.8, 1.0};
  const double Pp[] = {1.3451, 1.4365, 1.5181, 1.5913, 1.6573, 1.7712, 1.8659};
  const double Pa[] = {0.18241, 0.18026, 0.17626, 0.17094, 0.16471, 0.15069, 0.13591};
  for (int i = 0; i < 7; ++i) {
    INFO("n = " << n[i]);
    CHECK(closed_form::planar_front_constant(n[i]) == doctest::Approx(Pp[i]).epsilon(1e-4));
    CHECK(closed_form::axisymmetric_front_constant(n[i]) == doctest::Approx(Pa[i]).epsilon(1e-4));
  }
}

TEST_CASE("a Newtonian current follows Huppert's similarity front once it outgrows the initial block") {
  // Huppert (1982): late-time fronts within 0.5% of the similarity solution (the block's memory decays).
  const std::vector<double> times{1e4, 1e5, 1e6};
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
    const SpreadingProblem p = block(g, {0.0, 10.0, 1.0});
    const SpreadingSolution s = solve_spreading(p, times);
    REQUIRE(s.ok());
    for (std::size_t i = 0; i < times.size(); ++i) {
      const double exact = g == Geometry::Planar
                               ? closed_form::planar_front(rho_g, 10.0, 1.0, initial_volume(p), times[i])
                               : closed_form::axisymmetric_front(rho_g, 10.0, 1.0, initial_volume(p), times[i]);
      INFO("geometry " << int(g) << ", t = " << times[i] << ", steps " << s.steps);
      CHECK(s.fronts[i] == doctest::Approx(exact).epsilon(5e-3));
    }
  }
}

TEST_CASE("a power-law current spreads with the similarity exponent") {
  // Gratton, Minotti & Mahajan (1999): x_N ~ t^(n/(2n+3)) planar, r_N ~ t^(n/(3n+5)) axisymmetric; slope within 1%.
  for (double n : {0.3, 0.5, 0.8}) {
    for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
      const SpreadingSolution s = solve_spreading(block(g, {0.0, 5.0, n}), {1e5, 1e6});
      REQUIRE(s.ok());
      const double slope = std::log(s.fronts[1] / s.fronts[0]) / std::log(10.0);
      const double exact = g == Geometry::Planar ? n / (2 * n + 3) : n / (3 * n + 5);
      INFO("n = " << n << ", geometry " << int(g));
      CHECK(slope == doctest::Approx(exact).epsilon(0.01));
      // And the front itself against the power-law similarity solution.
      const double x = g == Geometry::Planar
                           ? closed_form::planar_front(rho_g, 5.0, n, initial_volume(block(g, {0.0, 5.0, n})), 1e6)
                           : closed_form::axisymmetric_front(rho_g, 5.0, n, initial_volume(block(g, {0.0, 5.0, n})), 1e6);
      CHECK(s.fronts[1] == doctest::Approx(x).epsilon(5e-3));
    }
  }
}

TEST_CASE("yield-stress currents arrest at the plastic-limit length") {
  // Planar: tau_y = 9 rho g A^2 / (8 L^3) (plastic limit of the thin-film equation, h h_x = -tau_y/(rho g));
  // axisymmetric: tau_y = 225 rho g V^2 / (128 pi^2 R^5) (Roussel & Coussot 2005, J. Rheol. 49). Within 1% where
  // the whole sample yields (final extent several times the block).
  for (double n : {1.0, 0.5}) {
    for (double tau : {2.0, 5.0, 20.0}) {
      for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
        const SpreadingProblem p = block(g, {tau, 5.0, n});
        const SpreadingSolution s = solve_spreading(p, {1e8});
        REQUIRE(s.ok());
        const double L = g == Geometry::Planar ? closed_form::planar_arrest_length(rho_g, tau, initial_volume(p))
                                               : closed_form::axisymmetric_arrest_radius(rho_g, tau, initial_volume(p));
        INFO("n = " << n << ", tau_y = " << tau << ", geometry " << int(g) << ", steps " << s.steps);
        CHECK(s.fronts[0] == doctest::Approx(L).epsilon(0.01));
        // Arrested, not creeping: the front does not move over a further decade of time.
        const SpreadingSolution later = solve_spreading(p, {1e9});
        CHECK(later.fronts[0] == doctest::Approx(s.fronts[0]).epsilon(1e-4));
      }
    }
  }
}

TEST_CASE("volume is conserved to rounding") {
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
    const SpreadingProblem p = block(g, {10.0, 3.0, 0.5});
    const SpreadingSolution s = solve_spreading(p, {1.0, 100.0});
    REQUIRE(s.ok());
    const SpreadingSystem system(p, SpreadingOptions{}.cells, SpreadingOptions{}.grading);
    const double v = system.volume(s.final_nodes / p.initial_extent);
    CHECK(std::abs(v / initial_volume(p) - 1.0) < 1e-9);
  }
}

TEST_CASE("a stiff sample that barely moves gives finite readings") {
  // Yield stress far above the block's basal stress: only the corner slumps; no NaN, monotone, bounded.
  const SpreadingProblem p = block(Geometry::Planar, {2000.0, 50.0, 0.4});
  const SpreadingSolution s = solve_spreading(p, {0.0, 1.0, 10.0, 100.0});
  REQUIRE(s.ok());
  for (std::size_t i = 0; i < s.fronts.size(); ++i) {
    CHECK(std::isfinite(s.fronts[i]));
    CHECK(s.fronts[i] >= p.initial_extent);
    CHECK(s.fronts[i] < 1.2 * p.initial_extent);
    if (i > 0) CHECK(s.fronts[i] >= s.fronts[i - 1]);
  }
}

// The converged reference of the checks below: 320 cells on one grid, a 1000x tighter time tolerance.
SpreadingOptions converged() {
  SpreadingOptions o;
  o.cells = 320;
  o.extrapolate = false;
  o.rel_tol /= 1000;
  return o;
}

TEST_CASE("the default resolution is within 0.3% of a converged solution") {
  // Error measured on the rig's reading (front travelled past the gate for the channel) over a 120 s test.
  std::vector<double> times;
  for (int i = 1; i <= 30; ++i) times.push_back(4.0 * i);
  const Material materials[] = {{0.0, 5.0, 1.0}, {0.0, 10.0, 0.4}, {20.0, 10.0, 0.4}, {30.0, 2.0, 1.0}};
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
    for (const Material& m : materials) {
      SpreadingProblem p = block(g, m);
      p.initial_extent = 0.05;
      p.initial_height = 0.04;
      const SpreadingSolution s = solve_spreading(p, times);
      const SpreadingSolution r = solve_spreading(p, times, converged());
      REQUIRE(s.ok());
      REQUIRE(r.ok());
      const double offset = g == Geometry::Planar ? p.initial_extent : 0.0;
      double worst = 0.0;
      for (std::size_t i = 0; i < times.size(); ++i)
        worst = std::max(worst, std::abs(s.fronts[i] - r.fronts[i]) / (r.fronts[i] - offset));
      INFO("geometry " << int(g) << ", tau_y " << m.yield_stress << ", n " << m.flow_index << ": worst " << worst);
      CHECK(worst < 3e-3);
    }
  }
}

TEST_CASE("extrapolation in the cell count removes most of the grid error, over a population of tests") {
  // Richardson extrapolation (Richardson 1911; Roache 1998, ch. 5): with the error C N^-p + o(N^-p), the
  // combination of N and N/2 cells is closer to the converged solution than either grid. Population: Newtonian,
  // power-law and Herschel-Bulkley materials on blocks and cylinders of several fills (invented, not check values);
  // the check value is the converged solution. Error on the reading (advance past the gate for blocks).
  std::vector<double> times;
  for (int i = 1; i <= 30; ++i) times.push_back(4.0 * i);
  SpreadingOptions one_grid, coarse;
  one_grid.extrapolate = false;
  coarse.extrapolate = false;
  coarse.cells = one_grid.cells / 2;
  double sum_extrapolated = 0.0, sum_fine = 0.0, worst_ratio = 0.0;
  int count = 0;
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric})
    for (const Material& m : {Material{0.0, 5.0, 1.0}, Material{0.0, 2.0, 0.4}, Material{8.0, 3.0, 0.7},
                              Material{25.0, 10.0, 0.5}, Material{40.0, 1.0, 0.3}})
      for (double height : {0.01, 0.025, 0.04}) {
        SpreadingProblem p = block(g, m);
        p.initial_extent = 0.04;
        p.initial_height = height;
        const SpreadingSolution r = solve_spreading(p, times, converged());
        const SpreadingSolution e = solve_spreading(p, times);
        const SpreadingSolution f = solve_spreading(p, times, one_grid);
        const SpreadingSolution c = solve_spreading(p, times, coarse);
        REQUIRE((r.ok() && e.ok() && f.ok() && c.ok()));
        const double offset = g == Geometry::Planar ? p.initial_extent : 0.0;
        auto error = [&](const SpreadingSolution& x) {
          double worst = 0.0;
          for (std::size_t i = 0; i < times.size(); ++i)
            worst = std::max(worst, std::abs(x.fronts[i] - r.fronts[i]) / (r.fronts[i] - offset));
          return worst;
        };
        const double ee = error(e), ef = error(f), ec = error(c);
        INFO("geometry " << int(g) << ", tau_y " << m.yield_stress << ", n " << m.flow_index << ", H0 " << height
                         << ": extrapolated " << ee << ", " << one_grid.cells << " cells " << ef << ", "
                         << coarse.cells << " cells " << ec);
        CHECK(ee < ef);
        CHECK(ef < ec);
        sum_extrapolated += ee;
        sum_fine += ef;
        worst_ratio = std::max(worst_ratio, ee / ef);
        ++count;
      }
  MESSAGE("mean error: extrapolated " << sum_extrapolated / count << ", " << one_grid.cells << " cells "
                                      << sum_fine / count << "; worst ratio " << worst_ratio);
  CHECK(sum_extrapolated < 0.25 * sum_fine);  // measured: 0.1-0.2 of the finer grid's mean error
}

TEST_CASE("keeping the stepper's Jacobian for several steps moves the readings far less than the model error") {
  // ROS2 is second order for any matrix J in W = I - gamma h J (Verwer, Spee, Blom & Hundsdorfer 1999; from
  // memory), so a Jacobian kept for a few steps changes only the local error, which the step control bounds.
  // Against a fresh Jacobian every step: within 2e-4 relative (the default resolution's own error is ~2e-3, above).
  std::vector<double> times;
  for (int i = 1; i <= 30; ++i) times.push_back(4.0 * i);
  const Material materials[] = {{0.0, 5.0, 1.0}, {0.0, 10.0, 0.3}, {20.0, 10.0, 0.4}, {60.0, 1.0, 1.0}};
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
    for (const Material& m : materials) {
      const SpreadingProblem p = block(g, m);
      SpreadingOptions ros2;  // the ROS2 stepper keeps its Jacobian; the default RODAS stepper forms one every step
      ros2.stepper = TimeStepper::Ros2;
      SpreadingOptions every_step = ros2;
      every_step.jacobian_reuse = 1;
      const SpreadingSolution kept = solve_spreading(p, times, ros2);
      const SpreadingSolution fresh = solve_spreading(p, times, every_step);
      REQUIRE(kept.ok());
      REQUIRE(fresh.ok());
      CHECK(kept.rhs_calls < fresh.rhs_calls);
      double worst = 0.0;
      for (std::size_t i = 0; i < times.size(); ++i)
        worst = std::max(worst, std::abs(kept.fronts[i] / fresh.fronts[i] - 1.0));
      INFO("geometry " << int(g) << ", tau_y " << m.yield_stress << ", n " << m.flow_index << ": worst " << worst);
      CHECK(worst < 2e-4);
    }
  }
}

TEST_CASE("the predicted reading is a smooth function of the parameters") {
  // A fixed-grid front jumps from cell to cell and makes the objective a staircase. Along a line in parameter space
  // the first differences of a smooth function change slowly: neighbouring differences agree within 10% and keep
  // their sign (a step would show as a difference many times its neighbours, a kink as a sudden ratio change).
  const int points = 120;
  SUBCASE("consistency") {
    std::vector<double> f;
    for (int i = 0; i <= points; ++i) {
      const double K = 8.0 * (1.0 + 0.25 * i / points);
      f.push_back(solve_spreading(block(Geometry::Planar, {15.0, K, 0.5}), {30.0}).fronts[0]);
    }
    for (int i = 1; i < points; ++i) {
      const double d0 = f[i] - f[i - 1], d1 = f[i + 1] - f[i];
      INFO("point " << i << ": " << d0 << " then " << d1);
      CHECK(d0 < 0);
      CHECK(d1 / d0 == doctest::Approx(1.0).epsilon(0.1));
    }
  }
  SUBCASE("yield stress") {
    std::vector<double> f;
    for (int i = 0; i <= points; ++i) {
      const double tau = 10.0 * (1.0 + 0.5 * i / points);
      f.push_back(solve_spreading(block(Geometry::Axisymmetric, {tau, 8.0, 0.5}), {30.0}).fronts[0]);
    }
    for (int i = 1; i < points; ++i) {
      const double d0 = f[i] - f[i - 1], d1 = f[i + 1] - f[i];
      INFO("point " << i << ": " << d0 << " then " << d1);
      CHECK(d0 < 0);
      CHECK(d1 / d0 == doctest::Approx(1.0).epsilon(0.1));
    }
  }
}

TEST_CASE("side-wall flux factor of an open rectangular channel") {
  // Laminar rectangular-duct flow (free surface as a symmetry plane): about 0.87 at depth/width 0.1 and 0.75 at 0.2
  // (DEVELOPERS.md; duct series e.g. White, Viscous Fluid Flow, from memory).
  CHECK(side_wall_flux_factor(0.1) == doctest::Approx(0.873).epsilon(2e-3));
  CHECK(side_wall_flux_factor(0.2) == doctest::Approx(0.747).epsilon(2e-3));
  CHECK(side_wall_flux_factor(1e-4) == doctest::Approx(1.0).epsilon(1e-3));
  // Continuous across the switch to the tall-duct form at depth/width 0.5 and decreasing with depth.
  CHECK(side_wall_flux_factor(0.5 - 1e-9) == doctest::Approx(side_wall_flux_factor(0.5 + 1e-9)).epsilon(1e-6));
  double previous = 1.0;
  for (double r = 0.01; r < 3.0; r += 0.01) {
    CHECK(side_wall_flux_factor(r) < previous);
    previous = side_wall_flux_factor(r);
  }
}

TEST_CASE("the tabulated side-wall factor matches the series") {
  double worst = 0.0;
  for (double r = 1e-3; r < 5.0; r += 7.77e-4)
    worst = std::max(worst, std::abs(side_wall_flux_factor(r) - side_wall_flux_factor_exact(r)));
  INFO("worst interpolation error " << worst);
  CHECK(worst < 1e-8);
}
