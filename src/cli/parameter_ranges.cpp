#include "src/cli/parameter_ranges.hpp"

#include <fmt/format.h>

#include <cmath>

#include "src/fit/parameter_names.hpp"
#include "src/io/input_error.hpp"

namespace spreadfit::cli {

void check_grid_points(int points, const std::string& option) {
  if (points < 2 || points > 25)
    throw io::InputError(std::string(command_line_source), 0, option,
                         fmt::format("{} points (expected 2 to 25)", points));
}

bool log_spaced(const ParameterRange& range) {
  return !io::is_parameter(range.name, io::Parameter::FlowIndex) && range.lo > 0;
}

double range_value(const ParameterRange& range, double f) {
  if (!log_spaced(range)) return range.lo + f * (range.hi - range.lo);
  return range.lo * std::pow(range.hi / range.lo, f);
}

std::vector<GridPoint> parameter_grid(const Material& base, const std::vector<ParameterRange>& ranges, int points) {
  const std::size_t k = ranges.size();
  std::vector<GridPoint> grid;
  std::vector<int> index(k, 0);
  // Odometer over points^k combinations; ends when the last digit wraps (bounded by points^k iterations).
  while (true) {
    GridPoint g{base, index};
    for (std::size_t d = 0; d < k; ++d)
      g.material =
          fit::with_parameter(g.material, ranges[d].name, range_value(ranges[d], double(index[d]) / double(points - 1)));
    grid.push_back(std::move(g));
    std::size_t d = 0;
    while (d < k && ++index[d] == points) index[d++] = 0;
    if (d == k) break;
  }
  return grid;
}

}  // namespace spreadfit::cli
