#include "src/cli/fit_command.hpp"

#include <fmt/format.h>
#include <cctype>
#include <map>

#include "src/cli/exit_codes.hpp"
#include "src/fit/final_only.hpp"
#include "src/fit/fit_law.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/test_description.hpp"
#include "src/qc/verdict.hpp"
#include "src/report/result_json.hpp"
#include "src/report/summary_table.hpp"

namespace spreadfit::cli {

namespace {

std::vector<FitSeries> series_of(const std::vector<io::TestDescription>& tests) {
  std::vector<FitSeries> out;
  for (const auto& t : tests)
    for (const auto& s : t.series) {
      FitSeries f;
      f.setup = t.setup;
      f.setup.reading = s.kind;
      f.times = s.times;
      f.values = s.values;
      f.sigma = t.resolution;
      f.label = s.source;
      out.push_back(std::move(f));
    }
  return out;
}

// Fits one material: all tests of one sample id.
FitOutcome fit_material(std::vector<io::TestDescription> tests, const std::optional<Law>& forced) {
  FitOutcome o;
  o.tests = std::move(tests);
  const io::TestDescription& first = o.tests.front();
  const std::vector<FitSeries> series = series_of(o.tests);
  if (series.empty()) {
    // Final-only: one arrested reading per test; the first test's reading gives the estimate.
    const io::TestDescription* t = nullptr;
    for (const auto& d : o.tests)
      if (d.final_reading) t = &d;
    if (t == nullptr) {
      throw io::InputError(first.path.string(), 0, "readings",
                           "no readings to fit (expected [readings] file, files or final)");
    }
    o.candidates.push_back(fit_final_reading(t->setup, *t->final_reading, t->resolution));
    o.chosen = o.candidates.front().converged() ? 0 : -1;
    o.choice_explanation = "yield stress from the arrested reading";
  } else {
    FitOptions options;
    options.fit_time_origin = first.fit.fit_time_origin;
    options.ignore_before = first.fit.ignore_before;
    const std::optional<Law> law = forced ? forced : first.fit.model;
    if (law) {
      o.candidates.push_back(fit_law(series, *law, options));
      o.chosen = o.candidates.front().converged() ? 0 : -1;
    } else {
      ModelChoice choice = fit_auto(series, options);
      o.candidates = std::move(choice.candidates);
      o.chosen = choice.chosen;
      o.choice_explanation = choice.explanation;
    }
  }
  std::vector<io::SpecLimit> limits;
  for (const auto& t : o.tests) limits.insert(limits.end(), t.spec.begin(), t.spec.end());
  o.verdict = judge(o.result() ? *o.result() : (o.candidates.empty() ? FitResult{} : o.candidates.front()), limits);
  return o;
}

std::string file_stem_safe(const std::string& id) {
  std::string s = id;
  for (char& c : s)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.')) c = '_';
  return s;
}

}  // namespace

int run_fit_command(const FitCommandOptions& options, std::ostream& out, std::ostream& err) {
  // Reports, batch history and spec catalogues come in a later release: refuse rather than silently ignore.
  const std::pair<const std::optional<std::filesystem::path>*, const char*> later[] = {
      {&options.plot, "--plot"}, {&options.db, "--db"}, {&options.specs, "--specs"}, {&options.csv, "--csv"}};
  for (const auto& [value, name] : later)
    if (*value)
      throw io::InputError("", 0, name,
                           "not available in this version (planned: SVG reports, batch history, spec catalogues "
                           "and CSV summaries); use --json or --out-dir");
  std::optional<Law> forced;
  if (!options.model.empty() && options.model != "auto") {
    forced = law_from_name(options.model);
    if (!forced) {
      std::vector<std::string_view> names{"auto"};
      for (Law l : all_laws()) names.push_back(law_name(l));
      throw io::InputError("", 0, "--model", fmt::format("unknown model '{}'{}", options.model,
                                                          io::did_you_mean(options.model, names)));
    }
  }
  // Read every test; a bad file is reported and skipped so the others still run (exit 2 at the end).
  bool bad_input = false;
  std::map<std::string, std::vector<io::TestDescription>> by_sample;
  std::vector<std::string> order;
  for (const auto& path : options.tests) {
    try {
      io::TestDescription t = io::load_test_description(path);
      if (!by_sample.count(t.sample_id)) order.push_back(t.sample_id);
      by_sample[t.sample_id].push_back(std::move(t));
    } catch (const io::InputError& e) {
      err << "spreadfit: " << e.what() << "\n";
      bad_input = true;
    }
  }
  bool out_of_spec = false, failed = false;
  nlohmann::json all = nlohmann::json::array();
  for (const std::string& id : order) {
    std::vector<io::TestDescription> tests = std::move(by_sample[id]);
    const std::string where = tests.front().path.string();
    FitOutcome o;
    try {
      o = fit_material(std::move(tests), forced);
    } catch (const io::InputError& e) {
      err << "spreadfit: " << e.what() << "\n";
      bad_input = true;
      continue;
    }
    out << summary_table(o) << "\n";
    if (!o.result()) {
      failed = true;
      err << fmt::format("spreadfit: {}: sample {}: the fit failed; no parameters reported\n", where, id);
    }
    if (o.verdict.status == Verdict::Status::Fail) out_of_spec = true;
    const nlohmann::json j = result_json(o);
    all.push_back(j);
    if (options.out_dir) io::write_file_atomically(*options.out_dir / (file_stem_safe(id) + ".json"), j.dump(2) + "\n");
  }
  if (options.json && !all.empty())
    io::write_file_atomically(*options.json, (all.size() == 1 ? all.front() : all).dump(2) + "\n");
  if (bad_input) return to_int(ExitCode::BadInput);
  if (failed) return to_int(ExitCode::NumericalFailure);
  return to_int(out_of_spec ? ExitCode::OutOfSpec : ExitCode::Done);
}

}  // namespace spreadfit::cli
