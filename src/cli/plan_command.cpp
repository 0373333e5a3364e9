#include "src/cli/plan_command.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <utility>
#include <variant>
#include <memory>

#include "src/cli/exit_codes.hpp"
#include "src/cli/parameter_ranges.hpp"
#include "src/fit/parameter_names.hpp"
#include "src/cli/command_line_values.hpp"
#include "src/fit/design_check.hpp"
#include "src/cli/progress.hpp"
#include "src/fit/expected_intervals.hpp"
#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"
#include "src/cli/path_option.hpp"

namespace spreadfit::cli {

namespace {

constexpr double default_sigma = 1e-3;  // a ruler read to the millimetre (common practice, no source)
constexpr int max_check = 1000;         // refits per candidate: a bound on the check's run time

/// One candidate test as planned: what it is and how it scores over the guesses.
struct Candidate {
  std::string name;
  TestSetup setup;
  std::vector<double> times;
  double sigma = default_sigma;
  fit::WorstCaseEstimate estimate;
};

std::string ratio_text(double r) {
  return r < fit::undetermined_ratio ? fmt::format("{:.3g}x", r) : std::string("undetermined");
}

/// A ratio in the check's table: four digits, since the two columns are compared by their logarithms; "-" when
/// too few refits converged for a spread.
std::string check_text(double r) {
  if (std::isnan(r)) return "-";
  return r < fit::undetermined_ratio ? fmt::format("{:.4g}x", r) : std::string("undetermined");
}

/// A guess named by its varied values in SI, "20/5" (the header says which parameters, in which order).
std::string guess_label(const Material& m, const std::vector<ParameterRange>& ranges) {
  std::string out;
  for (const ParameterRange& r : ranges) {
    const double v = fit::material_value(m, r.name);
    out += fmt::format("{}{:.3g}", out.empty() ? "" : "/", v);
  }
  return out;
}

/// "yield_stress=20 viscosity=5": the guess in SI, for sentences.
std::string guess_words(const Material& m, const std::vector<std::string>& names) {
  std::string out;
  for (const std::string& n : names) {
    const double v = fit::material_value(m, n);
    out += fmt::format("{}{}={:.3g}", out.empty() ? "" : " ", n, v);
  }
  return out;
}

/// How often the guessed material stops before the last reading: "yes"/"no" for one guess, "k/G" for several.
std::string stopped_text(const fit::WorstCaseEstimate& e) {
  if (e.guesses.size() == 1) return e.stopped > 0 ? "yes" : "no";
  return fmt::format("{}/{}", e.stopped, e.guesses.size());
}

/// The spacing of evenly spaced times [s] (from the release, so the first reading is one interval in), else 0.
double uniform_interval(const std::vector<double>& t) {
  const double step = t.front();
  for (std::size_t i = 1; i < t.size(); ++i)
    if (std::abs(t[i] - t[i - 1] - step) > 1e-6 * step) return 0;
  return step;
}

/// Two ratios, with enough digits to tell them apart (up to six).
std::pair<std::string, std::string> ratio_pair(double a, double b) {
  if (!(a < fit::undetermined_ratio) || !(b < fit::undetermined_ratio)) return {ratio_text(a), ratio_text(b)};
  for (int digits = 3; digits < 6; ++digits) {
    const std::string x = fmt::format("{:.{}g}x", a, digits), y = fmt::format("{:.{}g}x", b, digits);
    if (x != y) return {x, y};
  }
  return {fmt::format("{:.6g}x", a), fmt::format("{:.6g}x", b)};
}

/// The ways `a` differs from `b` as a test (rig, fill, duration, reading count, resolution), in words.
std::vector<std::string> differences(const Candidate& a, const Candidate& b) {
  std::vector<std::string> out;
  const std::string_view ka = io::rig_kind_name(a.setup.rig), kb = io::rig_kind_name(b.setup.rig);
  if (ka != kb) out.push_back(fmt::format("rig {} vs {}", ka, kb));
  const double va = fill_volume(a.setup.rig), vb = fill_volume(b.setup.rig);
  if (std::abs(va - vb) > 1e-9 * std::max(va, vb))
    out.push_back(fmt::format("fill {:.3g} mL vs {:.3g} mL", va * 1e6, vb * 1e6));  // 1 m^3 = 1e6 mL (SI)
  if (a.times.back() != b.times.back())
    out.push_back(fmt::format("duration {:.4g} s vs {:.4g} s", a.times.back(), b.times.back()));
  const double ia = uniform_interval(a.times), ib = uniform_interval(b.times);
  if (ia > 0 && ib > 0 && std::abs(ia - ib) > 1e-9 * std::max(ia, ib))
    out.push_back(fmt::format("reading interval {:.4g} s vs {:.4g} s", ia, ib));
  else if (a.times.front() != b.times.front())
    out.push_back(fmt::format("first reading {:.4g} s vs {:.4g} s", a.times.front(), b.times.front()));
  if (a.times.size() != b.times.size()) out.push_back(fmt::format("{} vs {} readings", a.times.size(), b.times.size()));
  if (a.sigma != b.sigma) out.push_back(fmt::format("resolution {:.3g} mm vs {:.3g} mm", a.sigma * 1e3, b.sigma * 1e3));
  return out;
}

/// Ranking of two candidates that both solved: fewer undetermined parameters first, then the lower score over
/// the determined ones (for candidates that determine everything, design_score itself).
bool ranks_before(const fit::WorstCaseEstimate& a, const fit::WorstCaseEstimate& b) {
  const auto key = [](const fit::WorstCaseEstimate& e) {
    std::vector<double> determined;
    for (double r : e.worst_ratio)
      if (r < fit::undetermined_ratio) determined.push_back(r);
    return std::pair{e.worst_ratio.size() - determined.size(), fit::design_score(determined)};
  };
  return key(a) < key(b);
}

std::string join(const std::vector<std::string>& parts, std::string_view sep) {
  std::string out;
  for (const std::string& p : parts) out += (out.empty() ? "" : std::string(sep)) + p;
  return out;
}

// The table: one row per candidate, each parameter's (worst) expected ratio, and whether the sample stops.
void print_table(std::ostream& out, const PlanCommandOptions& options, Law law,
                 const std::vector<ParameterRange>& ranges, const std::vector<Material>& guesses, int points,
                 const std::vector<Candidate>& rows) {
  const bool range = !ranges.empty();
  const std::vector<std::string>& names = rows.front().estimate.names;
  if (range) {
    std::string over;
    for (const ParameterRange& r : ranges)
      over += fmt::format("{}{} {}..{}", over.empty() ? "" : ", ", r.name, r.low, r.high);
    std::string order;
    for (const ParameterRange& r : ranges) order += (order.empty() ? "" : "/") + r.name;
    out << fmt::format("Expected 95% intervals (upper/lower) for {}, worst case over {} guesses ({} points each): {}",
                       law_name(law), guesses.size(), points, over);
    for (const auto& s : options.set) out << " " << s;
    out << fmt::format(
        "\n  (@ the worst guess as {} in SI units; stopped: guesses whose reading at 10x the duration is "
        "within the resolution of the last)\n",
        order);
  } else {
    out << fmt::format("Expected 95% intervals (upper/lower) for {} with", law_name(law));
    for (const auto& s : options.set) out << " " << s;
    out << "\n  (stopped: the reading at 10x the duration is within the resolution of the last)\n";
  }
  const int width = range ? 24 : 16;
  out << fmt::format("  {:<24}", "candidate");
  for (const auto& n : names) out << fmt::format(" {:>{}}", n, width);
  out << fmt::format(" {:>8}\n", "stopped");
  for (std::size_t i = 0; i < rows.size(); ++i) {
    const fit::WorstCaseEstimate& e = rows[i].estimate;
    out << fmt::format("  {:<24}", rows[i].name);
    if (!e.ok()) {
      const fit::DesignEstimate& failed = e.guesses[e.first_failure];
      out << (range ? fmt::format(" forward model failed for {} of {} guesses, first at {} ({})\n", e.failed,
                                  e.guesses.size(), guess_words(guesses[e.first_failure], names), failed.message)
                    : fmt::format(" forward model failed ({})\n", failed.message));
      continue;
    }
    for (std::size_t p = 0; p < e.worst_ratio.size(); ++p) {
      const std::string cell = ratio_text(e.worst_ratio[p]);
      out << fmt::format(" {:>{}}", range ? cell + " @" + guess_label(guesses[e.worst_guess[p]], ranges) : cell, width);
    }
    out << fmt::format(" {:>8}\n", stopped_text(e));
  }
}

// The best-ranked candidate that solved, other than `skip` (rows.size() when none).
std::size_t pick(const std::vector<Candidate>& rows, std::size_t skip) {
  std::size_t chosen = rows.size();
  for (std::size_t i = 0; i < rows.size(); ++i)
    if (i != skip && rows[i].estimate.ok() &&
        (chosen == rows.size() || ranks_before(rows[i].estimate, rows[chosen].estimate)))
      chosen = i;
  return chosen;
}

// The recommendation and its reasons, each read off the numbers in the table; `second` is the runner-up
// (rows.size() when there is none).
void print_reasons(std::ostream& out, const std::vector<ParameterRange>& ranges, const std::vector<Material>& guesses,
                   const std::vector<Candidate>& rows, std::size_t best, std::size_t second) {
  const bool range = !ranges.empty();
  const std::vector<std::string>& names = rows[best].estimate.names;
  const Candidate& b = rows[best];
  const fit::WorstCaseEstimate& e = b.estimate;
  std::size_t limiting = 0;
  for (std::size_t i = 1; i < e.worst_ratio.size(); ++i)
    if (e.worst_ratio[i] > e.worst_ratio[limiting]) limiting = i;
  if (range)
    out << fmt::format(
        "recommended: {} (narrowest worst-case intervals overall; its widest is the {}, a factor {:.3g} "
        "at {})\n",
        b.name, names[limiting], e.worst_ratio[limiting], guess_words(guesses[e.worst_guess[limiting]], names));
  else
    out << fmt::format("recommended: {} (narrowest intervals overall; its widest is the {}, a factor {:.3g})\n", b.name,
                       names[limiting], e.worst_ratio[limiting]);
  if (io::is_parameter(names[limiting], io::Parameter::YieldStress))
    out << "  the yield stress shows in the approach to arrest: readings should continue until the sample stops\n";

  // Whether the guessed material stops within each test.
  if (range) {
    std::string others;
    for (std::size_t i = 0; i < rows.size(); ++i)
      if (i != best && rows[i].estimate.ok())
        others += fmt::format("{}{} on {}", others.empty() ? "" : ", ", stopped_text(rows[i].estimate), rows[i].name);
    out << fmt::format("  the sample stops within the test for {} guesses on {}{}\n", stopped_text(e), b.name,
                       others.empty() ? std::string() : " (" + others + ")");
  } else {
    std::vector<std::string> alike, unlike;
    for (std::size_t i = 0; i < rows.size(); ++i)
      if (i != best && rows[i].estimate.ok())
        ((rows[i].estimate.stopped > 0) == (e.stopped > 0) ? alike : unlike).push_back(rows[i].name);
    out << fmt::format("  the sample {} on {}",
                       e.stopped > 0 ? "stops within the test" : "is still moving at the end of the test", b.name);
    if (!alike.empty()) out << ", as on " << join(alike, ", ");
    if (!unlike.empty())
      out << (e.stopped > 0 ? "; it is still moving at the end on " : "; it stops within the test on ")
          << join(unlike, ", ");
    out << "\n";
  }

  // Over a range: at the guess where the yield stress is worst resolved, whether the sample had stopped (for one
  // guess the sentence above says it).
  if (range)
    for (std::size_t p = 0; p < names.size(); ++p)
      if (io::is_parameter(names[p], io::Parameter::YieldStress) && !e.guesses[e.worst_guess[p]].stopped)
        out << fmt::format(
            "  at {}, its widest yield-stress case, the sample is still moving at the end of {}, which leaves the "
            "yield stress at {}\n",
            guess_words(guesses[e.worst_guess[p]], names), b.name, ratio_text(e.worst_ratio[p]));

  // Against the runner-up: where it is narrower and how the tests differ.
  if (second < rows.size()) {
    const Candidate& r = rows[second];
    std::vector<std::string> narrower;
    for (std::size_t p = 0; p < names.size(); ++p)
      if (e.worst_ratio[p] < r.estimate.worst_ratio[p]) {
        const auto [mine, theirs] = ratio_pair(e.worst_ratio[p], r.estimate.worst_ratio[p]);
        narrower.push_back(fmt::format("{} ({} vs {})", names[p], mine, theirs));
      }
    const std::vector<std::string> diff = differences(b, r);
    out << fmt::format("  against the runner-up {}: narrower for {}", r.name,
                       narrower.empty() ? std::string("no single parameter") : join(narrower, ", "));
    out << (diff.empty() ? std::string("; the two tests are set up alike")
                         : "; the tests differ in " + join(diff, ", "))
        << "\n";
  }
}

// The Monte Carlo check at the middle of the ranges, for the recommended candidate and the runner-up.
void print_check(std::ostream& out, std::ostream& err, const PlanCommandOptions& options, Law law, const SimulationParameters& base,
                 const std::vector<ParameterRange>& ranges, const std::vector<Candidate>& rows, std::size_t best,
                 std::size_t second) {
  const std::vector<std::string>& names = rows[best].estimate.names;
  Material middle = base.material;
  for (const ParameterRange& r : ranges) middle = fit::with_parameter(middle, r.name, range_value(r, 0.5));
  constexpr unsigned first_seed = 1000;
  out << fmt::format(
      "check: {} simulated reading sets per candidate at {} (noise of the resolution, seeds {}-{}), "
      "refitted with {}\n",
      options.check, guess_words(middle, names), first_seed, first_seed + unsigned(options.check) - 1, law_name(law));
  out << fmt::format("  {:<24} {:<16} {:>12} {:>12} {:>10}\n", "candidate", "parameter", "planned", "refits",
                     "converged");
  for (std::size_t i : {best, second}) {
    if (i >= rows.size()) continue;
    const Candidate& c = rows[i];
    progress(err, fmt::format("plan --check: refitting {} simulated reading sets of {}", options.check, c.name));
    const fit::DesignCheck k = fit::check_design(c.setup, law, middle, c.times, c.sigma, options.check, first_seed);
    if (k.planned_ratio.empty()) {
      out << fmt::format("  {:<24} forward model failed at this guess ({})\n", c.name, k.message);
      continue;
    }
    for (std::size_t p = 0; p < k.names.size(); ++p)
      out << fmt::format("  {:<24} {:<16} {:>12} {:>12} {:>10}\n", c.name, k.names[p], check_text(k.planned_ratio[p]),
                         check_text(k.empirical_ratio[p]), fmt::format("{}/{}", k.converged, k.replicates));
  }
}

}  // namespace

int run_plan_command(const PlanCommandOptions& options, std::ostream& out, std::ostream& err) {
  const std::string where(command_line_source);
  const Law law = parse_simulation_model(options.model);
  if (options.points && options.vary.empty())
    throw io::InputError(where, 0, "--points", "given without --vary (expected --vary PARAM=LOW:HIGH to set a range)");
  const int points = options.points.value_or(3);
  check_grid_points(points, "--points");
  if (options.check < 0 || options.check > max_check)
    throw io::InputError(where, 0, "--check", fmt::format("{} refits (expected 0 to {})", options.check, max_check));
  const std::vector<ParameterRange> ranges = parse_parameter_ranges(law, options.set, options.vary);
  const SimulationParameters base = range_base(law, options.set, ranges);
  const double every = parse_one_time(options.every, "--every"), until = parse_one_time(options.until, "--until");
  if (!(every > 0) || until < every)
    throw io::InputError(where, 0, "--every/--until", "expected one interval > 0 and a duration at least as long");
  if (until / every > static_cast<double>(max_times))
    throw io::InputError(where, 0, "--every/--until",
                         fmt::format("{} readings per candidate (expected at most {}; take a longer --every)",
                                     fmt::format("{:.3g}", until / every), max_times));
  if (options.candidates.empty()) throw io::InputError(where, 0, "CANDIDATE.toml", "expected at least one");

  const std::vector<GridPoint> grid = parameter_grid(base.material, ranges, points);
  std::vector<Material> guesses;
  for (const GridPoint& g : grid) guesses.push_back(g.material);
  const bool range = !ranges.empty();

  std::vector<Candidate> rows;
  for (const auto& path : options.candidates) {
    progress(err, fmt::format("plan: candidate {}/{} ({}), {} guess{}", rows.size() + 1, options.candidates.size(),
                              path.filename().string(), guesses.size(), guesses.size() == 1 ? "" : "es"));
    const io::TestDescription test = io::load_test_description(path);
    Candidate c{path.filename().string(), test.setup, {}, test.resolution.value_or(default_sigma), {}};
    if (!test.series.empty()) {
      c.setup.reading = test.series.front().kind;
      c.times = test.series.front().times;
    } else {
      // Bounded by until/every readings (both checked above).
      for (double t = every; t <= until + 1e-9; t += every) c.times.push_back(t);
    }
    c.estimate = fit::worst_case_intervals(c.setup, law, guesses, c.times, c.sigma);
    rows.push_back(std::move(c));
  }

  print_table(out, options, law, ranges, guesses, points, rows);
  const std::size_t best = pick(rows, rows.size());
  if (best == rows.size() || !std::isfinite(rows[best].estimate.score())) {
    err << "spreadfit: no candidate determines every parameter of this law" << (range ? " at every guess" : "")
        << " (see the table); no recommendation\n";
    return to_int(ExitCode::NumericalFailure);
  }

  const std::size_t second = pick(rows, best);
  print_reasons(out, ranges, guesses, rows, best, second);
  if (options.check > 0) print_check(out, err, options, law, base, ranges, rows, best, second);
  return to_int(ExitCode::Done);
}

CommandRegistration add_plan_command(CLI::App& app) {
  struct Given {
    PlanCommandOptions options;
    std::vector<std::string> candidates;
  };
  const auto given = std::make_shared<Given>();
  PlanCommandOptions& o = given->options;
  CLI::App* plan = app.add_subcommand(
      "plan", "Compare candidate tests by the expected 95% intervals of the parameters for a guessed material.");
  plan->add_option("CANDIDATE.toml", given->candidates, "Test descriptions of the candidate tests")
      ->required()
      ->type_name("");
  plan->add_option("--model", o.model, "Model: " + std::string(model_names_help))->required()->type_name("NAME");
  plan->add_option("--set", o.set, "PARAM=VALUE of the guessed material (the parameters not varied)")
      ->type_name("PARAM=VALUE");
  plan->add_option("--vary", o.vary,
                   "PARAM=LOW:HIGH, a range of the guess, e.g. yield_stress=\"10 Pa:40 Pa\"; candidates are judged by "
                   "their worst case over the guesses")
      ->type_name("PARAM=LOW:HIGH");
  // A function, not a value: the option's storage is optional (given or not).
  plan->add_option_function<int>(
          "--points", [&o](const int& n) { o.points = n; },
          "Guesses per varied parameter (default 3; log-spaced except the flow index)")
      ->type_name("N");
  plan->add_option("--check", o.check,
                   "Refit N simulated reading sets of the recommended test and the runner-up at the middle guess "
                   "(default 0: no check)")
      ->type_name("N");
  plan->add_option("--every", o.every, "Reading interval for candidates without readings (default 5 s)")
      ->type_name("DT");
  plan->add_option("--until", o.until, "Duration for candidates without readings (default 120 s)")->type_name("T");
  plan->footer(std::string(exit_codes_without_spec));
  return {plan, [given](std::ostream& out, std::ostream& err) {
            PlanCommandOptions options = given->options;
            options.candidates.assign(given->candidates.begin(), given->candidates.end());
            return run_plan_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
