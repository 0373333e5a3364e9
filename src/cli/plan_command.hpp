// `spreadfit plan CANDIDATE.toml... --model NAME --set PARAM=VALUE... [--every DT] [--until T]`: compares
// candidate tests (each a test description: rig, fill, reading kind, resolution; its readings' times if it has a
// readings file, else readings every DT up to T) by the expected 95% interval of each parameter for a guessed
// material (src/fit/test_design.hpp) and recommends the one with the narrowest intervals.
#pragma once

#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

namespace spreadfit::cli {

struct PlanCommandOptions {
  std::vector<std::filesystem::path> candidates;
  std::string model;
  std::vector<std::string> set;  ///< the guessed material, PARAM=VALUE
  std::string every = "5";       ///< reading interval when a candidate has no readings file
  std::string until = "120";     ///< test duration when a candidate has no readings file
};

int run_plan_command(const PlanCommandOptions& options, std::ostream& out, std::ostream& err);

}  // namespace spreadfit::cli
