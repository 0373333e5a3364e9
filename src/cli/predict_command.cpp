#include "src/cli/predict_command.hpp"

#include <fmt/format.h>

#include "src/cli/exit_codes.hpp"
#include "src/cli/simulate_command.hpp"
#include "src/fit/prediction_band.hpp"
#include "src/fit/stored_fit.hpp"
#include "src/io/input_error.hpp"
#include "src/io/test_description.hpp"

namespace spreadfit::cli {

int run_predict_command(const PredictCommandOptions& options, std::ostream& out, std::ostream& err) {
  if (options.samples < 0 || options.samples > 100000)
    throw io::InputError(std::string(command_line_source), 0, "--samples", "expected 0 to 100000 draws");
  const FitResult fit = load_fitted_material(options.result);
  const io::TestDescription rig = io::load_test_description(options.rig);
  const std::vector<double> times = options.times ? parse_times(*options.times) : default_times(rig);
  TestSetup setup = rig.setup;
  if (!rig.series.empty()) setup.reading = rig.series.front().kind;
  const PredictionBand band = prediction_band(fit, setup, times, 0, options.samples);
  if (!band.ok) {
    err << fmt::format("spreadfit: {}: the forward model failed for the fitted material on this rig; no readings "
                       "written\n",
                       options.rig.string());
    return to_int(ExitCode::NumericalFailure);
  }
  const std::string name(reading_name(setup.reading));
  out << fmt::format("time [s],{0} [m],{0} low [m],{0} high [m]\n", name);
  for (std::size_t i = 0; i < times.size(); ++i)
    out << fmt::format("{},{},{},{}\n", times[i], band.reading[i], band.lower[i], band.upper[i]);
  if (options.samples > 0 && band.samples < options.samples)
    err << fmt::format("note: {} of {} parameter draws solved; the band uses those\n", band.samples, options.samples);
  return to_int(ExitCode::Done);
}

}  // namespace spreadfit::cli
