// Monte Carlo coverage over a population of shear-thinning yield-stress materials (DEVELOPERS.md, "The inverse problem": "the
// 95% intervals must cover the truth in about 95% of Monte Carlo trials over a population of realistic
// materials, not one material"). The population spans what QC labs test, ketchup-like sauces to creams and
// lotions: yield stress 5-60 Pa, consistency 2-25 Pa.s^n, flow index 0.25-0.65, log-uniform (common practice,
// no source: the ranges of the trade's product families, from memory). Each material is tested once on a gated
// channel (5 cm wide, 5 cm block, 100 mL) and once on a plate (3 cm ring, 60 mL), read every 3 s to 90 s with a
// 0.5 mm reading standard uncertainty. The readings come from the verified forward model (tests/models) plus
// seeded noise, so the check is of the statistics, not of the physics.
// Heavy: its name starts with "montecarlo" (`spreadfit_tests -tce="montecarlo*"` skips it during development; the
// README's test command runs it). SPREADFIT_POPULATION=N overrides the population size for exploration.
#include <doctest/doctest.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <random>
#include <string>

#include "fit_test_support.hpp"
#include "src/fit/fit_law.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

namespace {

struct Tally {
  int fits = 0, failed = 0, no_yield_stress = 0;
  std::map<std::string, int> covered, reported;
  double seconds = 0;
};

Material draw_material(std::mt19937& rng) {
  std::uniform_real_distribution<double> u(0.0, 1.0);
  auto log_uniform = [&](double a, double b) { return a * std::pow(b / a, u(rng)); };
  Material m;
  m.yield_stress = log_uniform(5.0, 60.0);
  m.consistency = log_uniform(2.0, 25.0);
  m.flow_index = 0.25 + 0.40 * u(rng);
  return m;
}

void record(Tally& t, const fit::FitResult* r, const Material& truth, double t0) {
  ++t.fits;
  if (r == nullptr) {
    ++t.failed;
    return;
  }
  bool has_tau = false;
  for (const fit::ParameterEstimate& p : r->parameters) {
    const double value = p.name == "yield_stress" ? truth.yield_stress
                         : p.name == "flow_index" ? truth.flow_index
                         : p.name == "time_origin" ? t0
                                                   : truth.consistency;
    if (p.name == "yield_stress") has_tau = !p.upper_only;
    ++t.reported[p.name];
    t.covered[p.name] += p.lower <= value && value <= p.upper ? 1 : 0;
  }
  if (!has_tau) ++t.no_yield_stress;
}

}  // namespace

TEST_CASE("montecarlo: intervals over a population of shear-thinning yield-stress pastes hold the truth") {
  const char* env = std::getenv("SPREADFIT_POPULATION");
  const int materials = env ? std::atoi(env) : 24;
  TestSetup channel = channel_setup();
  TestSetup plate;
  plate.rig = PlateRig{0.03, 6e-5};
  plate.density = 1050;
  plate.reading = Reading::Diameter;
  const double sigma = 5e-4, t0 = 0.3;
  std::vector<double> times;
  for (double t = 3.0; t <= 90.0 + 1e-9; t += 3.0) times.push_back(t);

  std::map<std::string, Tally> tallies;  // "<rig> <mode>"
  std::mt19937 rng(20261202u);
  for (int k = 0; k < materials; ++k) {
    const Material truth = draw_material(rng);
    for (const auto& [rig, setup] : {std::pair<std::string, TestSetup>{"channel", channel}, {"plate", plate}}) {
      fit::FitSeries s = fit::synthetic_readings(setup, truth, times, sigma, 7000u + unsigned(k), t0);
      REQUIRE(s.values.size() == times.size());
      for (const char* mode : {"auto", "herschel-bulkley"}) {
        const auto start = std::chrono::steady_clock::now();
        std::optional<fit::FitResult> single;
        std::optional<fit::ModelChoice> choice;
        const fit::FitResult* r = nullptr;
        if (std::string(mode) == "auto") {
          choice = fit::fit_auto({s});
          if (choice->chosen >= 0) r = &choice->candidates[std::size_t(choice->chosen)];
        } else {
          single = fit::fit_named({s}, Law::HerschelBulkley);
          if (single->converged()) r = &*single;
        }
        Tally& t = tallies[rig + " " + mode];
        t.seconds += std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        record(t, r, truth, t0);
        if (r == nullptr || !env) continue;
        for (const auto& p : r->parameters)
          if (p.name == "yield_stress" && p.upper_only)
            std::printf("  upper bound only %s %s k=%d: true %.4g %.4g %.4g: below %.4g\n", rig.c_str(), mode, k,
                        truth.yield_stress, truth.consistency, truth.flow_index, p.upper);
        for (const auto& p : r->parameters)
          if (p.name != "time_origin") {
            const double v = p.name == "yield_stress" ? truth.yield_stress
                             : p.name == "flow_index" ? truth.flow_index
                                                      : truth.consistency;
            if (!(p.lower <= v && v <= p.upper))
              std::printf("  miss %s %s k=%d %s true %.4g: %.4g [%.4g, %.4g]%s%s\n", rig.c_str(), mode, k,
                          p.name.c_str(), v, p.value, p.lower, p.upper, p.lower_open ? " lo-open" : "",
                          p.upper_open ? " hi-open" : "");
          }
      }
    }
  }
  for (const auto& [rig_name, t] : tallies) {
    const std::string& name = rig_name;  // a plain reference: clang 14 cannot capture a structured binding (INFO)
    std::printf("population coverage %s: %d fits, %d without a result, %d without a yield stress, %.2f s a fit\n",
                name.c_str(), t.fits, t.failed, t.no_yield_stress, t.seconds / t.fits);
    for (const auto& [param_name, n] : t.covered) {
      const std::string& param = param_name;
      const double rate = double(n) / t.reported.at(param);
      std::printf("  %s: %.3f over %d\n", param.c_str(), rate, t.reported.at(param));
      INFO(name << " " << param << ": " << rate);
      // 95% intervals: 0.92-0.98 of fits hold the truth. With 24 materials the binomial spread of a 0.95 rate is
      // about 0.045 (sd), so the band checked at this size is wider: 0.85 to 1.
      if (param != "time_origin") CHECK(rate >= (t.fits >= 96 ? 0.92 : 0.85));
    }
    CHECK(t.failed == 0);
    // A yield stress reported as an upper bound only is honest where the readings are consistent with none: a
    // soft, strongly shear-thinning paste (5-17 Pa, n 0.26-0.64 in the 48-material run) that a power law of flow
    // index near 0.1 mimics within the reading noise over 90 s. Measured with 48 materials: 4 of 48 on the
    // channel, 13 of 48 on the plate, each bound within a few pascals above the true value (the coverage above
    // counts them). A longer test, a second rig or the product's flow-index prior settles it.
    CHECK(t.no_yield_stress <= (name.rfind("channel", 0) == 0 ? t.fits / 8 : t.fits / 3));
  }
}
