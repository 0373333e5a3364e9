// spreadfit benchmark: forward-solve times and accuracy at the default resolution, low-order model distance, and
// fit times. Run by scripts/bench; prints a table. No thresholds here (timing belongs in no unit test).
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <functional>
#include <random>
#include <string>
#include <vector>

#include "models/forward.hpp"
#include "models/low_order.hpp"
#include "models/thin_film.hpp"
#include "src/fit/fit_law.hpp"
#include "src/fit/prediction_band.hpp"
#include "src/qc/spec_translation.hpp"
#include "tests/bench/bench_capture.hpp"

using namespace spreadfit;

namespace {

double median_ms(const std::function<void()>& f, int repeats) {
  std::vector<double> t;
  for (int i = 0; i < repeats; ++i) {
    const auto a = std::chrono::steady_clock::now();
    f();
    t.push_back(std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - a).count());
  }
  std::sort(t.begin(), t.end());
  return t[t.size() / 2];
}

// Processor time of the whole process (every thread, the pool's workers included) [ms].
double process_cpu_ms() {
  timespec ts{};
  clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
  return 1e3 * double(ts.tv_sec) + 1e-6 * double(ts.tv_nsec);
}

// Mean processor time of f over `runs` runs [ms] (one total: the time of a thread that is not running is accounted
// coarsely, so a single short run can miss the pool's share).
double mean_cpu_ms(const std::function<void()>& f, int runs) {
  const double a = process_cpu_ms();
  for (int i = 0; i < runs; ++i) f();
  return (process_cpu_ms() - a) / runs;
}

TestSetup channel() {
  TestSetup s;
  s.rig = ChannelRig{0.05, 0.05, 1e-4, true};
  s.density = 1100;
  s.reading = Reading::Front;
  return s;
}
TestSetup plate() {
  TestSetup s;
  s.rig = PlateRig{0.03, 6e-5};
  s.density = 1000;
  s.reading = Reading::Radius;
  return s;
}
TestSetup squeeze() {
  TestSetup s;
  s.rig = SqueezeRig{2e-6, 4.9, 8e-3};
  s.density = 1000;
  s.reading = Reading::Gap;
  return s;
}
TestSetup slump() {
  TestSetup s;
  s.rig = SlumpRig{0.05, 0.1};
  s.density = 1100;
  s.reading = Reading::Slump;
  return s;
}

struct Law_ {
  const char* name;
  Material m;
};

}  // namespace

int main(int argc, char** argv) {
  const bool quick = argc > 1 && std::string(argv[1]) == "--quick";
  if (argc > 1 && std::string(argv[1]) == "--capture") {  // the capture section alone
    spreadfit::bench::bench_capture(std::filesystem::path(argv[0]).parent_path(), false);
    return 0;
  }
  const int repeats = quick ? 5 : 21;
  std::vector<double> times;
  for (int i = 1; i <= 30; ++i) times.push_back(4.0 * i);  // a 120 s test, 30 readings

  const Law_ laws[] = {{"newtonian", {0, 5.0, 1.0}},
                       {"power-law", {0, 10.0, 0.4}},
                       {"bingham", {30, 2.0, 1.0}},
                       {"herschel-bulkley", {20, 10.0, 0.4}}};
  struct Rig_ {
    const char* name;
    TestSetup setup;
  };
  const Rig_ rigs[] = {{"channel", channel()}, {"plate", plate()}, {"squeeze", squeeze()}, {"slump", slump()}};

  // The converged reference of the thin-film rigs: 320 cells without extrapolation, 1000x tighter time tolerance.
  ForwardOptions converged;
  converged.cells = 320;
  converged.extrapolate = false;
  converged.rel_tol /= 1000;
  // Largest relative error of the readings (for the channel: the front's advance past the gate) against it.
  auto reading_error = [&](const ForwardResult& x, const ForwardResult& ref) {
    double err = 0.0;
    for (std::size_t i = 0; i < ref.readings.size(); ++i)
      if (ref.readings[i] > 0) err = std::max(err, std::abs(x.readings[i] / ref.readings[i] - 1.0));
    return err;
  };
  ForwardOptions forty;  // the defaults before the extrapolation: 40 cells on one grid
  forty.cells = 40;
  forty.extrapolate = false;

  std::printf("Forward solve, 120 s test with 30 readings (median of %d runs): the default (RODAS stepper, 20 and 10\n"
              "cells extrapolated, the two grids solved at the same time on two threads), the earlier default (40 cells,\n"
              "one grid) and the ROS2 stepper (defaults otherwise) in the same run; error against 320 cells, 1000x\n"
              "tighter tolerance; times are wall-clock, the last column the default's processor time over 200 solves\n"
              "(all threads, the pool's waiting included)\n",
              repeats);
  std::printf("%-9s %-17s %10s %6s %8s %11s %6s %8s %6s %10s %6s %8s %10s\n", "rig", "law", "default", "steps",
              "error", "40 cells", "steps", "error", "ratio", "ROS2", "steps", "error", "cpu");
  for (const Rig_& r : rigs) {
    for (const Law_& l : laws) {
      ForwardOptions ros2;
      ros2.stepper = TimeStepper::Ros2;
      ForwardResult res, before, other;
      const double ms = median_ms([&] { res = predict_readings(r.setup, l.m, times); }, repeats);
      // The squeeze ODE and the static slump model keep their own tolerances (1e-9 and closed form): their accuracy
      // is checked against Stefan, Scott and Pashias in the tests, not against a finer grid here.
      if (std::holds_alternative<SqueezeRig>(r.setup.rig) || std::holds_alternative<SlumpRig>(r.setup.rig)) {
        std::printf("%-9s %-17s %7.3f ms %6zu %8s\n", r.name, l.name, ms, res.steps, "see tests");
        continue;
      }
      const double before_ms = median_ms([&] { before = predict_readings(r.setup, l.m, times, forty); }, repeats);
      const double other_ms = median_ms([&] { other = predict_readings(r.setup, l.m, times, ros2); }, repeats);
      const double cpu_ms = mean_cpu_ms([&] { res = predict_readings(r.setup, l.m, times); }, 200);
      const ForwardResult ref = predict_readings(r.setup, l.m, times, converged);
      std::printf("%-9s %-17s %7.3f ms %6zu %7.3f%% %8.3f ms %6zu %7.3f%% %5.1fx %7.3f ms %6zu %7.3f%% %7.3f ms\n",
                  r.name, l.name, ms, res.steps, 100 * reading_error(res, ref), before_ms, before.steps,
                  100 * reading_error(before, ref), before_ms / ms, other_ms, other.steps,
                  100 * reading_error(other, ref), cpu_ms);
    }
  }

  // Accuracy over a population (the four materials above are one corner of it): 48 channel and plate tests of
  // Newtonian, power-law and Herschel-Bulkley materials, fills of 20-120 mL, against the converged solution.
  {
    std::mt19937 rng(11);
    std::uniform_real_distribution<double> u(0, 1);
    double worst_new = 0, worst_old = 0, sum_new = 0, sum_old = 0, ms_new = 0, ms_old = 0;
    int count = 0;
    for (int i = 0; i < 24; ++i) {
      const Material m{i % 3 == 0 ? 0.0 : 2 + 60 * u(rng), std::exp(std::log(0.3) + u(rng) * std::log(100.0)),
                       0.25 + 0.75 * u(rng)};
      const double volume = 2e-5 + 1e-4 * u(rng);
      TestSetup c = channel(), p = plate();
      std::get<ChannelRig>(c.rig).volume = volume;
      std::get<PlateRig>(p.rig).volume = volume;
      for (const TestSetup& setup : {c, p}) {
        const ForwardResult ref = predict_readings(setup, m, times, converged);
        if (!ref.ok()) continue;
        ForwardResult a, b;
        ms_new += median_ms([&] { a = predict_readings(setup, m, times); }, 3);
        ms_old += median_ms([&] { b = predict_readings(setup, m, times, forty); }, 3);
        const double ea = reading_error(a, ref), eb = reading_error(b, ref);
        worst_new = std::max(worst_new, ea), worst_old = std::max(worst_old, eb);
        sum_new += ea, sum_old += eb, ++count;
      }
    }
    std::printf("  over %d channel and plate tests (tau_y 0-62 Pa, K 0.3-30, n 0.25-1, 20-120 mL): default mean %.3f%%"
                " worst %.3f%%, %.3f ms; 40 cells mean %.3f%% worst %.3f%%, %.3f ms\n",
                count, 100 * sum_new / count, 100 * worst_new, ms_new / count, 100 * sum_old / count, 100 * worst_old,
                ms_old / count);
  }

  // Grid convergence of the method of lines (RODAS, tight time tolerance so the grid error shows): largest relative
  // error of the 30 readings against 320 cells, and the observed order between successive doublings.
  std::printf("\nGrid convergence, herschel-bulkley (20 Pa, 10 Pa.s^n, 0.4), error against 320 cells\n");
  for (const Rig_& r : {rigs[0], rigs[1]}) {
    ForwardOptions o;
    o.rel_tol = 1e-7;
    o.cells = 320;
    o.extrapolate = false;
    const ForwardResult ref = predict_readings(r.setup, laws[3].m, times, o);
    double previous = 0.0;
    std::printf("  %-8s", r.name);
    for (int cells : {10, 20, 40, 80}) {
      o.cells = cells;
      const ForwardResult x = predict_readings(r.setup, laws[3].m, times, o);
      double err = 0.0;
      for (std::size_t i = 0; i < times.size(); ++i) err = std::max(err, std::abs(x.readings[i] / ref.readings[i] - 1));
      if (previous > 0)
        std::printf("  %3d cells %.3f%% (order %.2f)", cells, 100 * err, std::log2(previous / err));
      else
        std::printf("  %3d cells %.3f%%", cells, 100 * err);
      previous = err;
    }
    std::printf("\n  %-8s", "");
    for (int cells : {20, 40, 80}) {
      ForwardOptions e;
      e.rel_tol = 1e-7;
      e.cells = cells;
      std::printf("  %d+%d extrapolated %.3f%%", cells / 2, cells,
                  100 * reading_error(predict_readings(r.setup, laws[3].m, times, e), ref));
    }
    std::printf("\n");
  }

  std::printf("\nLow-order front model vs method of lines (largest |relative difference| over t = 4..120 s)\n");
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
    double worst = 0.0, sum = 0.0;
    int count = 0;
    for (double tau : {0.0, 5.0, 20.0, 50.0})
      for (double K : {1.0, 5.0, 20.0})
        for (double n : {0.3, 0.5, 0.8, 1.0}) {
          SpreadingProblem p;
          p.geometry = g;
          p.initial_extent = g == Geometry::Planar ? 0.05 : 0.03;
          p.initial_height = g == Geometry::Planar ? 0.04 : 0.021;
          p.rho_g = 1050 * standard_gravity;
          p.material = {tau, K, n};
          const auto full = solve_spreading(p, times);
          const auto lo = solve_low_order(p, times);
          double e = 0.0;
          for (std::size_t i = 0; i < times.size(); ++i) e = std::max(e, std::abs(lo.fronts[i] / full.fronts[i] - 1));
          worst = std::max(worst, e);
          sum += e;
          ++count;
        }
    std::printf("  %-12s over %d materials: mean %.1f%%, worst %.1f%%\n",
                g == Geometry::Planar ? "planar" : "axisymmetric", count, 100 * sum / count, 100 * worst);
  }

  std::printf("\nFits of a 30-point curve with 0.5 mm reading noise (mean over 8 noise seeds)\n");
  std::printf("%-9s %-17s %-8s %10s %8s\n", "rig", "true law", "fit", "time [ms]", "solves");
  fit::FitResult plate_fit;
  // Mean over eight noise seeds: the number of solves a fit needs depends on where the noise puts the optimum
  // (near a bound of the flow index, a profile may need several refits), so one seed can mislead.
  constexpr unsigned seeds = 8;
  for (const Rig_& r : {rigs[0], rigs[1]}) {
    const Material truth = {20, 10.0, 0.4};
    double hb_ms = 0, auto_ms = 0, point_ms = 0, named_ms = 0, auto_point_ms = 0;
    int hb_solves = 0, auto_solves = 0, point_solves = 0, named_solves = 0, auto_point_solves = 0;
    // The point fit (quadratic intervals, no profiles, no likelihood draws): like for like with a plain
    // least-squares fit (tests/reference/bench_scipy.py prints the SciPy peer beside it).
    fit::FitOptions point;
    point.profile_intervals = false;
    point.likelihood_draws = 0;
    for (unsigned seed = 1; seed <= seeds; ++seed) {
      fit::FitSeries s;
      s.setup = r.setup;
      for (int i = 1; i <= 30; ++i) s.times.push_back(2.0 * i);
      std::vector<double> shifted;
      for (double t : s.times) shifted.push_back(t - 0.3);
      s.values = predict_readings(r.setup, truth, shifted).readings;
      std::mt19937 rng(seed);
      std::normal_distribution<double> noise(0, 5e-4);
      for (double& v : s.values) v += noise(rng);
      s.sigma = 5e-4;
      hb_ms += median_ms([&] { hb_solves += fit::fit_law({s}, Law::HerschelBulkley).evaluations; }, 1);
      point_ms += median_ms([&] { point_solves += fit::fit_law({s}, Law::HerschelBulkley, point).evaluations; }, 1);
      // What --model herschel-bulkley runs: the special cases first, as auto does (fit_named).
      named_ms += median_ms([&] { named_solves += fit::fit_named({s}, Law::HerschelBulkley).evaluations; }, 1);
      fit::ModelChoice c;
      auto_ms += median_ms([&] { c = fit::fit_auto({s}); }, 1);
      for (const auto& f : c.candidates) auto_solves += f.evaluations;
      // auto with quadratic intervals only (the speed issue's "auto with today's intervals").
      fit::ModelChoice quadratic;
      auto_point_ms += median_ms([&] { quadratic = fit::fit_auto({s}, point); }, 1);
      for (const auto& f : quadratic.candidates) auto_point_solves += f.evaluations;
      if (seed == 5 && r.setup.reading == Reading::Radius && c.chosen >= 0)
        plate_fit = c.candidates[std::size_t(c.chosen)];
    }
    std::printf("%-9s %-17s %-8s %10.1f %8.1f\n", r.name, "herschel-bulkley", "HB", hb_ms / seeds,
                double(hb_solves) / seeds);
    std::printf("%-9s %-17s %-8s %10.1f %8.1f\n", r.name, "herschel-bulkley", "HB-point", point_ms / seeds,
                double(point_solves) / seeds);
    std::printf("%-9s %-17s %-8s %10.1f %8.1f\n", r.name, "herschel-bulkley", "HB-named", named_ms / seeds,
                double(named_solves) / seeds);
    std::printf("%-9s %-17s %-8s %10.1f %8.1f\n", r.name, "herschel-bulkley", "auto", auto_ms / seeds,
                double(auto_solves) / seeds);
    std::printf("%-9s %-17s %-8s %10.1f %8.1f\n", r.name, "herschel-bulkley", "auto-pt", auto_point_ms / seeds,
                double(auto_point_solves) / seeds);
  }

  // Using a fitted material elsewhere: a 200-draw band on another rig, a 21 x 21 reading map, reading limits solved
  // back to yield-stress limits over a 5 x 5 grid of the other parameters (all at the default forward settings).
  std::printf("\nPrediction, map and spec translation (median of %d)\n", quick ? 3 : 5);
  {
    std::vector<double> every_2s;
    for (int i = 1; i <= 30; ++i) every_2s.push_back(2.0 * i);
    const fit::FitResult material = material_only(plate_fit);
    fit::PredictionBand band;
    double ms = median_ms([&] { band = fit::prediction_band(material, channel(), every_2s, 0, 200); }, quick ? 3 : 5);
    std::printf("  band, plate fit (%s) on the channel, 200 draws x 30 times: %8.1f ms (%d draws solved)\n",
                std::string(law_name(material.law)).c_str(), ms, band.samples);
    ms = median_ms([&] { band = fit::prediction_band(material, plate(), every_2s, 0, 200); }, quick ? 3 : 5);
    std::printf("  band, plate fit (%s) on the plate,   200 draws x 30 times: %8.1f ms (%d draws solved)\n",
                std::string(law_name(material.law)).c_str(), ms, band.samples);
    std::vector<Material> grid;
    for (int j = 0; j < 21; ++j)
      for (int i = 0; i < 21; ++i)
        grid.push_back({10 * std::pow(5.0, i / 20.0), 1 * std::pow(20.0, j / 20.0), 0.45});
    ms = median_ms([&] { (void)qc::readings_at(channel(), grid, 30); }, quick ? 3 : 5);
    std::printf("  map, channel front at 30 s, 21 x 21 grid:            %8.1f ms\n", ms);
    std::vector<Material> others;
    for (int j = 0; j < 5; ++j)
      for (int i = 0; i < 5; ++i) others.push_back({0, 2 * std::pow(6.0, i / 4.0), 0.3 + 0.3 * j / 4.0});
    qc::ParameterLimits limits;
    ms = median_ms([&] {
      limits = qc::solve_parameter_limits(channel(), 30, others, {"yield_stress", 5, 200, true, 17}, 0.055, 0.08);
    }, quick ? 3 : 5);
    std::printf("  yield-stress limits from channel limits, 25 combos:  %8.1f ms (%d forward solves)\n", ms,
                limits.solves);
  }
  spreadfit::bench::bench_capture(std::filesystem::path(argv[0]).parent_path(), quick);
  return 0;
}
