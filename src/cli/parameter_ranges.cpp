#include "src/cli/parameter_ranges.hpp"

#include <fmt/format.h>

#include <cmath>

#include "src/fit/parameter_names.hpp"
#include "src/io/input_error.hpp"

namespace spreadfit::cli {

namespace {

/// The SI value of one end: the assignments of `fixed`, the other ranges at their low ends and this one at `text`
/// go through parse_simulation_parameters, so units, ranges and names follow --set exactly. Its complaints about
/// this parameter are located at the --vary option as written.
double end_value(Law law, const std::vector<std::string>& fixed, const std::vector<ParameterRange>& ranges,
                 std::size_t which, const std::string& text, const std::string& field) {
  std::vector<std::string> assignments = fixed;
  for (std::size_t i = 0; i < ranges.size(); ++i)
    assignments.push_back(ranges[i].name + "=" + (i == which ? text : ranges[i].low));
  SimulationParameters p;
  try {
    p = parse_simulation_parameters(law, assignments);
  } catch (const io::InputError& e) {
    const std::string own = "--set " + ranges[which].name + "=";
    if (e.field().rfind(own, 0) == 0) throw io::InputError(std::string(command_line_source), 0, field, e.message());
    throw;
  }
  const std::string& name = ranges[which].name;
  return fit::material_value(p.material, name);
}

}  // namespace

std::vector<ParameterRange> parse_parameter_ranges(Law law, const std::vector<std::string>& fixed,
                                                   const std::vector<std::string>& vary) {
  const std::string where(command_line_source);
  std::vector<ParameterRange> ranges;
  std::vector<std::string> fields;
  for (const std::string& v : vary) {
    const std::string field = "--vary " + v;
    const auto eq = v.find('=');
    const auto colon = eq == std::string::npos ? std::string::npos : v.find(':', eq);
    if (eq == std::string::npos || colon == std::string::npos || eq == 0)
      throw io::InputError(where, 0, field, "expected PARAM=LOW:HIGH, such as yield_stress=\"20 Pa:35 Pa\"");
    ParameterRange r{v.substr(0, eq), v.substr(eq + 1, colon - eq - 1), v.substr(colon + 1)};
    if (r.name == "time_origin")
      throw io::InputError(where, 0, field,
                           "the release time is not a material parameter (expected a range of "
                           "yield_stress, viscosity, consistency or flow_index)");
    ranges.push_back(std::move(r));
    fields.push_back(field);
  }
  for (std::size_t i = 0; i < ranges.size(); ++i) {
    ranges[i].lo = end_value(law, fixed, ranges, i, ranges[i].low, fields[i]);
    ranges[i].hi = end_value(law, fixed, ranges, i, ranges[i].high, fields[i]);
    if (!(ranges[i].lo <= ranges[i].hi))
      throw io::InputError(where, 0, fields[i], "low is above high (expected PARAM=LOW:HIGH)");
  }
  return ranges;
}

SimulationParameters range_base(Law law, const std::vector<std::string>& fixed,
                                const std::vector<ParameterRange>& ranges) {
  std::vector<std::string> assignments = fixed;
  for (const ParameterRange& r : ranges) assignments.push_back(r.name + "=" + r.low);
  return parse_simulation_parameters(law, assignments);
}

void check_grid_points(int points, const std::string& option) {
  if (points < 2 || points > 25)
    throw io::InputError(std::string(command_line_source), 0, option,
                         fmt::format("{} points (expected 2 to 25)", points));
}

double range_value(const ParameterRange& range, double f) {
  if (range.name == "flow_index" || range.lo <= 0) return range.lo + f * (range.hi - range.lo);
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
