// `spreadfit simulate`: the forward model alone (README). Reads a test description for the rig, the
// sample's density and the reading, takes the material from the command line, and writes the predicted readings
// as CSV:
//
//   spreadfit simulate TEST.toml --model NAME --set PARAM=VALUE... [--times T1,T2,...]
//
//   time [s],front [m]        <- header: the reading the description names (or the rig's own)
//   0.5,0.0123...             <- one row per time; numbers in SI, shortest form that reads back to the same double
//
// Parameters (--set, one PARAM=VALUE each, repeated or several after one --set):
//   viscosity [Pa s], yield_stress [Pa], consistency [Pa s^n], flow_index [-], time_origin [s].
// VALUE is a number in SI units or a quantity with a unit ("25 Pa", "800 mPa.s", "12 Pa.s^n", "2 s").
// Each model takes exactly its own parameters, and time_origin optionally (default 0; any sign):
//   newtonian: viscosity          power-law: consistency, flow_index
//   bingham: yield_stress, viscosity     herschel-bulkley: yield_stress, consistency, flow_index
// With time_origin t0 (the release, on the clock the times are given on) the model is evaluated at max(t - t0, 0).
//
// Times: --times (numbers in s or quantities, >= 0, strictly increasing); otherwise the times of the first
// readings file; otherwise default_times().
//
// Bad input throws io::InputError, located at "command line" with the option as the field, or at the test
// description. A failed solve is reported on `err` and gives ExitCode::NumericalFailure with nothing on `out`.
#pragma once

#include <cstddef>

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "models/rheology.hpp"
#include "models/rig.hpp"
#include "src/io/description_file.hpp"
#include "src/io/units.hpp"

namespace spreadfit::cli {

/// The simulate subcommand's arguments as written on the command line.
struct SimulateCommandOptions {
  std::filesystem::path test;        ///< test description (TOML)
  std::string model;                 ///< --model: newtonian | power-law | bingham | herschel-bulkley
  std::vector<std::string> set;      ///< --set: PARAM=VALUE each
  std::optional<std::string> times;  ///< --times: "T1,T2,..."; nullopt = from the readings or the default
};

/// What --model and --set give: the law, its material in SI units and the release time.
struct SimulationParameters {
  Law law = Law::Newtonian;
  Material material;
  double time_origin = 0.0;  ///< [s]
};

/// The "file" InputErrors about options are located in.
inline constexpr std::string_view command_line_source = "command line";
/// Most times one --times list (or a plan candidate's --every/--until) may hold: bounds the work and the memory.
inline constexpr std::size_t max_times = 5000;
/// Latest simulated time [s], about four months: past any arrest the models reach (common practice, no source).
inline constexpr double max_simulated_time = 1e7;

/// The law a --model name denotes (exact, lower case). Throws io::InputError for 'auto' and unknown names, with
/// the nearest valid name.
Law parse_simulation_model(std::string_view name);

/// The material and time origin of PARAM=VALUE assignments for `law`. Throws io::InputError naming the
/// assignment for a malformed one, an unknown or repeated parameter, one the law does not have, a value that is
/// not a quantity of the parameter's dimension or out of its range; and naming the parameter when one the law
/// needs is missing.
SimulationParameters parse_simulation_parameters(Law law, const std::vector<std::string>& assignments);

/// A number in SI units, or a quantity with a unit (as --set and --times take them); checked against `range`.
/// Throws io::UnitError.
double parse_value(std::string_view text, io::Dimension dimension, io::Range range);

/// "T1,T2,..." in s: each a number in s or a quantity of time; >= 0 and strictly increasing; at least one.
/// Throws io::InputError naming the entry.
std::vector<double> parse_times(std::string_view list);

/// First time, last time [s] and count of the default log-spaced times.
inline constexpr double default_first_time = 0.5;
inline constexpr double default_last_time = 300.0;
inline constexpr int default_time_count = 25;

/// Times to simulate when --times is not given: the first readings file's times; for a slump rig (a static,
/// final-only reading) the single time default_last_time; otherwise default_time_count times spaced evenly in
/// log t from default_first_time to default_last_time (the span of a bench test's readings).
std::vector<double> default_times(const io::TestDescription& test);

/// The CSV simulate writes: header "time [s],<reading> [m]", then "t,r" per row, numbers as fmt "{}".
std::string simulation_csv(Reading reading, const std::vector<double>& times, const std::vector<double>& readings);

/// Runs the subcommand: CSV on `out`, forward-model notes ("note: ...") and failures on `err`. Returns
/// ExitCode::Done, or ExitCode::NumericalFailure when the solve fails. Throws io::InputError for bad input.
int run_simulate_command(const SimulateCommandOptions& options, std::ostream& out, std::ostream& err);

}  // namespace spreadfit::cli
