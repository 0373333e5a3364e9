// Curves whose likelihood has more than one valley, or a valley so long and flat that the polish creeps along it,
// found by a black-box sweep of simulated tests (the readings are the verified forward model's plus seeded
// Gaussian noise; the checks are of the fit, not of the physics). Defining properties of likelihood intervals
// (Bates & Watts 1988, section 6.1): the 95% interval of a parameter is the projection of the region where the
// cost is within the cut-off of the optimum, so it holds every point known to lie in that region, among them the
// fits of the law's special cases (Newtonian, power law, Bingham) when their cost is within the cut-off.
#include <doctest/doctest.h>

#include <boost/math/distributions/students_t.hpp>
#include <cmath>

#include "fit_test_support.hpp"
#include "src/fit/fit_law.hpp"
#include "src/fit/parameter_names.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

namespace {

double truth_of(const Material& m, const std::string& name) {
  return name == "yield_stress" ? m.yield_stress : name == "flow_index" ? m.flow_index : m.consistency;
}

bool holds(const fit::ParameterEstimate& e, double v) {
  return (e.upper_only || e.lower <= v) && v <= e.upper;
}

// Every special case's fit within the cut-off lies inside the reported Herschel-Bulkley intervals.
void check_special_cases_inside(const fit::ModelChoice& choice) {
  const fit::FitResult& hb = *choice.candidate(Law::HerschelBulkley);
  REQUIRE(hb.converged());
  const int p = int(hb.names.size());
  const double dof = double(hb.points - p);
  const double q = boost::math::quantile(boost::math::complement(boost::math::students_t(dof), 0.025));
  const double variance = std::max(1.0, 2.0 * hb.cost / dof);  // stated resolution: at least its square
  const double cutoff = 0.5 * q * q * variance;
  for (const fit::FitResult& c : choice.candidates) {
    if (c.law == Law::HerschelBulkley || !c.converged() || !(c.cost < hb.cost + cutoff)) continue;
    for (const fit::ParameterEstimate& e : hb.parameters) {
      if (e.name == "time_origin") continue;
      const double v = e.name == "yield_stress" ? c.material.yield_stress
                       : e.name == "flow_index" ? c.material.flow_index
                                                : c.material.consistency;
      INFO(law_name(c.law) << " (cost " << c.cost << " against " << hb.cost << " + " << cutoff << "): " << e.name
                           << " " << v << " in [" << e.lower << ", " << e.upper << "]");
      CHECK(holds(e, v));
    }
  }
}

}  // namespace

TEST_CASE("a squeeze that closed before its first reading: creeping and arrested valleys both count") {
  // 3.5 mL under 1.42 kg from a 4.8 mm gap, read as the gap from 2 s to 128 s: a nearly Newtonian paste of 1.15 Pa
  // creeps to about 0.5 mm, where a stiff one arrests. The walk from the arrested optimum alone printed 18-51 Pa.
  TestSetup squeeze;
  squeeze.rig = SqueezeRig{3.51e-6, 1.419 * 9.80665, 4.8e-3};
  squeeze.density = 1050;
  squeeze.reading = Reading::Gap;
  const Material truth{1.15, 7.37, 0.947};
  std::vector<double> times;
  for (double t = 2.0; t < 130.0; t *= 1.18) times.push_back(t);
  int covered = 0, fits = 0;
  for (unsigned seed : {5005u, 5006u, 5007u}) {
    const fit::FitSeries s = fit::synthetic_readings(squeeze, truth, times, 1e-4, seed);
    REQUIRE(s.values.size() == times.size());
    const fit::ModelChoice choice = fit::fit_auto({s});
    REQUIRE(choice.chosen >= 0);
    const fit::FitResult& r = choice.candidates[std::size_t(choice.chosen)];
    check_special_cases_inside(choice);
    if (r.law != Law::HerschelBulkley) continue;
    ++fits;
    const fit::ParameterEstimate& tau = estimate(r, "yield_stress");
    INFO("seed " << seed << ": yield stress " << tau.value << " [" << tau.lower << ", " << tau.upper << "]");
    covered += holds(tau, truth.yield_stress) ? 1 : 0;
  }
  CHECK(covered == fits);
}

TEST_CASE("a channel fit along a long flat valley converges, and named and auto agree") {
  // A runny paste (0.92 Pa, 1.17 Pa.s^n, n 0.48) on a 3.1 cm channel with a 7.9 cm block of 63.3 mL, read every
  // 5.27 s from 1.1 s with 0.61 mm noise: the coarse search ran out of iterations while still improving, the fine
  // polish stalled, and --model herschel-bulkley ended in exit 3; auto reported a power law that missed the truth.
  TestSetup channel;
  channel.rig = ChannelRig{0.031, 0.079, 63.3e-6, true};
  channel.density = 1050;
  channel.reading = Reading::Front;
  const Material truth{0.917, 1.17, 0.481};
  std::vector<double> times;
  for (int i = 0; i < 19; ++i) times.push_back(1.1 + 5.27 * i);
  for (unsigned seed : {1006u, 1007u}) {
    const fit::FitSeries s = fit::synthetic_readings(channel, truth, times, 6.06e-4, seed);
    const fit::FitResult named = fit::fit_named({s}, Law::HerschelBulkley);
    INFO("seed " << seed << ": " << fit::fit_status_name(named.status) << " " << named.reason);
    REQUIRE(named.converged());
    for (const fit::ParameterEstimate& e : named.parameters) {
      if (e.name == "time_origin") continue;
      INFO(e.name << " " << e.value << " [" << e.lower << ", " << e.upper << "]");
      CHECK(holds(e, truth_of(truth, e.name)));
    }
    const fit::ModelChoice choice = fit::fit_auto({s});
    REQUIRE(choice.chosen == choice.index_of(Law::HerschelBulkley));
    check_special_cases_inside(choice);
  }
}
