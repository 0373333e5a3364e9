#include "src/fit/design_check.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

#include "src/fit/fit_law.hpp"
#include "src/fit/parameter_names.hpp"
#include "src/fit/synthetic_readings.hpp"
#include "src/fit/expected_intervals.hpp"

namespace spreadfit::fit {

namespace {

double parameter_of(const Material& m, const std::string& name) { return material_value(m, name); }

}  // namespace

DesignCheck check_design(const TestSetup& setup, Law law, const Material& truth, const std::vector<double>& times,
                         double sigma, int replicates, unsigned first_seed, const FitOptions& options) {
  if (replicates < 1) throw std::invalid_argument("replicates: expected at least 1");
  if (!(sigma > 0)) throw std::invalid_argument("sigma: expected a reading uncertainty > 0");
  DesignCheck out;
  const DesignEstimate plan =
      expected_intervals(setup, law, truth, times, sigma, options.fit_time_origin, options.forward);
  out.names = plan.names;
  if (plan.ok)
    out.planned_ratio = plan.interval_ratio;
  else
    out.message = plan.message;
  out.replicates = replicates;

  std::vector<std::vector<double>> logs(out.names.size());
  for (int k = 0; k < replicates; ++k) {
    const FitSeries data = synthetic_readings(setup, truth, times, sigma, first_seed + unsigned(k));
    if (data.values.size() != times.size()) continue;  // the truth's own solve failed: nothing to refit
    const FitResult r = fit_law({data}, law, options);
    if (!r.converged()) continue;
    ++out.converged;
    for (std::size_t i = 0; i < out.names.size(); ++i)
      logs[i].push_back(std::log(parameter_of(r.material, out.names[i])));
  }
  for (const std::vector<double>& v : logs) {
    if (v.size() < 2) {
      out.empirical_ratio.push_back(std::numeric_limits<double>::quiet_NaN());
      continue;
    }
    double mean = 0, var = 0;
    for (double x : v) mean += x / double(v.size());
    for (double x : v) var += (x - mean) * (x - mean) / double(v.size() - 1);
    out.empirical_ratio.push_back(std::exp(2 * 1.96 * std::sqrt(var)));
  }
  return out;
}

}  // namespace spreadfit::fit
