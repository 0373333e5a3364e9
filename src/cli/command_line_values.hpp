// Values written on the command line, shared by the subcommands (simulate, predict, translate, plan): a model
// name, a number or quantity, a list of times, PARAM=VALUE assignments (--set), PARAM=LOW:HIGH ranges (--vary),
// LOW:HIGH reading limits (--between), and the default times when none are given.
//
// Parameters go by their interface names in the parameter table (src/io/parameter_table.hpp), which gives each
// one's dimension, allowed sign, plausible range and an example value:
//   viscosity [Pa s], yield_stress [Pa], consistency [Pa s^n], flow_index [-], time_origin [s].
// A value is a number in SI units or a quantity with a unit ("25 Pa", "800 mPa.s", "12 Pa.s^n", "2 s").
// Each model takes exactly its own parameters, and time_origin optionally (default 0; any sign):
//   newtonian: viscosity          power-law: consistency, flow_index
//   bingham: yield_stress, viscosity     herschel-bulkley: yield_stress, consistency, flow_index
//
// Bad input throws io::InputError located at command_line_source, with the option as written as the field.
#pragma once

#include <cstddef>

#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "models/rheology.hpp"
#include "src/io/description_file.hpp"
#include "src/io/units.hpp"

namespace spreadfit::cli {

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
/// Throws io::InputError naming the entry, with the field "--times".
std::vector<double> parse_times(std::string_view list);

/// One time given to `option` (plan's --every and --until): as parse_times, its complaints located at `option`,
/// and exactly one entry.
double parse_one_time(const std::string& text, const std::string& option);

/// Reading limits "LOW:HIGH" (translate's --between), each a length in SI or with a unit, LOW <= HIGH, in m.
std::pair<double, double> parse_reading_limits(const std::string& text);

/// First time, last time [s] and count of the default log-spaced times.
inline constexpr double default_first_time = 0.5;
inline constexpr double default_last_time = 300.0;
inline constexpr int default_time_count = 25;

/// Times to simulate when --times is not given: the first readings file's times; for a slump rig (a static,
/// final-only reading) the single time default_last_time; otherwise default_time_count times spaced evenly in
/// log t from default_first_time to default_last_time (the span of a bench test's readings).
std::vector<double> default_times(const io::TestDescription& test);

/// One --vary PARAM=LOW:HIGH (translate, plan): each end converted and range-checked by the same rules as --set.
struct ParameterRange {
  std::string name;       ///< yield_stress | viscosity | consistency | flow_index
  std::string low, high;  ///< the ends as written
  double lo = 0, hi = 0;  ///< the ends in SI, lo <= hi
};

/// The ranges of `vary` for `law`, with the parameters of `fixed` (PARAM=VALUE, as for --set) held. Throws
/// io::InputError located at the command line, with the field "--vary PARAM=LOW:HIGH" as written, for a malformed
/// range, an unknown parameter or one the law does not have, time_origin (the release time is not a material
/// property), an end that is not a quantity of the parameter's dimension or out of its range, and low above high.
/// Parameters the law needs that are neither fixed nor varied are reported as by parse_simulation_parameters.
std::vector<ParameterRange> parse_parameter_ranges(Law law, const std::vector<std::string>& fixed,
                                                   const std::vector<std::string>& vary);

/// The fixed parameters with every range at its low end (law, material, release time).
SimulationParameters range_base(Law law, const std::vector<std::string>& fixed,
                                const std::vector<ParameterRange>& ranges);

}  // namespace spreadfit::cli
