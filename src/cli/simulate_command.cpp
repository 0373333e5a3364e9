#include "src/cli/simulate_command.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <stdexcept>
#include <string>

#include "models/forward.hpp"
#include "src/cli/command_line_values.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/io/description_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/readings_csv.hpp"

namespace spreadfit::cli {

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
    throw io::InputError(test.path.string(), 0, "", e.what());
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
