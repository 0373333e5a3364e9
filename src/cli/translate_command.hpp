// `spreadfit translate TEST.toml --model NAME --vary PARAM=LOW:HIGH... [--set PARAM=VALUE...] --at TIME`:
// parameter limits become reading limits on a named rig at a named time. Every parameter of the law is either
// fixed (--set) or given a range (--vary); the reading is computed by the forward model over a grid of the varied
// parameters (log-spaced for yield stress, viscosity and consistency, linear for the flow index) and its smallest
// and largest values are the reading limits. Use case: a product spec of yield stress 20-35 Pa, with the
// consistency and flow index over their plausible range, becomes "channel reading at 30 s between X and Y".
#pragma once

#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

namespace spreadfit::cli {

struct TranslateCommandOptions {
  std::filesystem::path test;      ///< the rig (a test description; readings optional)
  std::string model;               ///< newtonian | power-law | bingham | herschel-bulkley
  std::vector<std::string> set;    ///< PARAM=VALUE, fixed parameters
  std::vector<std::string> vary;   ///< PARAM=LOW:HIGH, ranges (each a number in SI or a quantity)
  std::string at;                  ///< the reading time, in s or with a unit
  int points = 5;                  ///< grid points per varied parameter (2..25)
};

/// Prints the reading limits (a sentence and a CSV line `reading,unit,time [s],low,high`); returns the exit code.
int run_translate_command(const TranslateCommandOptions& options, std::ostream& out, std::ostream& err);

}  // namespace spreadfit::cli
