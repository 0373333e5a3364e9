#include "src/cli/command_line_values.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <optional>
#include <stdexcept>

#include "src/fit/parameter_names.hpp"
#include "src/io/input_error.hpp"
#include "src/io/parameter_table.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/text.hpp"

namespace spreadfit::cli {

namespace {

using io::Dimension;
using io::InputError;
using io::Parameter;
using io::Range;

[[noreturn]] void fail(const std::string& field, const std::string& message) {
  throw InputError(std::string(command_line_source), 0, field, message);
}

bool law_takes(Law law, Parameter id) {
  const auto own = io::law_parameters(law);
  return std::find(own.begin(), own.end(), id) != own.end();
}

/// The names of the parameters `law` takes on the command line: its own, then time_origin.
std::vector<std::string_view> accepted_parameters(Law law) {
  std::vector<std::string_view> names;
  for (Parameter id : io::law_parameters(law)) names.push_back(io::parameter_name(id));
  names.push_back(io::parameter_name(Parameter::TimeOrigin));
  return names;
}

/// "yield_stress, viscosity and optionally time_origin"
std::string takes_text(Law law) {
  std::string out;
  for (Parameter id : io::law_parameters(law))
    out += (out.empty() ? "" : ", ") + std::string(io::parameter_name(id));
  return out + " and optionally " + std::string(io::parameter_name(Parameter::TimeOrigin));
}

/// Refuses a value no sauce or cream has (a viscosity of 1e-300 Pa.s) instead of simulating it. The flow index is
/// left to the law's own bound (validate), whose message names the parameter.
void check_plausible_input(const io::ParameterInfo& row, double value, std::string_view as_written) {
  if (row.plausible && row.id != Parameter::FlowIndex) (void)io::check_plausible(value, *row.plausible, as_written);
}

}  // namespace

double parse_value(std::string_view text, Dimension dimension, Range range) {
  double value = 0;
  try {
    value = io::parse_number(text);
  } catch (const io::UnitError&) {
    // Not a bare number: a quantity with a unit, whose parser explains what is wrong.
    return io::parse_quantity(text, dimension, range);
  }
  io::check_range(value, dimension, range, io::trim(text));
  return value;
}

Law parse_simulation_model(std::string_view name) {
  std::vector<std::string_view> names;
  for (Law law : all_laws()) names.push_back(law_name(law));
  if (auto law = law_from_name(name)) return *law;
  if (name == "auto")
    fail("--model", "'auto' chooses a model by fitting readings, which simulate does not do (expected one of: " +
                        io::join_names(names) + ")");
  fail("--model", "unknown model '" + std::string(name) + "'" + io::did_you_mean(name, names));
}

SimulationParameters parse_simulation_parameters(Law law, const std::vector<std::string>& assignments) {
  const std::vector<std::string_view> accepted = accepted_parameters(law);
  const std::string model(law_name(law));

  struct Given {
    Parameter id;
    double value;
    std::string field;  ///< "--set PARAM=VALUE" as written
  };
  std::vector<Given> given;
  for (const std::string& assignment : assignments) {
    const std::string field = "--set " + assignment;
    const std::size_t equals = assignment.find('=');
    if (equals == std::string::npos || io::trim(std::string_view(assignment).substr(0, equals)).empty())
      fail(field, "expected PARAM=VALUE, such as viscosity=\"1.2 Pa.s\" (parameters of model " + model + ": " +
                      takes_text(law) + ")");
    const std::string name(io::trim(std::string_view(assignment).substr(0, equals)));
    const std::string_view value_text = std::string_view(assignment).substr(equals + 1);

    const std::optional<Parameter> id = io::parameter_from_name(name);
    if (!id) fail(field, "unknown parameter '" + name + "'" + io::did_you_mean(name, accepted));
    if (std::find(accepted.begin(), accepted.end(), name) == accepted.end()) {
      std::string hint;
      if (*id == Parameter::Consistency && law_takes(law, Parameter::Viscosity))
        hint = "; for model " + model + " give K as 'viscosity'";
      if (*id == Parameter::Viscosity && law_takes(law, Parameter::Consistency))
        hint = "; for model " + model + " give K as 'consistency' (the viscosity when flow_index = 1)";
      fail(field, "model " + model + " has no parameter '" + name + "' (it takes " + takes_text(law) + ")" + hint);
    }
    for (const Given& g : given)
      if (g.id == *id) fail(field, "'" + name + "' is set twice (expected each parameter once)");

    const io::ParameterInfo& row = io::parameter_info(*id);
    double value = 0;
    try {
      value = parse_value(value_text, row.dimension, row.input_sign);
      check_plausible_input(row, value, io::trim(value_text));
    } catch (const io::UnitError& e) {
      fail(field, std::string(e.what()));
    }
    given.push_back({*id, value, field});
  }

  SimulationParameters out;
  out.law = law;
  out.material.yield_stress = 0.0;
  out.material.flow_index = 1.0;
  for (Parameter id : io::law_parameters(law)) {
    const io::ParameterInfo& row = io::parameter_info(id);
    const auto it = std::find_if(given.begin(), given.end(), [&](const Given& g) { return g.id == id; });
    if (it == given.end()) {
      const bool dimensionless = row.dimension == Dimension::Dimensionless;
      const std::string si =
          dimensionless ? std::string() : fmt::format(" or a number in {}", io::si_unit_symbol(row.dimension));
      const std::string example =
          dimensionless ? std::string(row.input_example) : fmt::format("\"{}\"", row.input_example);
      fail("--set", fmt::format("missing parameter '{0}' for model {1} (it takes {2}; expected --set {0}=VALUE, such "
                                "as {0}={3}{4})",
                                row.name, model, takes_text(law), example, si));
    }
    out.material.*row.member = it->value;
  }
  for (const Given& g : given)
    if (g.id == Parameter::TimeOrigin) out.time_origin = g.value;

  try {
    validate(out.material);
  } catch (const std::invalid_argument& e) {
    // The message starts with the parameter's name: point at the assignment that set it.
    const std::string what = e.what();
    for (const Given& g : given)
      if (what.rfind(std::string(io::parameter_name(g.id)) + " ", 0) == 0) fail(g.field, what);
    fail("--set", what);
  }
  return out;
}

std::vector<double> parse_times(std::string_view list) {
  std::vector<double> times;
  std::size_t start = 0;
  for (int entry = 1;; ++entry) {
    const std::size_t comma = list.find(',', start);
    const std::string_view text = io::trim(list.substr(start, comma == std::string_view::npos ? comma : comma - start));
    if (text.empty())
      fail("--times", fmt::format("entry {} is empty (expected times separated by commas, such as 0.5,1,2,5)", entry));
    double t = 0;
    try {
      t = parse_value(text, Dimension::Time, Range::NonNegative);
    } catch (const io::UnitError& e) {
      fail("--times", fmt::format("entry {}: {}", entry, e.what()));
    }
    if (!times.empty() && !(t > times.back()))
      fail("--times", fmt::format("entry {}: '{}' is not after the entry before it, {} s (expected strictly "
                                  "increasing times)",
                                  entry, text, times.back()));
    // Simulated times may run to the arrest (1e5 s and more), far past a reading's day, but not without bound.
    if (t > max_simulated_time)
      fail("--times", fmt::format("entry {}: '{}' is after {:g} s (expected a time of at most {:g} s)", entry,
                                  io::shorten_for_message(text), max_simulated_time, max_simulated_time));
    if (times.size() >= max_times)
      fail("--times", fmt::format("more than {} times (expected at most {})", max_times, max_times));
    times.push_back(t);
    if (comma == std::string_view::npos) break;
    start = comma + 1;
  }
  return times;
}

double parse_one_time(const std::string& text, const std::string& option) {
  std::vector<double> t;
  try {
    t = parse_times(text);
  } catch (const io::InputError& e) {
    // parse_times names "--times": relocate its complaint to the option given.
    fail(option, e.message());
  }
  if (t.size() != 1) fail(option, "expected one time");
  return t.front();
}

std::pair<double, double> parse_reading_limits(const std::string& text) {
  const auto colon = text.find(':');
  if (colon == std::string::npos) fail("--between", "expected LOW:HIGH reading limits, such as \"5.5 cm:8 cm\"");
  double low = 0, high = 0;
  try {
    low = parse_value(text.substr(0, colon), Dimension::Length, Range::NonNegative);
    high = parse_value(text.substr(colon + 1), Dimension::Length, Range::NonNegative);
  } catch (const io::UnitError& e) {
    fail("--between", e.what());
  }
  if (!(low <= high)) fail("--between", "low is above high (expected LOW:HIGH)");
  return {low, high};
}

std::vector<double> default_times(const io::TestDescription& test) {
  if (!test.series.empty()) return test.series.front().times;
  if (!rig_is_timed(test.setup.rig)) return {default_last_time};
  std::vector<double> times(default_time_count);
  const double ratio = default_last_time / default_first_time;
  const int last = default_time_count - 1;
  for (int i = 0; i <= last; ++i)
    times[static_cast<std::size_t>(i)] = default_first_time * std::pow(ratio, static_cast<double>(i) / last);
  times.front() = default_first_time;  // the ends exactly as documented, whatever pow rounds to
  times.back() = default_last_time;
  return times;
}

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
    if (e.field().rfind(own, 0) == 0) fail(field, e.message());
    throw;
  }
  return fit::material_value(p.material, ranges[which].name);
}

}  // namespace

std::vector<ParameterRange> parse_parameter_ranges(Law law, const std::vector<std::string>& fixed,
                                                   const std::vector<std::string>& vary) {
  std::vector<ParameterRange> ranges;
  std::vector<std::string> fields;
  for (const std::string& v : vary) {
    const std::string field = "--vary " + v;
    const auto eq = v.find('=');
    const auto colon = eq == std::string::npos ? std::string::npos : v.find(':', eq);
    if (eq == std::string::npos || colon == std::string::npos || eq == 0)
      fail(field, "expected PARAM=LOW:HIGH, such as yield_stress=\"20 Pa:35 Pa\"");
    ParameterRange r{v.substr(0, eq), v.substr(eq + 1, colon - eq - 1), v.substr(colon + 1)};
    if (io::is_parameter(r.name, Parameter::TimeOrigin))
      fail(field,
           "the release time is not a material parameter (expected a range of "
           "yield_stress, viscosity, consistency or flow_index)");
    ranges.push_back(std::move(r));
    fields.push_back(field);
  }
  for (std::size_t i = 0; i < ranges.size(); ++i) {
    ranges[i].lo = end_value(law, fixed, ranges, i, ranges[i].low, fields[i]);
    ranges[i].hi = end_value(law, fixed, ranges, i, ranges[i].high, fields[i]);
    if (!(ranges[i].lo <= ranges[i].hi)) fail(fields[i], "low is above high (expected PARAM=LOW:HIGH)");
  }
  return ranges;
}

SimulationParameters range_base(Law law, const std::vector<std::string>& fixed,
                                const std::vector<ParameterRange>& ranges) {
  std::vector<std::string> assignments = fixed;
  for (const ParameterRange& r : ranges) assignments.push_back(r.name + "=" + r.low);
  return parse_simulation_parameters(law, assignments);
}

}  // namespace spreadfit::cli
