#include "src/cli/translate_command.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>

#include "models/forward.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/cli/parameter_ranges.hpp"
#include "src/cli/command_line_values.hpp"
#include "src/fit/parameter_names.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"
#include "src/io/units.hpp"
#include "src/qc/spec_translation.hpp"
#include "src/report/reading_map_svg.hpp"
#include "src/report/svg_document.hpp"
#include "src/cli/progress.hpp"
#include "src/cli/path_option.hpp"

namespace spreadfit::cli {

namespace {

std::string plain(std::string name) {
  std::replace(name.begin(), name.end(), '_', ' ');
  return name;
}

std::string with_unit(double value, const std::string& parameter) {
  const std::string unit = fit::parameter_unit(parameter);
  return unit == "-" ? fmt::format("{:.4g}", value) : fmt::format("{:.4g} {}", value, unit);
}

// A reading for people: in cm when the larger of the pair reaches 3 cm, else in mm (as the reports); CSV stays SI.
std::string length_text(double metres, double larger) {
  return larger >= 0.03 ? fmt::format("{:.4g} cm", metres * 100) : fmt::format("{:.4g} mm", metres * 1000);
}

// The map's extent along one axis: the range itself (reverse: the search range), or widened by half its width
// each way (forward: the parameter limits in the middle of the map). A point range is widened by a factor 2.
std::pair<double, double> map_extent(const ParameterRange& r, bool widen) {
  double lo = r.lo, hi = r.hi;
  if (log_spaced(r)) {
    const double ratio = hi > lo ? std::sqrt(hi / lo) : 2.0;
    if (widen || !(hi > lo)) lo /= ratio, hi *= ratio;
  } else {
    const double half = hi > lo ? 0.5 * (hi - lo) : std::max(0.5 * std::abs(hi), 0.1);
    if (widen || !(hi > lo)) lo -= half, hi += half;
    // A flow index must stay positive.
    const double floor = io::is_parameter(r.name, io::Parameter::FlowIndex) ? 0.05 : 0.0;
    lo = std::max(lo, floor);
  }
  return {lo, hi};
}

// The map's grid along one axis: the range's own spacing (range_value) over the map's extent.
std::vector<double> axis_values(ParameterRange r, std::pair<double, double> extent, int points) {
  r.lo = extent.first;
  r.hi = extent.second;
  std::vector<double> v;
  for (int i = 0; i < points; ++i) v.push_back(range_value(r, double(i) / (points - 1)));
  return v;
}

/// The command line and the rig, read and checked before any forward solve.
struct TranslateInputs {
  Law law = Law::Newtonian;
  double at = 0;                                    ///< the reading time as given [s]
  std::vector<ParameterRange> ranges;               ///< --vary
  SimulationParameters nominal;                     ///< --set with every range at its low end
  std::optional<std::pair<double, double>> between; ///< reading limits [m]: the reverse direction
  std::size_t solved = 0;                           ///< with --between: the range solved for
  TestSetup setup;                                  ///< the rig, reading the first readings file's kind if any
  double when = 0;                                  ///< model time of the reading, max(at - time_origin, 0) [s]
  std::string reading, rig_name;
  std::string over;  ///< "yield_stress 20 Pa..35 Pa, ..." of the ranges not solved for, as written
};

/// What one direction found: the text for stdout, the reading limits the map shades and, reverse, the possible
/// range of the solved parameter.
struct Translation {
  std::string report;
  std::pair<double, double> reading_limits;
  std::optional<qc::Interval> possible;
};

// Reads and checks the options first (cheap, and their errors do not depend on the file), then the test
// description.
TranslateInputs read_inputs(const TranslateCommandOptions& options) {
  const std::string where(command_line_source);
  check_grid_points(options.points, "--points");
  if (options.map && (options.map_points < 5 || options.map_points > 61))
    throw io::InputError(where, 0, "--map-points", fmt::format("{} points (expected 5 to 61)", options.map_points));
  TranslateInputs in;
  in.law = parse_simulation_model(options.model);
  in.at = parse_one_time(options.at, "--at");
  if (options.vary.empty()) throw io::InputError(where, 0, "--vary", "expected at least one PARAM=LOW:HIGH");
  if (options.solve && !options.between) throw io::InputError(where, 0, "--solve", "only with --between");
  if (options.grid && options.between)
    throw io::InputError(where, 0, "--grid", "only without --between (the table of the forward direction)");
  in.ranges = parse_parameter_ranges(in.law, options.set, options.vary);
  if (options.map && in.ranges.size() < 2)
    throw io::InputError(where, 0, "--map", "the map's axes are the first two --vary parameters (one given)");
  in.nominal = range_base(in.law, options.set, in.ranges);
  if (options.between) {
    in.between = parse_reading_limits(*options.between);
    if (options.solve) {
      const auto it = std::find_if(in.ranges.begin(), in.ranges.end(),
                                   [&](const ParameterRange& r) { return r.name == *options.solve; });
      if (it == in.ranges.end())
        throw io::InputError(where, 0, "--solve " + *options.solve,
                             "not among the --vary parameters (its range is where to look)");
      in.solved = std::size_t(it - in.ranges.begin());
    }
    if (!(in.ranges[in.solved].lo < in.ranges[in.solved].hi))
      throw io::InputError(where, 0, "--vary " + in.ranges[in.solved].name, "the range to search is a single value");
  }
  const io::TestDescription test = io::load_test_description(options.test);
  in.setup = test.setup;
  if (!test.series.empty()) in.setup.reading = test.series.front().kind;
  in.when = std::max(in.at - in.nominal.time_origin, 0.0);
  in.reading = std::string(reading_name(in.setup.reading));
  in.rig_name = std::string(io::rig_kind_name(in.setup.rig));
  for (std::size_t i = 0; i < in.ranges.size(); ++i)
    if (!in.between || i != in.solved)
      in.over += fmt::format("{}{} {}..{}", in.over.empty() ? "" : ", ", in.ranges[i].name, in.ranges[i].low,
                             in.ranges[i].high);
  return in;
}

// --grid: one row per grid point, the varied parameters in SI and the reading in m.
std::string grid_csv(const TranslateInputs& in, const std::vector<GridPoint>& points,
                     const std::vector<double>& readings, int per_range) {
  std::string table;
  for (const ParameterRange& p : in.ranges) table += fmt::format("{} [{}],", p.name, fit::parameter_unit(p.name));
  table += fmt::format("{} [m]\n", in.reading);
  for (std::size_t k = 0; k < points.size(); ++k) {
    for (std::size_t d = 0; d < in.ranges.size(); ++d)
      table += fmt::format("{},", range_value(in.ranges[d], double(points[k].index[d]) / (per_range - 1)));
    table += fmt::format("{}\n", readings[k]);
  }
  return table;
}

// Forward: the reading's smallest and largest value over the grid of the varied parameters (and --grid's table).
// Nothing when a forward solve fails (said on `err`).
std::optional<Translation> reading_limits_of(const TranslateCommandOptions& options, const TranslateInputs& in,
                                             std::ostream& err) {
  std::vector<Material> grid;
  const std::vector<GridPoint> points = parameter_grid(in.nominal.material, in.ranges, options.points);
  for (const GridPoint& g : points) grid.push_back(g.material);
  const qc::ReadingRange r = qc::reading_range(in.setup, grid, in.when);
  if (!r.ok()) {
    err << fmt::format("spreadfit: {}: {} ({} forward solves); no limits written\n", options.test.string(), r.failure,
                       r.solves);
    return std::nullopt;
  }
  Translation t;
  t.report = fmt::format("{} at {} s on {}: between {} and {} over {} ({} forward solves)\n", in.reading, in.at,
                         in.rig_name, length_text(r.low, r.high), length_text(r.high, r.high), in.over, r.solves);
  t.report += "reading,unit,time [s],low,high\n" + fmt::format("{},m,{},{},{}\n", in.reading, in.at, r.low, r.high);
  t.reading_limits = std::pair{r.low, r.high};
  if (options.grid) io::write_file_atomically(*options.grid, grid_csv(in, points, r.readings, options.points));
  return t;
}

// Reverse: the values of the solved parameter possible with a reading within the limits, and those assured to read
// within them whatever the other varied parameters are. Nothing when a solve fails or no value fits (said on `err`).
std::optional<Translation> parameter_limits_of(const TranslateCommandOptions& options, const TranslateInputs& in,
                                               std::ostream& err) {
  // The other varied parameters span their grid; the solved one is searched over its own range.
  std::vector<ParameterRange> others;
  for (std::size_t i = 0; i < in.ranges.size(); ++i)
    if (i != in.solved) others.push_back(in.ranges[i]);
  std::vector<Material> combos;
  for (const GridPoint& g : parameter_grid(in.nominal.material, others, options.points)) combos.push_back(g.material);
  const ParameterRange& s = in.ranges[in.solved];
  const std::pair<double, double> between = *in.between;
  const qc::SearchRange search{s.name, s.lo, s.hi, log_spaced(s)};
  const qc::ParameterLimits limits =
      solve_parameter_limits(in.setup, in.when, combos, search, between.first, between.second);
  if (!limits.ok()) {
    err << fmt::format("spreadfit: {}: {} while solving for {}; no limits written\n", options.test.string(),
                       limits.failure, s.name);
    return std::nullopt;
  }
  const std::string context =
      fmt::format("{} at {} s on {} between {} and {}", in.reading, in.at, in.rig_name,
                  length_text(between.first, between.second), length_text(between.second, between.second)) +
      (in.over.empty() ? "" : ", over " + in.over) + fmt::format(" ({} forward solves)", limits.solves);
  if (!limits.possible) {
    err << fmt::format("spreadfit: {}: no {} in {}..{} gives a {}; no limits written\n", options.test.string(), s.name,
                       s.low, s.high, context);
    return std::nullopt;
  }
  Translation t;
  t.possible = limits.possible;
  std::string& report = t.report;
  report = fmt::format("{} for a {}:\n", s.name, context);
  report += fmt::format("  possible: {} to {} (a reading within the limits allows no value outside){}\n",
                        with_unit(limits.possible->lo, s.name), with_unit(limits.possible->hi, s.name),
                        limits.single_interval ? "" : "; the reading is not monotone in it: this is the hull");
  if (limits.assured)
    report += fmt::format("  assured: {} to {} (every value here reads within the limits{}){}\n",
                          with_unit(limits.assured->lo, s.name), with_unit(limits.assured->hi, s.name),
                          others.empty() ? "" : ", whatever the others",
                          limits.assured_single_interval ? "" : "; not one interval: this is the hull");
  else
    report += "  assured: none (no value reads within the limits for every combination of the others)\n";
  if (limits.possible_at_low_edge || limits.possible_at_high_edge)
    report += fmt::format(
        "  note: the possible range reaches {} of the search range {}..{}: widen --vary {} to see how far it "
        "goes\n",
        limits.possible_at_low_edge && limits.possible_at_high_edge ? "both ends"
        : limits.possible_at_low_edge                               ? "low end"
                                                                    : "high end",
        s.low, s.high, s.name);
  report += "parameter,unit,time [s],possible low,possible high,assured low,assured high\n";
  report += fmt::format("{},{},{},{},{},", s.name, fit::parameter_unit(s.name), in.at, limits.possible->lo,
                        limits.possible->hi);
  report += limits.assured ? fmt::format("{},{}\n", limits.assured->lo, limits.assured->hi) : ",\n";
  t.reading_limits = between;
  return t;
}

// --map: the reading over the first two varied parameters, the others held at the middle of their ranges. Returns
// ExitCode::NumericalFailure (said on `err`, no map written) when the forward model fails at every point.
int write_reading_map(const TranslateCommandOptions& options, const TranslateInputs& in, const Translation& t,
                      std::ostream& err) {
  const ParameterRange& xr = in.ranges[0];
  const ParameterRange& yr = in.ranges[1];
  const bool reverse = in.between.has_value();
  report::ReadingMap map;
  map.reading_limits = t.reading_limits;
  map.x_log = log_spaced(xr);
  map.y_log = log_spaced(yr);
  map.x = axis_values(xr, map_extent(xr, !reverse), options.map_points);
  map.y = axis_values(yr, map_extent(yr, !reverse), options.map_points);
  // Units as a reader writes them (Pa\u00b7s\u207f, not the interface's "Pa.s^n"), like every other report.
  map.x_name = fmt::format("{} [{}]", plain(xr.name), report::svg::unit_text(fit::parameter_unit(xr.name)));
  map.y_name = fmt::format("{} [{}]", plain(yr.name), report::svg::unit_text(fit::parameter_unit(yr.name)));
  map.reading_name = in.reading;
  map.title = fmt::format("{} at {} s on the {} ({}), {}", in.reading, in.at, in.rig_name,
                          options.test.filename().string(), law_name(in.law));
  Material held = in.nominal.material;
  for (std::size_t i = 2; i < in.ranges.size(); ++i) {
    held = fit::with_parameter(held, in.ranges[i].name, range_value(in.ranges[i], 0.5));
    map.notes.push_back(fmt::format("{} held at the middle of its range, {}", in.ranges[i].name,
                                    report::svg::unit_text(with_unit(range_value(in.ranges[i], 0.5), in.ranges[i].name))));
  }
  for (const std::string& s : options.set) map.notes.push_back("fixed: " + report::svg::unit_text(s));
  if (!reverse) {
    map.x_limits = std::pair{xr.lo, xr.hi};
    map.y_limits = std::pair{yr.lo, yr.hi};
    map.notes.push_back(
        "box: the parameter limits; shaded: the reading limits they give over every varied "
        "parameter");
  } else {
    map.notes.push_back("shaded: readings within the limits given");
    if (in.solved < 2) {
      (in.solved == 0 ? map.x_limits : map.y_limits) = std::pair{t.possible->lo, t.possible->hi};
      map.notes.push_back(fmt::format("box: the possible range of {}", in.ranges[in.solved].name));
    }
  }
  std::vector<Material> grid;
  for (double yv : map.y)
    for (double xv : map.x) grid.push_back(fit::with_parameter(fit::with_parameter(held, xr.name, xv), yr.name, yv));
  progress(err, fmt::format("translate --map: solving the {} at {} points", in.reading, grid.size()));
  const std::vector<std::optional<double>> values = qc::readings_at(in.setup, grid, in.when);
  map.reading.assign(map.y.size(), std::vector<double>(map.x.size(), std::numeric_limits<double>::quiet_NaN()));
  int failed = 0;
  for (std::size_t j = 0; j < map.y.size(); ++j)
    for (std::size_t i = 0; i < map.x.size(); ++i) {
      const auto& v = values[j * map.x.size() + i];
      if (v)
        map.reading[j][i] = *v;
      else
        ++failed;
    }
  if (failed == int(grid.size())) {
    err << fmt::format("spreadfit: {}: the forward model failed at every point of the map; no map written\n",
                       options.test.string());
    return to_int(ExitCode::NumericalFailure);
  }
  io::write_file_atomically(*options.map, report::reading_map_svg(map));
  return to_int(ExitCode::Done);
}

}  // namespace

int run_translate_command(const TranslateCommandOptions& options, std::ostream& out, std::ostream& err) {
  const TranslateInputs in = read_inputs(options);
  const std::optional<Translation> t =
      in.between ? parameter_limits_of(options, in, err) : reading_limits_of(options, in, err);
  if (!t) return to_int(ExitCode::NumericalFailure);
  const int code = options.map ? write_reading_map(options, in, *t, err) : to_int(ExitCode::Done);
  out << t->report;
  return code;
}

CommandRegistration add_translate_command(CLI::App& app) {
  struct Given {
    TranslateCommandOptions options;
    std::string test, between, solve, map, grid;
    CLI::Option* between_option = nullptr;
    CLI::Option* solve_option = nullptr;
    CLI::Option* map_option = nullptr;
    CLI::Option* grid_option = nullptr;
  };
  const auto given = std::make_shared<Given>();
  TranslateCommandOptions& o = given->options;
  CLI::App* translate = app.add_subcommand(
      "translate",
      "Turn parameter limits into reading limits on a rig at a time, or reading limits into parameter limits.");
  translate->add_option("TEST.toml", given->test, "Test description of the rig (readings optional)")
      ->required()
      ->type_name("");
  translate->add_option("--model", o.model, "Model: " + std::string(model_names_help))->required()->type_name("NAME");
  translate->add_option("--vary", o.vary, "PARAM=LOW:HIGH, e.g. yield_stress=\"20 Pa:35 Pa\"")
      ->required()
      ->type_name("PARAM=LOW:HIGH");
  translate->add_option("--set", o.set, "PARAM=VALUE for the parameters not varied")->type_name("PARAM=VALUE");
  translate->add_option("--at", o.at, "Reading time, in s or with a unit")->required()->type_name("T");
  translate->add_option("--points", o.points, "Grid points per varied parameter (default 5)")->type_name("N");
  given->between_option =
      translate->add_option("--between", given->between,
                            "Reading limits, e.g. \"5.5 cm:8 cm\": solve for parameter limits instead")
          ->type_name("LOW:HIGH");
  given->solve_option =
      translate
          ->add_option("--solve", given->solve, "With --between: the parameter to solve for (default: first --vary)")
          ->type_name("PARAM");
  given->map_option =
      translate->add_option("--map", given->map, "Also write an SVG map of the reading over the first two --vary")
          ->type_name("FILE.svg");
  translate->add_option("--map-points", o.map_points, "Map grid points per axis (default 21)")->type_name("M");
  given->grid_option =
      translate->add_option("--grid", given->grid, "Also write every grid point's parameters and reading as CSV")
          ->type_name("FILE.csv");
  translate->footer(std::string(exit_codes_without_spec));
  return {translate, [given](std::ostream& out, std::ostream& err) {
            TranslateCommandOptions options = given->options;
            options.test = given->test;
            options.between = given_text(given->between_option, given->between);
            options.solve = given_text(given->solve_option, given->solve);
            if (auto map = given_text(given->map_option, given->map)) options.map = *map;
            if (auto grid = given_text(given->grid_option, given->grid)) options.grid = *grid;
            return run_translate_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
