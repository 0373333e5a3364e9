// The spreadfit command: parses the command line (CLI11), runs a subcommand, and is the one place where
// exceptions become messages and exit codes (README, "Exit codes"):
//   io::InputError, std::invalid_argument, usage errors   -> "spreadfit: <message>" on stderr, exit 2
//   any other exception, or stdout that cannot be written -> "spreadfit: <message>" on stderr, exit 3
// Each subcommand declares its own options in its command file (add_<name>_command, command_registration.hpp).
#include <CLI/CLI.hpp>
#include <exception>
#include <iostream>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "src/cli/capture_command.hpp"
#include "src/cli/command_registration.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/cli/fit_command.hpp"
#include "src/cli/history_command.hpp"
#include "src/cli/plan_command.hpp"
#include "src/cli/predict_command.hpp"
#include "src/cli/simulate_command.hpp"
#include "src/cli/translate_command.hpp"
#include "src/io/input_error.hpp"
#include "src/version.hpp"

namespace {

using spreadfit::cli::CommandRegistration;
using spreadfit::cli::ExitCode;
using spreadfit::cli::to_int;

/// The command the command line chose, or nullptr when none was parsed (as far as parsing got).
const CommandRegistration* parsed_command(const std::vector<CommandRegistration>& commands) {
  for (const CommandRegistration& c : commands)
    if (c.command->parsed()) return &c;
  return nullptr;
}

int run(int argc, char** argv) {
  CLI::App app(
      "spreadfit: rheological parameters of sauces and creams from spread-versus-time readings of "
      "gravity-driven bench tests (gated channel, plate, parallel-plate squeeze, cylinder slump).",
      std::string(spreadfit::software_name));
  app.set_version_flag("--version",
                       std::string(spreadfit::software_name) + " " + std::string(spreadfit::software_version()));
  app.require_subcommand(1);
  app.footer(
      "Exit codes: 0 done (all within spec), 1 done (out of spec), 2 bad input or usage, 3 numerical "
      "failure.");

  // In the order --help lists them.
  const std::vector<CommandRegistration> commands{
      spreadfit::cli::add_fit_command(app),       spreadfit::cli::add_simulate_command(app),
      spreadfit::cli::add_history_command(app),   spreadfit::cli::add_predict_command(app),
      spreadfit::cli::add_translate_command(app), spreadfit::cli::add_plan_command(app),
      spreadfit::cli::add_capture_command(app),
  };
  try {
    app.parse(argc, argv);
  } catch (const CLI::Success& e) {  // --help, --help-all, --version
    return app.exit(e, std::cout, std::cerr);
  } catch (const CLI::ParseError& e) {
    const CommandRegistration* chosen = parsed_command(commands);
    if (!chosen && argc > 1 && argv[1][0] != '-') {
      // An unknown first word is a mistyped command: name it and the nearest one, not "a subcommand is required".
      std::vector<std::string_view> names;
      for (const CommandRegistration& c : commands) names.push_back(c.command->get_name());
      std::cerr << "spreadfit: unknown command " << spreadfit::io::quote_for_message(argv[1])
                << spreadfit::io::did_you_mean(argv[1], names) << "\nRun 'spreadfit --help' for usage.\n";
      return to_int(ExitCode::BadInput);
    }
    std::cerr << "spreadfit: " << e.what() << '\n'
              << "Run 'spreadfit " << (chosen ? chosen->command->get_name() + " " : std::string())
              << "--help' for usage.\n";
    return to_int(ExitCode::BadInput);
  }
  const CommandRegistration* chosen = parsed_command(commands);
  // require_subcommand(1) leaves exactly one parsed once parsing succeeds.
  if (!chosen) throw std::logic_error("no command was parsed");
  return chosen->run(std::cout, std::cerr);
}

}  // namespace

int main(int argc, char** argv) {
  try {
    const int code = run(argc, argv);
    // A full disk or a closed pipe must not pass for a finished run.
    if (!std::cout.flush()) {
      std::cerr << "spreadfit: cannot write to standard output\n";
      return to_int(ExitCode::NumericalFailure);
    }
    return code;
  } catch (const spreadfit::io::InputError& e) {
    spreadfit::io::print_input_error(std::cerr, e);
    return to_int(ExitCode::BadInput);
  } catch (const std::invalid_argument& e) {
    std::cerr << "spreadfit: " << e.what() << '\n';
    return to_int(ExitCode::BadInput);
  } catch (const std::exception& e) {
    std::cerr << "spreadfit: " << e.what() << '\n';
    return to_int(ExitCode::NumericalFailure);
  } catch (...) {
    std::cerr << "spreadfit: unexpected error of an unknown kind\n";
    return to_int(ExitCode::NumericalFailure);
  }
}
