// `spreadfit predict RESULT.json --rig OTHER.toml [--times T1,T2,...] [--samples N]`: the readings a fitted
// material would give on another rig (or the same rig with another fill), with a 95% band that carries the fit's
// uncertainty (parameter draws from the fitted log-space normal approximation; see src/fit/prediction_band.hpp).
// CSV on stdout: time [s],<reading> [m],<reading> low [m],<reading> high [m]. With --plot FILE.svg, also the
// prediction as an SVG report (src/report/prediction_plot.hpp), with the rig's own readings when it has them.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>

#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

struct PredictCommandOptions {
  std::filesystem::path result;          ///< a result JSON written by `spreadfit fit`
  std::filesystem::path rig;             ///< a test description of the other rig (readings optional)
  std::optional<std::string> times;      ///< --times list, else the rig's readings' times, else the default set
  int samples = 200;                     ///< parameter draws for the band
  std::optional<std::filesystem::path> plot;  ///< --plot: SVG report of the prediction
};

int run_predict_command(const PredictCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit predict` and its options on `app`.
CommandRegistration add_predict_command(CLI::App& app);

}  // namespace spreadfit::cli
