// What a subcommand gives main.cpp: its CLI11 subcommand (its options declared on it) and how to run it once the
// command line is parsed. Each command file has one `CommandRegistration add_<name>_command(CLI::App& app)`; the
// registration owns the storage CLI11 fills (CLI11 keeps references to it), shared with `run`.
#pragma once

#include <functional>
#include <ostream>
#include <string_view>

namespace CLI {
class App;
}

namespace spreadfit::cli {

struct CommandRegistration {
  CLI::App* command;                                              ///< the subcommand, owned by the app
  std::function<int(std::ostream& out, std::ostream& err)> run;  ///< runs it; returns the exit code
};

/// The models --model names, as the help texts list them.
inline constexpr std::string_view model_names_help = "newtonian | power-law | bingham | herschel-bulkley";

/// The exit codes of a command that judges nothing against limits (every command but fit has no "out of spec").
inline constexpr std::string_view exit_codes_without_spec =
    "Exit codes: 0 done, 2 bad input or usage, 3 numerical failure.";

}  // namespace spreadfit::cli
