// `spreadfit fit`: fit thin-film models to the readings of one or more bench tests (README).
// main parses the command line into FitCommandOptions and calls run_fit_command.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

struct FitCommandOptions {
  std::vector<std::filesystem::path> tests;      ///< test descriptions (TOML), at least one
  std::string model;                             ///< --model as written; empty = as each test says
  std::optional<std::filesystem::path> json;     ///< --json FILE
  std::optional<std::filesystem::path> plot;     ///< --plot FILE.svg
  std::optional<std::filesystem::path> out_dir;  ///< --out-dir DIR
  std::optional<std::filesystem::path> db;       ///< --db FILE
  std::optional<std::filesystem::path> specs;    ///< --specs FILE
  std::optional<std::filesystem::path> csv;      ///< --csv FILE
  bool use_prior = true;                         ///< false with --no-prior: readings alone
  bool require_spec = false;                     ///< --require-spec: a material with no limits is bad input
};

/// Runs the fit subcommand; returns the exit code (README). Throws io::InputError for bad input.
int run_fit_command(const FitCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit fit` and its options on `app` (README, "Using it").
CommandRegistration add_fit_command(CLI::App& app);

}  // namespace spreadfit::cli
