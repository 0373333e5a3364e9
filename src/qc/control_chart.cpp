#include "src/qc/control_chart.hpp"
#include "src/fit/parameter_names.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

namespace spreadfit::qc {

namespace {

struct Limits {
  double centre, lower, upper, mean_moving_range;
};

Limits limits_of(const std::vector<double>& x) {
  const double n = double(x.size());
  Limits l{};
  l.centre = std::accumulate(x.begin(), x.end(), 0.0) / n;
  double mr = 0.0;
  for (std::size_t i = 1; i < x.size(); ++i) mr += std::abs(x[i] - x[i - 1]);
  l.mean_moving_range = mr / (n - 1);
  l.lower = l.centre - 2.66 * l.mean_moving_range;
  l.upper = l.centre + 2.66 * l.mean_moving_range;
  return l;
}

}  // namespace

std::size_t ControlChart::position(std::size_t i) const {
  // Left-out batches are sorted by position; point i takes the i-th free place.
  std::size_t place = i;
  for (const LeftOutBatch& b : left_out)
    if (b.position <= place) ++place;
  return place;
}

ControlChart individuals_chart(std::string parameter, std::string unit, std::vector<std::string> labels,
                               std::vector<double> values, int run_length, bool log_scale) {
  if (values.size() < 2) throw std::invalid_argument("a control chart needs at least two values");
  if (labels.size() != values.size()) throw std::invalid_argument("control chart: one label per value");
  if (log_scale && std::any_of(values.begin(), values.end(), [](double v) { return !(v > 0) || !std::isfinite(v); }))
    throw std::invalid_argument("control chart: a log scale needs positive, finite values");
  ControlChart c;
  c.parameter = std::move(parameter);
  c.unit = std::move(unit);
  c.labels = std::move(labels);
  c.values = std::move(values);
  c.run_length = run_length;
  c.log_scale = log_scale;
  std::vector<double> x = c.values;  // the values the limits are computed on
  if (log_scale)
    for (double& v : x) v = std::log(v);
  const Limits l = limits_of(x);
  c.mean_moving_range = l.mean_moving_range;
  c.centre = log_scale ? std::exp(l.centre) : l.centre;
  c.lower = log_scale ? std::exp(l.lower) : l.lower;
  c.upper = log_scale ? std::exp(l.upper) : l.upper;
  c.beyond_limits.resize(x.size());
  c.in_run.assign(x.size(), false);
  // Comparisons allow for rounding: equal values must not fall outside limits that collapsed onto them (a mean of
  // identical logarithms can differ from each in the last bit).
  double level = 0;
  for (double v : x) level = std::max(level, std::abs(v));
  const double slack = 1e-12 * std::max(1.0, level);
  for (std::size_t i = 0; i < x.size(); ++i) c.beyond_limits[i] = x[i] < l.lower - slack || x[i] > l.upper + slack;
  // Runs: consecutive points strictly on one side of the centre line.
  auto side = [&](std::size_t k) { return x[k] > l.centre + slack ? 1 : (x[k] < l.centre - slack ? -1 : 0); };
  std::size_t start = 0;
  for (std::size_t i = 1; i <= x.size(); ++i) {
    if (i == x.size() || side(i) != side(start) || side(i) == 0) {
      if (side(start) != 0 && i - start >= std::size_t(run_length))
        for (std::size_t k = start; k < i; ++k) c.in_run[k] = true;
      start = i;
    }
  }
  return c;
}

bool log_scale_suits(const std::string& parameter, const std::vector<double>& values, std::string& why) {
  const bool positive =
      !values.empty() && std::all_of(values.begin(), values.end(), [](double v) { return v > 0 && std::isfinite(v); });
  if (!positive) {
    why = "linear scale: not every value is positive";
    return false;
  }
  // K, the viscosity or consistency, spans decades between products and batches.
  const fit::ParameterInfo* p = fit::find_material_parameter(parameter);
  if (p && p->member == &Material::consistency) {
    why = "log scale: a " + parameter +
          " varies by factors (it is fitted as its logarithm), so the limits are "
          "set on the logarithms and stay positive";
    return true;
  }
  if (values.size() >= 2 && limits_of(values).lower <= 0) {
    why = "log scale: on a linear scale the lower control limit would fall to zero or below";
    return true;
  }
  why = "linear scale: the linear limits stay positive and the spec limits are linear";
  return false;
}

}  // namespace spreadfit::qc
