// The spreadfit command: parses the command line (CLI11), runs a subcommand, and is the one place where
// exceptions become messages and exit codes (README, "Exit codes"):
//   io::InputError, std::invalid_argument, usage errors   -> "spreadfit: <message>" on stderr, exit 2
//   any other exception, or stdout that cannot be written -> "spreadfit: <message>" on stderr, exit 3
#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <exception>
#include <filesystem>
#include <iostream>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "src/cli/capture_command.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/cli/history_command.hpp"
#include "src/cli/predict_command.hpp"
#include "src/cli/translate_command.hpp"
#include "src/cli/plan_command.hpp"
#include "src/cli/fit_command.hpp"
#include "src/cli/command_line_values.hpp"
#include "src/cli/simulate_command.hpp"
#include "src/io/input_error.hpp"
#include "src/version.hpp"

namespace {

using spreadfit::cli::ExitCode;
using spreadfit::cli::to_int;

const char* const kModelHelp = "newtonian | power-law | bingham | herschel-bulkley";

/// An optional path on the command line: the text CLI11 fills and the option that says whether it was given.
/// Held where it is declared (CLI11 keeps a reference to `value`), never copied.
struct PathOption {
  std::string value;
  CLI::Option* option = nullptr;

  void add_to(CLI::App& app, const std::string& name, const std::string& type, const std::string& help) {
    option = app.add_option(name, value, help)->type_name(type);
  }
  std::optional<std::filesystem::path> get() const {
    if (option == nullptr || option->count() == 0) return std::nullopt;
    return std::filesystem::path(value);
  }
};

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

  // --- fit ---------------------------------------------------------------------------------------------------
  CLI::App* fit = app.add_subcommand("fit", "Fit thin-film models to the readings of one or more tests.");
  std::vector<std::string> fit_tests;
  std::string fit_model;
  fit->add_option("TEST.toml", fit_tests, "Test descriptions (TOML), one per test")->required()->type_name("");
  fit->add_option("--model", fit_model,
                  std::string("Model to fit: ") + kModelHelp +
                      " | auto (choose by AICc); default: as each test's [fit] model says")
      ->type_name("NAME");
  PathOption fit_json, fit_plot, fit_out_dir, fit_db, fit_specs, fit_csv;
  fit_json.add_to(*fit, "--json", "FILE", "Write the results as JSON to FILE");
  fit_plot.add_to(*fit, "--plot", "FILE.svg",
                  "Draw readings, fitted curve, uncertainty band and residuals to FILE.svg");
  fit_out_dir.add_to(*fit, "--out-dir", "DIR", "Write <sample id>.json and <sample id>.svg per material (tests sharing a sample id are one material) into DIR");
  fit_db.add_to(*fit, "--db", "DB",
                "Append the results to the batch history DB: an SQLite file, or a postgresql:// URI of a shared "
                "history on a server");
  fit_specs.add_to(*fit, "--specs", "FILE", "Read product specifications from FILE");
  fit_csv.add_to(*fit, "--csv", "FILE", "Write the results as a CSV table to FILE");
  bool fit_no_prior = false;
  fit->add_flag("--no-prior", fit_no_prior,
                "Fit the readings alone: no flow-index prior from the spec catalogue or the history (--db)");
  bool fit_require_spec = false;
  fit->add_flag("--require-spec", fit_require_spec,
                "Refuse (exit 2, nothing fitted) a material without limits: no [spec] and no catalogue entry");

  // --- simulate ----------------------------------------------------------------------------------------------
  CLI::App* simulate = app.add_subcommand(
      "simulate", "Predict a test's readings for a given material (the forward model alone); CSV on stdout.");
  std::string simulate_test;
  spreadfit::cli::SimulateCommandOptions simulate_options;
  std::string simulate_times;
  simulate->add_option("TEST.toml", simulate_test, "Test description (TOML): rig, density and reading")
      ->required()
      ->type_name("");
  simulate->add_option("--model", simulate_options.model, std::string("Model: ") + kModelHelp)
      ->required()
      ->type_name("NAME");
  simulate
      ->add_option("--set", simulate_options.set,
                   "PARAM=VALUE: viscosity [Pa s], yield_stress [Pa], consistency [Pa s^n], flow_index [-], "
                   "time_origin [s]; VALUE in SI or with a unit, e.g. yield_stress=\"25 Pa\"")
      ->type_name("PARAM=VALUE");
  CLI::Option* times_option =
      simulate
          ->add_option("--times", simulate_times,
                       fmt::format("Times to simulate, in s or with a unit (default: the readings' times, else "
                                   "{} spaced in log t from {} s to {} s; a slump rig: {} s)",
                                   spreadfit::cli::default_time_count, spreadfit::cli::default_first_time,
                                   spreadfit::cli::default_last_time, spreadfit::cli::default_last_time))
          ->type_name("T1,T2,...");

  // --- history -----------------------------------------------------------------------------------------------
  CLI::App* history =
      app.add_subcommand("history", "List the batch history per product, with control-chart signals.");
  spreadfit::cli::HistoryCommandOptions history_options;
  history->add_option("DB", history_options.db,
                      "History written by 'spreadfit fit --db': an SQLite file or a postgresql:// URI")
      ->required()
      ->type_name("");
  history->add_option("--product", history_options.product, "Only this product code")->type_name("CODE");
  history->add_option("--site", history_options.site, "Only this site (lab or plant); default: across all sites")
      ->type_name("CODE");
  PathOption history_chart;
  history_chart.add_to(*history, "--chart", "FILE.svg",
                       "Draw an individuals control chart of the product's yield stress (else its first parameter)");
  history->add_flag("--csv", history_options.csv, "Write CSV to stdout instead of the table");
  std::string history_copy_to;
  CLI::Option* history_copy_option =
      history
          ->add_option("--copy-to", history_copy_to,
                       "Copy the results into another history (e.g. a postgresql:// URI); running it twice adds "
                       "nothing")
          ->type_name("URI");

  // --- predict -----------------------------------------------------------------------------------------------
  CLI::App* predict = app.add_subcommand(
      "predict", "Predict a fitted material's readings on another rig, with a 95% band; CSV on stdout.");
  spreadfit::cli::PredictCommandOptions predict_options;
  std::string predict_result, predict_rig, predict_times;
  predict->add_option("RESULT.json", predict_result, "A result written by 'spreadfit fit --json' or '--out-dir'")
      ->required()
      ->type_name("");
  predict->add_option("--rig", predict_rig, "Test description of the other rig (readings optional)")
      ->required()
      ->type_name("OTHER.toml");
  CLI::Option* predict_times_option =
      predict->add_option("--times", predict_times, "Times, in s or with a unit (default as for simulate)")
          ->type_name("T1,T2,...");
  predict->add_option("--samples", predict_options.samples, "Parameter draws for the band (default 200; 0: no band)")
      ->type_name("N");
  std::string predict_plot;
  CLI::Option* predict_plot_option =
      predict->add_option("--plot", predict_plot, "Also write the prediction as an SVG report")->type_name("FILE.svg");

  // --- translate ---------------------------------------------------------------------------------------------
  CLI::App* translate = app.add_subcommand(
      "translate",
      "Turn parameter limits into reading limits on a rig at a time, or reading limits into parameter limits.");
  spreadfit::cli::TranslateCommandOptions translate_options;
  std::string translate_test;
  translate->add_option("TEST.toml", translate_test, "Test description of the rig (readings optional)")
      ->required()
      ->type_name("");
  translate->add_option("--model", translate_options.model, std::string("Model: ") + kModelHelp)
      ->required()
      ->type_name("NAME");
  translate->add_option("--vary", translate_options.vary, "PARAM=LOW:HIGH, e.g. yield_stress=\"20 Pa:35 Pa\"")
      ->required()
      ->type_name("PARAM=LOW:HIGH");
  translate->add_option("--set", translate_options.set, "PARAM=VALUE for the parameters not varied")
      ->type_name("PARAM=VALUE");
  translate->add_option("--at", translate_options.at, "Reading time, in s or with a unit")->required()->type_name("T");
  translate->add_option("--points", translate_options.points, "Grid points per varied parameter (default 5)")
      ->type_name("N");
  std::string translate_between, translate_solve, translate_map;
  CLI::Option* translate_between_option =
      translate->add_option("--between", translate_between,
                            "Reading limits, e.g. \"5.5 cm:8 cm\": solve for parameter limits instead")
          ->type_name("LOW:HIGH");
  CLI::Option* translate_solve_option =
      translate
          ->add_option("--solve", translate_solve, "With --between: the parameter to solve for (default: first --vary)")
          ->type_name("PARAM");
  CLI::Option* translate_map_option =
      translate->add_option("--map", translate_map, "Also write an SVG map of the reading over the first two --vary")
          ->type_name("FILE.svg");
  translate->add_option("--map-points", translate_options.map_points, "Map grid points per axis (default 21)")
      ->type_name("M");
  std::string translate_grid;
  CLI::Option* translate_grid_option =
      translate->add_option("--grid", translate_grid, "Also write every grid point's parameters and reading as CSV")
          ->type_name("FILE.csv");

  // --- plan --------------------------------------------------------------------------------------------------
  CLI::App* plan = app.add_subcommand(
      "plan", "Compare candidate tests by the expected 95% intervals of the parameters for a guessed material.");
  spreadfit::cli::PlanCommandOptions plan_options;
  std::vector<std::string> plan_candidates;
  plan->add_option("CANDIDATE.toml", plan_candidates, "Test descriptions of the candidate tests")
      ->required()
      ->type_name("");
  plan->add_option("--model", plan_options.model, std::string("Model: ") + kModelHelp)->required()->type_name("NAME");
  plan->add_option("--set", plan_options.set, "PARAM=VALUE of the guessed material (the parameters not varied)")
      ->type_name("PARAM=VALUE");
  plan->add_option("--vary", plan_options.vary,
                   "PARAM=LOW:HIGH, a range of the guess, e.g. yield_stress=\"10 Pa:40 Pa\"; candidates are judged by "
                   "their worst case over the guesses")
      ->type_name("PARAM=LOW:HIGH");
  plan->add_option_function<int>(
          "--points", [&plan_options](const int& n) { plan_options.points = n; },
          "Guesses per varied parameter (default 3; log-spaced except the flow index)")
      ->type_name("N");
  plan->add_option("--check", plan_options.check,
                   "Refit N simulated reading sets of the recommended test and the runner-up at the middle guess "
                   "(default 0: no check)")
      ->type_name("N");
  plan->add_option("--every", plan_options.every, "Reading interval for candidates without readings (default 5 s)")
      ->type_name("DT");
  plan->add_option("--until", plan_options.until, "Duration for candidates without readings (default 120 s)")
      ->type_name("T");

  // --- capture -----------------------------------------------------------------------------------------------
  CLI::App* capture = app.add_subcommand(
      "capture", "Turn a video of the test, taken from above, into the readings CSV that [readings] file names.");
  std::string capture_test;
  capture->add_option("TEST.toml", capture_test, "Test description (TOML) with a [capture] table")
      ->required()
      ->type_name("");
  PathOption capture_video, capture_out, capture_check;
  capture_video.add_to(*capture, "--video", "FILE", "The video (instead of [capture] video)");
  capture_out.add_to(*capture, "--out", "FILE.csv", "Write the readings to FILE.csv (instead of [readings] file)");
  capture_check.add_to(*capture, "--check", "DIR",
                       "Write audit images (frames with the outline found, a contact sheet, the curve) into DIR");

  // Only fit judges against limits; the other commands have no "out of spec".
  for (CLI::App* command : {simulate, predict, translate, plan})
    command->footer("Exit codes: 0 done, 2 bad input or usage, 3 numerical failure.");
  try {
    app.parse(argc, argv);
  } catch (const CLI::Success& e) {  // --help, --help-all, --version
    return app.exit(e, std::cout, std::cerr);
  } catch (const CLI::ParseError& e) {
    const CLI::App* chosen = fit->parsed()        ? fit
                             : simulate->parsed() ? simulate
                             : history->parsed()  ? history
                             : predict->parsed()  ? predict
                             : translate->parsed() ? translate
                             : plan->parsed()      ? plan
                             : capture->parsed()   ? capture
                                                  : nullptr;
    if (!chosen && argc > 1 && argv[1][0] != '-') {
      // An unknown first word is a mistyped command: name it and the nearest one, not "a subcommand is required".
      const std::vector<std::string_view> commands{"fit", "simulate", "history", "predict", "translate", "plan", "capture"};
      std::cerr << "spreadfit: unknown command " << spreadfit::io::quote_for_message(argv[1])
                << spreadfit::io::did_you_mean(argv[1], commands) << "\nRun 'spreadfit --help' for usage.\n";
      return to_int(ExitCode::BadInput);
    }
    std::cerr << "spreadfit: " << e.what() << '\n'
              << "Run 'spreadfit " << (chosen ? chosen->get_name() + " " : std::string()) << "--help' for usage.\n";
    return to_int(ExitCode::BadInput);
  }

  if (capture->parsed()) {
    spreadfit::cli::CaptureCommandOptions capture_options;
    capture_options.test = capture_test;
    capture_options.video = capture_video.get();
    capture_options.out = capture_out.get();
    capture_options.check = capture_check.get();
    return spreadfit::cli::run_capture_command(capture_options, std::cout, std::cerr);
  }
  if (plan->parsed()) {
    plan_options.candidates.assign(plan_candidates.begin(), plan_candidates.end());
    return spreadfit::cli::run_plan_command(plan_options, std::cout, std::cerr);
  }
  if (translate->parsed()) {
    translate_options.test = translate_test;
    if (translate_between_option->count() > 0) translate_options.between = translate_between;
    if (translate_solve_option->count() > 0) translate_options.solve = translate_solve;
    if (translate_map_option->count() > 0) translate_options.map = translate_map;
    if (translate_grid_option->count() > 0) translate_options.grid = translate_grid;
    return spreadfit::cli::run_translate_command(translate_options, std::cout, std::cerr);
  }
  if (predict->parsed()) {
    predict_options.result = predict_result;
    predict_options.rig = predict_rig;
    if (predict_times_option->count() > 0) predict_options.times = predict_times;
    if (predict_plot_option->count() > 0) predict_options.plot = predict_plot;
    return spreadfit::cli::run_predict_command(predict_options, std::cout, std::cerr);
  }
  if (history->parsed()) {
    history_options.chart = history_chart.get();
    if (history_copy_option->count() > 0) history_options.copy_to = history_copy_to;
    return spreadfit::cli::run_history_command(history_options, std::cout, std::cerr);
  }
  if (simulate->parsed()) {
    simulate_options.test = simulate_test;
    if (times_option->count() > 0) simulate_options.times = simulate_times;
    return spreadfit::cli::run_simulate_command(simulate_options, std::cout, std::cerr);
  }
  spreadfit::cli::FitCommandOptions options;
  options.tests.assign(fit_tests.begin(), fit_tests.end());
  options.model = fit_model;
  options.json = fit_json.get();
  options.plot = fit_plot.get();
  options.out_dir = fit_out_dir.get();
  options.db = fit_db.get();
  options.specs = fit_specs.get();
  options.csv = fit_csv.get();
  options.use_prior = !fit_no_prior;
  options.require_spec = fit_require_spec;
  return spreadfit::cli::run_fit_command(options, std::cout, std::cerr);
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
