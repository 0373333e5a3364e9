// `spreadfit translate TEST.toml --model NAME --vary PARAM=LOW:HIGH... [--set PARAM=VALUE...] --at TIME
//                     [--points N] [--grid FILE.csv] [--between LOW:HIGH [--solve PARAM]]
//                     [--map FILE.svg [--map-points M]]`:
// a spec moved between parameters and readings on a named rig at a named time (src/qc/spec_translation.hpp).
//
// Without --between, parameter limits become reading limits: every parameter of the law is fixed (--set) or given
// a range (--vary); the reading is computed over a grid of the varied parameters (N points each, log-spaced for
// yield stress, viscosity and consistency, linear for the flow index) and its smallest and largest values are the
// reading limits. Use case: a product spec of yield stress 20-35 Pa, with the consistency and flow index over their
// plausible range, becomes "channel reading at 30 s between X and Y".
//
// With --between, reading limits become limits of the parameter --solve (default: the first --vary, whose range is
// where to look): the values possible with a reading within the limits, and those assured to read within them
// whatever the other varied parameters are.
//
// --grid FILE.csv (forward only) writes the table behind the limits: one row per grid point, the varied parameters
// in SI and the reading in m.
//
// --map writes an SVG map of the reading over the first two varied parameters (src/report/reading_map_svg.hpp),
// further varied parameters held at the middle of their ranges: with the parameter limits as a box and the reading
// limits shaded (the map spans the ranges widened by half their width each way), or with --between, over the search
// ranges with the reading limits shaded and the possible range of the solved parameter as the box.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

struct TranslateCommandOptions {
  std::filesystem::path test;                ///< the rig (a test description; readings optional)
  std::string model;                         ///< newtonian | power-law | bingham | herschel-bulkley
  std::vector<std::string> set;              ///< PARAM=VALUE, fixed parameters
  std::vector<std::string> vary;             ///< PARAM=LOW:HIGH, ranges (each a number in SI or a quantity)
  std::string at;                            ///< the reading time, in s or with a unit
  int points = 5;                            ///< grid points per varied parameter (2..25)
  std::optional<std::string> between;        ///< reading limits LOW:HIGH (lengths): the reverse direction
  std::optional<std::string> solve;          ///< the parameter solved for with --between (default: the first --vary)
  std::optional<std::filesystem::path> map;  ///< SVG map of the reading over the first two varied parameters
  std::optional<std::filesystem::path> grid; ///< CSV of every grid point's parameters and reading (forward only)
  int map_points = 21;                       ///< map grid points per axis (5..61)
};

/// Forward: prints the reading limits (a sentence and a CSV line `reading,unit,time [s],low,high`). Reverse:
/// a sentence per answer and a CSV line `parameter,unit,time [s],possible low,possible high,assured low,assured
/// high` (assured fields empty when no value is assured). Returns the exit code: 3 when a forward solve fails or no
/// value of the solved parameter in its range gives a reading within the limits.
int run_translate_command(const TranslateCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit translate` and its options on `app`.
CommandRegistration add_translate_command(CLI::App& app);

}  // namespace spreadfit::cli
