#include "src/cli/predict_command.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <memory>

#include "src/cli/exit_codes.hpp"
#include "src/cli/progress.hpp"
#include "src/cli/command_line_values.hpp"
#include "src/fit/prediction_band.hpp"
#include "src/fit/stored_fit.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"
#include "src/report/prediction_plot.hpp"
#include "src/cli/path_option.hpp"

namespace spreadfit::cli {

namespace {

constexpr int plot_points = 81;  // dense times of the plotted curve

// The rows of `band` at the positions `rows` (indices into its times).
fit::PredictionBand subset(const fit::PredictionBand& band, const std::vector<std::size_t>& rows) {
  fit::PredictionBand out;
  out.ok = band.ok;
  out.samples = band.samples;
  for (std::size_t i : rows) {
    out.times.push_back(band.times[i]);
    out.reading.push_back(band.reading[i]);
    out.lower.push_back(band.lower[i]);
    out.upper.push_back(band.upper[i]);
  }
  return out;
}

}  // namespace

int run_predict_command(const PredictCommandOptions& options, std::ostream& out, std::ostream& err) {
  if (options.samples < 0 || options.samples > 100000)
    throw io::InputError(std::string(command_line_source), 0, "--samples", "expected 0 to 100000 draws");
  const fit::FitResult fit = fit::load_fitted_material(options.result);
  const io::TestDescription rig = io::load_test_description(options.rig);
  const std::vector<double> times = options.times ? parse_times(*options.times) : default_times(rig);
  TestSetup setup = rig.setup;
  if (!rig.series.empty()) setup.reading = rig.series.front().kind;

  // One band over the requested times and, for a plot, a dense set from 0 to the last time (and to the rig's
  // last reading): the parameter draws are shared, so the plot costs no extra draws.
  std::vector<double> all = times;
  if (options.plot) {
    double last = times.empty() ? 0.0 : *std::max_element(times.begin(), times.end());
    for (const auto& s : rig.series)
      if (s.kind == setup.reading && !s.times.empty()) last = std::max(last, s.times.back());
    for (int k = 0; k < plot_points; ++k) all.push_back(last * k / (plot_points - 1));
  }
  // The forward model wants non-decreasing times: solve over the sorted union, then pick each set's rows.
  std::vector<double> sorted = all;
  std::sort(sorted.begin(), sorted.end());
  sorted.erase(std::unique(sorted.begin(), sorted.end()), sorted.end());
  auto row_of = [&](double t) {
    return std::size_t(std::lower_bound(sorted.begin(), sorted.end(), t) - sorted.begin());
  };
  if (options.samples > 0)
    progress(err, fmt::format("predict: solving the other rig for {} parameter draws (the 95% band)", options.samples));
  const fit::PredictionBand band = prediction_band(fit, setup, sorted, 0, options.samples);
  if (!band.ok) {
    err << fmt::format(
        "spreadfit: {}: the forward model failed for the fitted material on this rig; no readings "
        "written\n",
        options.rig.string());
    return to_int(ExitCode::NumericalFailure);
  }
  std::vector<std::size_t> requested, dense;
  for (std::size_t i = 0; i < times.size(); ++i) requested.push_back(row_of(all[i]));
  for (std::size_t i = times.size(); i < all.size(); ++i) dense.push_back(row_of(all[i]));
  const fit::PredictionBand at = subset(band, requested);
  std::string note;
  if (options.samples > 0 && band.samples < options.samples) {
    note = fmt::format("the band uses {} of {} parameter draws", band.samples, options.samples);
    if (band.outside_law > 0)
      note += fmt::format(
          "; {} fell outside the law's range (the fit leaves a parameter poorly determined: the "
          "band understates the uncertainty, see the fit's warnings)",
          band.outside_law);
    if (band.failed > 0) note += fmt::format("; the forward model failed for {}", band.failed);
  }

  if (options.plot) {
    report::PredictionReport report{&fit, options.result.string(), &rig, setup.reading, subset(band, dense), at, {}};
    if (!note.empty()) report.notes.push_back(note);
    io::write_file_atomically(*options.plot, report::prediction_plot_svg(report));
  }
  const std::string name(reading_name(setup.reading));
  out << fmt::format("time [s],{0} [m],{0} low [m],{0} high [m]\n", name);
  for (std::size_t i = 0; i < times.size(); ++i)
    out << fmt::format("{},{},{},{}\n", times[i], at.reading[i], at.lower[i], at.upper[i]);
  if (!note.empty()) err << "note: " << note << "\n";
  return to_int(ExitCode::Done);
}

CommandRegistration add_predict_command(CLI::App& app) {
  struct Given {
    PredictCommandOptions options;
    std::string result, rig, times, plot;
    CLI::Option* times_option = nullptr;
    CLI::Option* plot_option = nullptr;
  };
  const auto given = std::make_shared<Given>();
  CLI::App* predict = app.add_subcommand(
      "predict", "Predict a fitted material's readings on another rig, with a 95% band; CSV on stdout.");
  predict->add_option("RESULT.json", given->result, "A result written by 'spreadfit fit --json' or '--out-dir'")
      ->required()
      ->type_name("");
  predict->add_option("--rig", given->rig, "Test description of the other rig (readings optional)")
      ->required()
      ->type_name("OTHER.toml");
  given->times_option =
      predict->add_option("--times", given->times, "Times, in s or with a unit (default as for simulate)")
          ->type_name("T1,T2,...");
  predict
      ->add_option("--samples", given->options.samples, "Parameter draws for the band (default 200; 0: no band)")
      ->type_name("N");
  given->plot_option =
      predict->add_option("--plot", given->plot, "Also write the prediction as an SVG report")->type_name("FILE.svg");
  predict->footer(std::string(exit_codes_without_spec));
  return {predict, [given](std::ostream& out, std::ostream& err) {
            PredictCommandOptions options = given->options;
            options.result = given->result;
            options.rig = given->rig;
            options.times = given_text(given->times_option, given->times);
            if (auto plot = given_text(given->plot_option, given->plot)) options.plot = *plot;
            return run_predict_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
