// `spreadfit simulate`: the forward model alone (README). Reads a test description for the rig, the
// sample's density and the reading, takes the material from the command line, and writes the predicted readings
// as CSV:
//
//   spreadfit simulate TEST.toml --model NAME --set PARAM=VALUE... [--times T1,T2,...]
//
//   time [s],front [m]        <- header: the reading the description names (or the rig's own)
//   0.5,0.0123...             <- one row per time; numbers in SI, shortest form that reads back to the same double
//
// Parameters (--set, one PARAM=VALUE each, repeated or several after one --set) as
// src/cli/command_line_values.hpp reads them: each model takes exactly its own, and time_origin optionally.
// With time_origin t0 (the release, on the clock the times are given on) the model is evaluated at max(t - t0, 0).
//
// Times: --times (numbers in s or quantities, >= 0, strictly increasing); otherwise the times of the first
// readings file; otherwise default_times() (command_line_values.hpp).
//
// Bad input throws io::InputError, located at "command line" with the option as the field, or at the test
// description. A failed solve is reported on `err` and gives ExitCode::NumericalFailure with nothing on `out`.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "models/rig.hpp"
#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

/// The simulate subcommand's arguments as written on the command line.
struct SimulateCommandOptions {
  std::filesystem::path test;        ///< test description (TOML)
  std::string model;                 ///< --model: newtonian | power-law | bingham | herschel-bulkley
  std::vector<std::string> set;      ///< --set: PARAM=VALUE each
  std::optional<std::string> times;  ///< --times: "T1,T2,..."; nullopt = from the readings or the default
};

/// The CSV simulate writes: header "time [s],<reading> [m]", then "t,r" per row, numbers as fmt "{}".
std::string simulation_csv(Reading reading, const std::vector<double>& times, const std::vector<double>& readings);

/// Runs the subcommand: CSV on `out`, forward-model notes ("note: ...") and failures on `err`. Returns
/// ExitCode::Done, or ExitCode::NumericalFailure when the solve fails. Throws io::InputError for bad input.
int run_simulate_command(const SimulateCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit simulate` and its options on `app`.
CommandRegistration add_simulate_command(CLI::App& app);

}  // namespace spreadfit::cli
