#include "src/cli/simulate_command.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <stdexcept>
#include <string>
#include <memory>

#include "models/forward.hpp"
#include "src/cli/command_line_values.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/io/description_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/readings_csv.hpp"
#include "src/cli/path_option.hpp"

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

CommandRegistration add_simulate_command(CLI::App& app) {
  struct Given {
    SimulateCommandOptions options;
    std::string test, times;
    CLI::Option* times_option = nullptr;
  };
  const auto given = std::make_shared<Given>();
  CLI::App* simulate = app.add_subcommand(
      "simulate", "Predict a test's readings for a given material (the forward model alone); CSV on stdout.");
  simulate->add_option("TEST.toml", given->test, "Test description (TOML): rig, density and reading")
      ->required()
      ->type_name("");
  simulate->add_option("--model", given->options.model, "Model: " + std::string(model_names_help))
      ->required()
      ->type_name("NAME");
  simulate
      ->add_option("--set", given->options.set,
                   "PARAM=VALUE: viscosity [Pa s], yield_stress [Pa], consistency [Pa s^n], flow_index [-], "
                   "time_origin [s]; VALUE in SI or with a unit, e.g. yield_stress=\"25 Pa\"")
      ->type_name("PARAM=VALUE");
  given->times_option =
      simulate
          ->add_option("--times", given->times,
                       fmt::format("Times to simulate, in s or with a unit (default: the readings' times, else "
                                   "{} spaced in log t from {} s to {} s; a slump rig: {} s)",
                                   default_time_count, default_first_time, default_last_time, default_last_time))
          ->type_name("T1,T2,...");
  simulate->footer(std::string(exit_codes_without_spec));
  return {simulate, [given](std::ostream& out, std::ostream& err) {
            SimulateCommandOptions options = given->options;
            options.test = given->test;
            options.times = given_text(given->times_option, given->times);
            return run_simulate_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
