#include "src/cli/plan_command.hpp"

#include <cmath>
#include <fmt/format.h>
#include <limits>

#include "src/cli/exit_codes.hpp"
#include "src/cli/simulate_command.hpp"
#include "src/fit/test_design.hpp"
#include "src/io/input_error.hpp"
#include "src/io/test_description.hpp"

namespace spreadfit::cli {

int run_plan_command(const PlanCommandOptions& options, std::ostream& out, std::ostream& err) {
  const std::string where(command_line_source);
  const Law law = parse_simulation_model(options.model);
  const SimulationParameters guess = parse_simulation_parameters(law, options.set);
  const std::vector<double> every = parse_times(options.every), until = parse_times(options.until);
  if (every.size() != 1 || until.size() != 1 || !(every[0] > 0) || until[0] < every[0])
    throw io::InputError(where, 0, "--every/--until", "expected one interval > 0 and a duration at least as long");
  if (options.candidates.empty()) throw io::InputError(where, 0, "CANDIDATE.toml", "expected at least one");
  constexpr double default_sigma = 1e-3;  // a ruler read to the millimetre (common practice, no source)

  struct Row {
    std::string name;
    DesignEstimate estimate;
    double score = std::numeric_limits<double>::infinity();
  };
  std::vector<Row> rows;
  for (const auto& path : options.candidates) {
    const io::TestDescription test = io::load_test_description(path);
    TestSetup setup = test.setup;
    std::vector<double> times;
    if (!test.series.empty()) {
      setup.reading = test.series.front().kind;
      times = test.series.front().times;
    } else {
      for (double t = every[0]; t <= until[0] + 1e-9; t += every[0]) times.push_back(t);
    }
    Row row{path.filename().string(),
            expected_intervals(setup, law, guess.material, times, test.resolution.value_or(default_sigma)), 0.0};
    // Score: geometric mean of the interval ratios' logs (a design good for every parameter).
    double sum = 0;
    for (double ratio : row.estimate.interval_ratio) sum += std::log(ratio);
    row.score = row.estimate.ok ? sum / double(row.estimate.interval_ratio.size())
                                : std::numeric_limits<double>::infinity();
    rows.push_back(std::move(row));
  }
  out << fmt::format("Expected 95% intervals (upper/lower) for {} with", law_name(law));
  for (const auto& s : options.set) out << " " << s;
  out << "\n";
  out << fmt::format("  {:<24}", "candidate");
  for (const auto& n : rows.front().estimate.names) out << fmt::format(" {:>16}", n);
  out << "\n";
  std::size_t best = 0;
  for (std::size_t i = 0; i < rows.size(); ++i) {
    out << fmt::format("  {:<24}", rows[i].name);
    if (!rows[i].estimate.ok) {
      out << " forward model failed\n";
      continue;
    }
    for (double r : rows[i].estimate.interval_ratio)
      out << (std::isfinite(r) && r < 1e6 ? fmt::format(" {:>15.3g}x", r) : fmt::format(" {:>16}", "undetermined"));
    out << "\n";
    if (rows[i].score < rows[best].score) best = i;
  }
  if (!std::isfinite(rows[best].score)) {
    err << "spreadfit: no candidate determines every parameter of this law; no recommendation\n";
    return to_int(ExitCode::NumericalFailure);
  }
  // Which parameter limits the recommended test, in words.
  const auto& e = rows[best].estimate;
  std::size_t worst = 0;
  for (std::size_t i = 1; i < e.interval_ratio.size(); ++i)
    if (e.interval_ratio[i] > e.interval_ratio[worst]) worst = i;
  out << fmt::format("recommended: {} (narrowest intervals overall; its widest is the {}, a factor {:.3g})\n",
                     rows[best].name, e.names[worst], e.interval_ratio[worst]);
  if (e.names[worst] == "yield_stress")
    out << "  the yield stress shows in the approach to arrest: readings should continue until the sample stops\n";
  return to_int(ExitCode::Done);
}

}  // namespace spreadfit::cli
