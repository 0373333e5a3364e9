#include "src/cli/translate_command.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <limits>

#include "models/forward.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/cli/simulate_command.hpp"
#include "src/io/input_error.hpp"
#include "src/io/test_description.hpp"

namespace spreadfit::cli {

namespace {

struct Range {
  std::string name;
  std::string low, high;  // as written
  double lo = 0, hi = 0;  // SI
};

// The SI value of PARAM=TEXT, converted by the same rules as --set (units, ranges, names).
double value_of(Law law, const std::vector<std::string>& fixed, const std::vector<Range>& ranges,
                const std::string& name, const std::string& text) {
  std::vector<std::string> assignments = fixed;
  for (const Range& r : ranges) assignments.push_back(r.name + "=" + (r.name == name ? text : r.low));
  const SimulationParameters p = parse_simulation_parameters(law, assignments);
  if (name == "yield_stress") return p.material.yield_stress;
  if (name == "flow_index") return p.material.flow_index;
  return p.material.consistency;
}

}  // namespace

int run_translate_command(const TranslateCommandOptions& options, std::ostream& out, std::ostream& err) {
  const std::string where(command_line_source);
  if (options.points < 2 || options.points > 25)
    throw io::InputError(where, 0, "--points", fmt::format("{} points (expected 2 to 25)", options.points));
  const Law law = parse_simulation_model(options.model);
  const std::vector<double> at = parse_times(options.at);
  if (at.size() != 1) throw io::InputError(where, 0, "--at", "expected one time");
  if (options.vary.empty()) throw io::InputError(where, 0, "--vary", "expected at least one PARAM=LOW:HIGH");
  std::vector<Range> ranges;
  for (const std::string& v : options.vary) {
    const auto eq = v.find('='), colon = v.find(':', eq == std::string::npos ? 0 : eq);
    if (eq == std::string::npos || colon == std::string::npos)
      throw io::InputError(where, 0, "--vary " + v, "expected PARAM=LOW:HIGH, such as yield_stress=\"20 Pa:35 Pa\"");
    ranges.push_back({v.substr(0, eq), v.substr(eq + 1, colon - eq - 1), v.substr(colon + 1)});
  }
  for (Range& r : ranges) {
    r.lo = value_of(law, options.set, ranges, r.name, r.low);
    r.hi = value_of(law, options.set, ranges, r.name, r.high);
    if (!(r.lo <= r.hi))
      throw io::InputError(where, 0, "--vary " + r.name, "low is above high (expected PARAM=LOW:HIGH)");
  }
  std::vector<std::string> base = options.set;
  for (const Range& r : ranges) base.push_back(r.name + "=" + r.low);
  const SimulationParameters nominal = parse_simulation_parameters(law, base);
  const io::TestDescription test = io::load_test_description(options.test);
  TestSetup setup = test.setup;
  if (!test.series.empty()) setup.reading = test.series.front().kind;

  // Grid over the varied parameters: odometer over points^k combinations.
  const int k = int(ranges.size());
  std::vector<int> index(std::size_t(k), 0);
  double low = std::numeric_limits<double>::infinity(), high = -low;
  int solves = 0;
  const std::vector<double> when{std::max(at.front() - nominal.time_origin, 0.0)};
  while (true) {
    Material m = nominal.material;
    for (int d = 0; d < k; ++d) {
      const Range& r = ranges[std::size_t(d)];
      const double f = double(index[std::size_t(d)]) / (options.points - 1);
      const double v = r.name == "flow_index" || r.lo <= 0 ? r.lo + f * (r.hi - r.lo)
                                                           : r.lo * std::pow(r.hi / r.lo, f);
      if (r.name == "yield_stress") m.yield_stress = v;
      else if (r.name == "flow_index") m.flow_index = v;
      else m.consistency = v;
    }
    const ForwardResult res = predict_readings(setup, m, when);
    ++solves;
    if (!res.ok()) {
      err << fmt::format("spreadfit: {}: the forward model failed inside the ranges ({}); no limits written\n",
                         options.test.string(), res.message);
      return to_int(ExitCode::NumericalFailure);
    }
    low = std::min(low, res.readings.front());
    high = std::max(high, res.readings.front());
    int d = 0;
    while (d < k && ++index[std::size_t(d)] == options.points) index[std::size_t(d++)] = 0;
    if (d == k) break;
  }
  const std::string reading(reading_name(setup.reading));
  std::string over;
  for (const Range& r : ranges) over += fmt::format("{}{} {}..{}", over.empty() ? "" : ", ", r.name, r.low, r.high);
  out << fmt::format("{} at {} s on {}: between {:.4g} m and {:.4g} m over {} ({} forward solves)\n", reading,
                     at.front(), io::rig_kind_name(setup.rig), low, high, over, solves);
  out << "reading,unit,time [s],low,high\n" << fmt::format("{},m,{},{},{}\n", reading, at.front(), low, high);
  return to_int(ExitCode::Done);
}

}  // namespace spreadfit::cli
