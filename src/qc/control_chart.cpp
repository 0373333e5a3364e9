#include "src/qc/control_chart.hpp"

#include <cmath>
#include <numeric>
#include <stdexcept>

namespace spreadfit {

ControlChart individuals_chart(std::string parameter, std::string unit, std::vector<std::string> labels,
                               std::vector<double> values, int run_length) {
  if (values.size() < 2) throw std::invalid_argument("a control chart needs at least two values");
  if (labels.size() != values.size()) throw std::invalid_argument("control chart: one label per value");
  ControlChart c;
  c.parameter = std::move(parameter);
  c.unit = std::move(unit);
  c.labels = std::move(labels);
  c.values = std::move(values);
  c.run_length = run_length;
  const double n = double(c.values.size());
  c.centre = std::accumulate(c.values.begin(), c.values.end(), 0.0) / n;
  double mr = 0.0;
  for (std::size_t i = 1; i < c.values.size(); ++i) mr += std::abs(c.values[i] - c.values[i - 1]);
  c.mean_moving_range = mr / (n - 1);
  c.lower = c.centre - 2.66 * c.mean_moving_range;
  c.upper = c.centre + 2.66 * c.mean_moving_range;
  c.beyond_limits.resize(c.values.size());
  c.in_run.assign(c.values.size(), false);
  for (std::size_t i = 0; i < c.values.size(); ++i) c.beyond_limits[i] = c.values[i] < c.lower || c.values[i] > c.upper;
  // Runs: consecutive points strictly on one side of the centre line.
  std::size_t start = 0;
  for (std::size_t i = 1; i <= c.values.size(); ++i) {
    auto side = [&](std::size_t k) { return c.values[k] > c.centre ? 1 : (c.values[k] < c.centre ? -1 : 0); };
    if (i == c.values.size() || side(i) != side(start) || side(i) == 0) {
      if (side(start) != 0 && i - start >= std::size_t(run_length))
        for (std::size_t k = start; k < i; ++k) c.in_run[k] = true;
      start = i;
    }
  }
  return c;
}

}  // namespace spreadfit
