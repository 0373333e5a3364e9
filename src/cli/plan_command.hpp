// `spreadfit plan CANDIDATE.toml... --model NAME [--set PARAM=VALUE...] [--vary PARAM=LOW:HIGH... [--points N]]
// [--every DT] [--until T] [--check N]`: compares candidate tests (each a test description: rig, fill, reading
// kind, resolution; its readings' times if it has a readings file, else readings every DT up to T) by the
// expected 95% interval of each parameter (src/fit/expected_intervals.hpp) and recommends one.
//
// The guessed material is one point (--set only) or a range (--vary, as for translate: parameter_ranges.hpp),
// sampled on a grid of N guesses per varied parameter. Each candidate is judged by its worst case over the guesses
// (per parameter the widest expected interval), so the recommended test serves whichever material the sample turns
// out to be. The explanation names the parameter that limits the recommended test, whether the guessed material
// stops within each test (its reading at ten times the duration within the resolution of the last one), and how
// the recommended test differs from the runner-up. --check N simulates N noisy reading sets of the recommended test
// and the runner-up at the middle of the ranges, refits them (src/fit/design_check.hpp) and prints the refits' 95%
// ratio beside the planned one.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

struct PlanCommandOptions {
  std::vector<std::filesystem::path> candidates;
  std::string model;
  std::vector<std::string> set;   ///< the guessed material's fixed parameters, PARAM=VALUE
  std::vector<std::string> vary;  ///< ranges of the guess, PARAM=LOW:HIGH (each end in SI or a quantity)
  std::optional<int> points;      ///< guesses per varied parameter, 2..25; default 3; only with --vary
  int check = 0;                  ///< Monte Carlo refits per checked candidate, 0..1000; 0 = no check
  std::string every = "5";        ///< reading interval when a candidate has no readings file
  std::string until = "120";      ///< test duration when a candidate has no readings file
};

/// Prints the table, the recommendation and its reasons (and the check) on `out`; returns ExitCode::Done, or
/// ExitCode::NumericalFailure when no candidate determines every parameter. Throws io::InputError for bad input.
int run_plan_command(const PlanCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit plan` and its options on `app`.
CommandRegistration add_plan_command(CLI::App& app);

}  // namespace spreadfit::cli
