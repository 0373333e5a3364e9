#include "src/cli/simulate_command.hpp"

#include "src/fit/parameter_names.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <stdexcept>
#include <string>
#include <variant>

#include "models/forward.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/io/input_error.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/readings_csv.hpp"
#include "src/io/text.hpp"
#include "src/io/units.hpp"

namespace spreadfit::cli {

namespace {

using io::Dimension;
using io::InputError;
using io::Range;

/// One --set parameter: its interface name, what it measures, its allowed signs and a value to show.
struct ParameterSpec {
  std::string_view name;
  Dimension dimension;
  Range range;
  std::string_view example;
};

// time_origin may take any sign: a fit can place the release before the clock's zero, and its result is meant to
// be pasted back here.
constexpr ParameterSpec kParameters[] = {
    {"viscosity", Dimension::Viscosity, Range::Positive, "1.2 Pa.s"},
    {"yield_stress", Dimension::Stress, Range::NonNegative, "25 Pa"},
    {"consistency", Dimension::Consistency, Range::Positive, "8 Pa.s^n"},
    {"flow_index", Dimension::Dimensionless, Range::Positive, "0.5"},
    {"time_origin", Dimension::Time, Range::Any, "2 s"},
};
constexpr std::string_view kTimeOrigin = "time_origin";

const ParameterSpec* find_parameter(std::string_view name) {
  for (const ParameterSpec& p : kParameters)
    if (p.name == name) return &p;
  return nullptr;
}

/// The parameters `law` takes on the command line: its own, then time_origin.
std::vector<std::string_view> accepted_parameters(const std::vector<std::string>& own) {
  std::vector<std::string_view> names(own.begin(), own.end());
  names.push_back(kTimeOrigin);
  return names;
}

/// "yield_stress, viscosity and optionally time_origin"
std::string takes_text(const std::vector<std::string>& own) {
  std::string out;
  for (std::size_t i = 0; i < own.size(); ++i) out += (i > 0 ? ", " : "") + own[i];
  return out + " and optionally time_origin";
}

[[noreturn]] void fail(const std::string& field, const std::string& message) {
  throw InputError(std::string(command_line_source), 0, field, message);
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
  const std::vector<std::string> own = law_parameter_names(law);
  const std::vector<std::string_view> accepted = accepted_parameters(own);
  const std::string model(law_name(law));

  struct Given {
    std::string name;
    double value;
    std::string field;  ///< "--set PARAM=VALUE" as written
  };
  std::vector<Given> given;
  for (const std::string& assignment : assignments) {
    const std::string field = "--set " + assignment;
    const std::size_t equals = assignment.find('=');
    if (equals == std::string::npos || io::trim(std::string_view(assignment).substr(0, equals)).empty())
      fail(field, "expected PARAM=VALUE, such as viscosity=\"1.2 Pa.s\" (parameters of model " + model + ": " +
                      takes_text(own) + ")");
    const std::string name(io::trim(std::string_view(assignment).substr(0, equals)));
    const std::string_view value_text = std::string_view(assignment).substr(equals + 1);

    const ParameterSpec* spec = find_parameter(name);
    if (!spec) fail(field, "unknown parameter '" + name + "'" + io::did_you_mean(name, accepted));
    if (std::find(accepted.begin(), accepted.end(), name) == accepted.end()) {
      std::string hint;
      if (name == "consistency" && law_has_parameter(law, "viscosity"))
        hint = "; for model " + model + " give K as 'viscosity'";
      if (name == "viscosity" && law_has_parameter(law, "consistency"))
        hint = "; for model " + model + " give K as 'consistency' (the viscosity when flow_index = 1)";
      fail(field, "model " + model + " has no parameter '" + name + "' (it takes " + takes_text(own) + ")" + hint);
    }
    for (const Given& g : given)
      if (g.name == name) fail(field, "'" + name + "' is set twice (expected each parameter once)");

    double value = 0;
    try {
      value = parse_value(value_text, spec->dimension, spec->range);
      // A material no sauce or cream has (a viscosity of 1e-300 Pa.s) is refused, not simulated.
      const io::PlausibleRange* range = name == "viscosity"      ? &io::plausible::viscosity
                                        : name == "consistency"  ? &io::plausible::consistency
                                        : name == "yield_stress" ? &io::plausible::yield_stress
                                                                 : nullptr;
      if (range) (void)io::check_plausible(value, *range, io::trim(value_text));
    } catch (const io::UnitError& e) {
      fail(field, std::string(e.what()));
    }
    given.push_back({name, value, field});
  }

  SimulationParameters out;
  out.law = law;
  out.material.yield_stress = 0.0;
  out.material.flow_index = 1.0;
  for (const std::string& name : own) {
    const auto it = std::find_if(given.begin(), given.end(), [&](const Given& g) { return g.name == name; });
    if (it == given.end()) {
      const ParameterSpec& spec = *find_parameter(name);
      const std::string si = spec.dimension == Dimension::Dimensionless
                                 ? std::string()
                                 : " or a number in " + std::string(io::si_unit_symbol(spec.dimension));
      const std::string example = spec.dimension == Dimension::Dimensionless ? std::string(spec.example)
                                                                             : "\"" + std::string(spec.example) + "\"";
      fail("--set", "missing parameter '" + name + "' for model " + model + " (it takes " + takes_text(own) +
                        "; expected --set " + name + "=VALUE, such as " + name + "=" + example + si + ")");
    }
    out.material = fit::with_parameter(out.material, name, it->value);
  }
  for (const Given& g : given)
    if (g.name == kTimeOrigin) out.time_origin = g.value;

  try {
    validate(out.material);
  } catch (const std::invalid_argument& e) {
    // The message starts with the parameter's name: point at the assignment that set it.
    const std::string what = e.what();
    for (const Given& g : given)
      if (what.rfind(g.name + " ", 0) == 0) fail(g.field, what);
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

std::string simulation_csv(Reading reading, const std::vector<double>& times, const std::vector<double>& readings) {
  if (times.size() != readings.size())
    throw std::logic_error(fmt::format("simulation_csv: {} times but {} readings", times.size(), readings.size()));
  std::string csv = fmt::format("time [s],{} [m]\n", io::reading_names()[static_cast<std::size_t>(reading)]);
  for (std::size_t i = 0; i < times.size(); ++i) csv += fmt::format("{},{}\n", times[i], readings[i]);
  return csv;
}

int run_simulate_command(const SimulateCommandOptions& options, std::ostream& out, std::ostream& err) {
  // The command line first (cheap, and its errors do not depend on the file), then the description.
  const Law law = parse_simulation_model(options.model);
  const SimulationParameters parameters = parse_simulation_parameters(law, options.set);
  std::vector<double> times;
  if (options.times) times = parse_times(*options.times);
  const io::TestDescription test = io::load_test_description(options.test);
  if (!options.times) times = default_times(test);

  std::vector<double> model_times(times.size());
  std::transform(times.begin(), times.end(), model_times.begin(),
                 [&](double t) { return std::max(t - parameters.time_origin, 0.0); });

  ForwardResult result;
  try {
    result = predict_readings(test.setup, parameters.material, model_times);
  } catch (const std::invalid_argument& e) {
    // The forward model refuses a rig or material the input layer let through: still bad input, in this file.
    throw InputError(test.path.string(), 0, "", e.what());
  }

  for (const std::string& note : result.notes) err << "note: " << note << '\n';
  const std::string source = test.path.string();
  if (!result.ok()) {
    err << fmt::format("spreadfit: {}: simulation failed after {} steps: {} (no readings written)\n", source,
                       result.steps, result.message.empty() ? "no reason given" : result.message);
    return to_int(ExitCode::NumericalFailure);
  }
  if (result.readings.size() != times.size())
    throw std::logic_error(
        fmt::format("forward model returned {} readings for {} times", result.readings.size(), times.size()));
  for (std::size_t i = 0; i < times.size(); ++i)
    if (!std::isfinite(result.readings[i])) {
      err << fmt::format(
          "spreadfit: {}: simulation failed: the reading at t = {} s is not finite (no readings "
          "written)\n",
          source, times[i]);
      return to_int(ExitCode::NumericalFailure);
    }

  out << simulation_csv(test.setup.reading, times, result.readings);
  out.flush();
  return to_int(ExitCode::Done);
}

}  // namespace spreadfit::cli
