#include "src/cli/fit_command.hpp"

#include <fmt/format.h>
#include <algorithm>
#include <cctype>
#include <unistd.h>
#include <map>
#include <mutex>
#include <set>
#include <optional>
#include <memory>

#include "models/temperature.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/cli/history_command.hpp"
#include "src/cli/output_paths.hpp"
#include "src/fit/final_only.hpp"
#include "src/fit/fit_law.hpp"
#include "src/fit/flow_index_prior.hpp"
#include "src/history/history_db.hpp"
#include "src/history/history_location.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/parameter_table.hpp"
#include "src/io/description_file.hpp"
#include "src/parallel_for.hpp"
#include "src/qc/verdict.hpp"
#include "src/report/fit_plot.hpp"
#include "src/report/result_json.hpp"
#include "src/report/summary_csv.hpp"
#include "src/report/summary_table.hpp"
#include "src/cli/path_option.hpp"

namespace spreadfit::cli {

namespace {

std::vector<fit::FitSeries> series_of(const std::vector<io::TestDescription>& tests) {
  std::vector<fit::FitSeries> out;
  for (const auto& t : tests)
    for (const auto& s : t.series) {
      fit::FitSeries f;
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

// Throws io::InputError when the tests of one sample id give nothing to fit (no series and no final reading).
void check_fittable(const std::vector<io::TestDescription>& tests) {
  for (const auto& t : tests)
    if (!t.series.empty() || t.final_reading) return;
  throw io::InputError(tests.front().path.string(), 0, "readings",
                       "no readings to fit (expected [readings] file, files or final)");
}

// The flow index each earlier batch of `product` got from its readings alone (the history's result JSON), for
// learning a prior. Batches fitted with a prior contribute their readings-alone value, never the prior's.
// A history file that does not exist yet has no earlier batches (the first `fit --db` creates it).
std::vector<fit::BatchFlowIndex> earlier_flow_indices(const std::string& db, const std::string& product) {
  std::vector<fit::BatchFlowIndex> out;
  if (product.empty() || (!history::is_server_uri(db) && !std::filesystem::exists(db))) return out;
  std::vector<history::StoredResult> earlier;
  try {
    earlier = history::load(db, product);
  } catch (const io::InputError&) {
    // A server database whose schema the first writer has not created yet (or one that cannot be read): no
    // earlier batches to learn from; recording the result reports any real problem with the history.
    return out;
  }
  const std::string flow_index(io::parameter_name(io::Parameter::FlowIndex));
  for (const history::StoredResult& r : earlier) {
    const nlohmann::json j = nlohmann::json::parse(r.result_json, nullptr, false);
    if (j.is_discarded() || !j.is_object()) continue;
    fit::BatchFlowIndex b;
    const nlohmann::json* n = nullptr;
    if (j.contains("fit") && j["fit"].contains("flow_index_without_prior")) {
      n = &j["fit"]["flow_index_without_prior"];
      b.determined = n->value("determined", false);
    } else if (j.contains("parameters") && j["parameters"].contains(flow_index)) {
      n = &j["parameters"][flow_index];
      b.determined = n->value("identifiable", true) && !n->value("lower_open", false) && !n->value("upper_open", false);
    }
    if (!n || !n->contains("value") || !n->contains("ci95") || !(*n)["ci95"].is_array() || (*n)["ci95"].size() != 2 ||
        !(*n)["value"].is_number() || !(*n)["ci95"][0].is_number() || !(*n)["ci95"][1].is_number())
      continue;
    b.value = (*n)["value"].get<double>();
    b.lower = (*n)["ci95"][0].get<double>();
    b.upper = (*n)["ci95"][1].get<double>();
    out.push_back(b);
  }
  return out;
}

// The prior on the flow index for this material: the spec catalogue's, else one learned from the history (--db).
std::optional<fit::FlowIndexPrior> prior_for(const io::ProductSpec* product, const std::string& product_code,
                                        const FitCommandOptions& options, std::string& note) {
  if (!options.use_prior) return std::nullopt;
  if (product && product->flow_index_prior) {
    fit::FlowIndexPrior p;
    p.typical = product->flow_index_prior->first;
    p.spread = product->flow_index_prior->second;
    p.source = "from the spec catalogue";
    return p;
  }
  if (!options.db) return std::nullopt;
  std::string why_not;
  std::optional<fit::FlowIndexPrior> learned =
      fit::learn_flow_index_prior(earlier_flow_indices(options.db->string(), product_code), &why_not);
  if (!learned && !product_code.empty()) note = "no flow-index prior: " + why_not;
  return learned;
}

// One material's fit and what it has to say, kept until the materials before it are reported.
struct MaterialRun {
  report::FitOutcome outcome;
  std::string where;                       // the first test file, for messages
  std::string notes;                       // lines for stderr (catalogue notes)
  std::optional<std::string> input_error;  // the message of a bad input found while fitting
};

// Fits one material: all tests of one sample id.
report::FitOutcome fit_material(std::vector<io::TestDescription> tests, const std::optional<Law>& forced,
                        const io::ProductSpec* product, const std::optional<fit::FlowIndexPrior>& prior,
                        const std::string& prior_absent) {
  const std::vector<io::SpecLimit> none;
  const std::vector<io::SpecLimit>& catalogue_limits = product ? product->limits : none;
  report::FitOutcome o;
  o.tests = std::move(tests);
  const io::TestDescription& first = o.tests.front();
  check_fittable(o.tests);
  const std::vector<fit::FitSeries> series = series_of(o.tests);
  if (series.empty()) {
    // Final-only: one arrested reading per test; the first test's reading gives the estimate.
    const io::TestDescription* t = nullptr;
    for (const auto& d : o.tests)
      if (d.final_reading) t = &d;
    o.candidates.push_back(fit::fit_final_reading(t->setup, *t->final_reading, t->resolution));
    o.chosen = o.candidates.front().converged() ? 0 : -1;
    o.choice_explanation = "yield stress from the arrested reading";
  } else {
    fit::FitOptions options;
    options.fit_time_origin = first.fit.fit_time_origin;
    options.ignore_before = first.fit.ignore_before;
    const std::optional<Law> law = forced ? forced : first.fit.model;
    // With a flow-index prior the reported fit is usually the refit with it (fit_with_prior), and the likelihood
    // draws of the fit before it (about 400 of its solves) would be thrown away: the first pass draws none, and the
    // fit reported gets its draws below. A law given without a flow index never takes the prior: its one fit keeps
    // its draws (a refit for them would repeat the whole fit).
    const auto has_flow_index = [](Law l) { return l == Law::PowerLaw || l == Law::HerschelBulkley; };
    fit::FitOptions first_pass = options;
    if (prior && (!law || has_flow_index(*law))) first_pass.likelihood_draws = 0;
    if (law) {
      o.candidates.push_back(fit::fit_named(series, *law, first_pass));
      o.chosen = o.candidates.front().converged() ? 0 : -1;
    } else {
      fit::ModelChoice choice = fit_auto(series, first_pass);
      o.candidates = std::move(choice.candidates);
      o.chosen = choice.chosen;
      o.best_description = choice.best_description;
      o.weights = choice.weights;
      o.choice_explanation = choice.explanation;
    }
    if (o.result()) {
      fit::FitResult& r = o.candidates[std::size_t(o.chosen)];
      const bool has_n = has_flow_index(r.law);
      if (prior && has_n) r = fit::fit_with_prior(series, r, options, *prior);
      else if (has_n && !prior_absent.empty()) r.warnings.push_back(prior_absent);
      if (prior) r = fit::with_likelihood_draws(series, std::move(r), options);  // kept as is when it has them
    }
  }
  // Inline [spec] limits override the catalogue's, parameter by parameter.
  std::vector<io::SpecLimit> limits;
  for (const auto& t : o.tests) limits.insert(limits.end(), t.spec.begin(), t.spec.end());
  for (const io::SpecLimit& c : catalogue_limits) {
    const bool overridden = std::any_of(limits.begin(), limits.end(),
                                        [&](const io::SpecLimit& l) { return l.parameter == c.parameter; });
    if (!overridden) limits.push_back(c);
  }
  // Temperature: limits apply at the product's reference temperature; shift the fitted values there by Arrhenius.
  fit::FitResult judged = o.result() ? *o.result() : (o.candidates.empty() ? fit::FitResult{} : o.candidates.front());
  if (product && product->reference_temperature && o.result()) {
    if (!first.temperature) {
      o.candidates[std::size_t(o.chosen)].warnings.push_back(
          "the product's limits are set at a reference temperature but this test gives no [sample] temperature: "
          "they were applied to the values as measured");
    } else {
      o.reference_temperature = *product->reference_temperature;
      for (fit::ParameterEstimate& p : judged.parameters) {
        double factor = 1.0;
        if (io::is_parameter(p.name, io::Parameter::Viscosity) ||
            io::is_parameter(p.name, io::Parameter::Consistency))
          factor = arrhenius_factor(product->activation_energy, *first.temperature, *o.reference_temperature);
        else if (io::is_parameter(p.name, io::Parameter::YieldStress))
          factor = arrhenius_factor(product->yield_stress_activation_energy, *first.temperature,
                                    *o.reference_temperature);
        else
          continue;
        p.value *= factor;
        p.lower *= factor;
        p.upper *= factor;
      }
      o.reference_parameters.clear();
      for (const fit::ParameterEstimate& p : judged.parameters)
        if (!io::is_parameter(p.name, io::Parameter::TimeOrigin)) o.reference_parameters.push_back(p);
    }
  }
  o.verdict = qc::judge(judged, limits);
  return o;
}

std::string file_stem_safe(const std::string& id) {
  std::string s = id;
  for (char& c : s)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.')) c = '_';
  return s;
}

// --- the stages of run_fit_command ------------------------------------------------------------------------------

/// --model: nullopt for auto (or none given: each test's [fit] model decides).
std::optional<Law> forced_law(const std::string& model) {
  if (model.empty() || model == "auto") return std::nullopt;
  if (const std::optional<Law> law = law_from_name(model)) return law;
  std::vector<std::string_view> names{"auto"};
  for (Law l : all_laws()) names.push_back(law_name(l));
  throw io::InputError("", 0, "--model",
                       fmt::format("unknown model '{}'{}", model, io::did_you_mean(model, names)));
}

/// The run's test descriptions grouped by sample id (tests sharing one are one material), in input order.
struct Batch {
  std::map<std::string, std::vector<io::TestDescription>> by_sample;
  std::vector<std::string> order;  ///< sample ids in the order their first test was given
};

/// Reads every test description, reporting each bad one on `err`; their unusual-value warnings follow, material by
/// material. Returns how many problem lines it reported (0: all read).
int read_batch(const FitCommandOptions& options, Batch& batch, std::ostream& err) {
  int problems = 0;
  for (const auto& path : options.tests) {
    try {
      io::TestDescription t = io::load_test_description(path);
      if (!batch.by_sample.count(t.sample_id)) batch.order.push_back(t.sample_id);
      batch.by_sample[t.sample_id].push_back(std::move(t));
    } catch (const io::InputError& e) {
      io::print_input_error(err, e);
      problems += 1 + int(e.further().size()) + (e.truncated() ? 1 : 0);
    }
  }
  for (const std::string& id : batch.order)
    for (const io::TestDescription& t : batch.by_sample[id])
      for (const std::string& warning : t.warnings) err << "spreadfit: warning: " << warning << "\n";
  return problems;
}

/// Spec catalogues: --specs, else a specs.toml beside each test file, each read once.
class Catalogues {
 public:
  explicit Catalogues(const FitCommandOptions& options) : options_(options) {}
  /// The catalogue that applies to `t`; nullptr when there is none (no --specs and no specs.toml beside it).
  const std::map<std::string, io::ProductSpec>* for_test(const io::TestDescription& t) {
    std::filesystem::path file = options_.specs ? *options_.specs : t.path.parent_path() / "specs.toml";
    if (!options_.specs && !std::filesystem::exists(file)) return nullptr;
    auto it = read_.find(file);
    if (it == read_.end()) it = read_.emplace(file, io::load_spec_catalogue(file)).first;
    return &it->second;
  }

 private:
  const FitCommandOptions& options_;
  std::map<std::filesystem::path, std::map<std::string, io::ProductSpec>> read_;
};

/// --require-spec: a material with no limits (no [spec] in its tests, no catalogue entry with limits) is bad input.
void check_required_spec(const std::vector<io::TestDescription>& tests,
                         const std::map<std::string, io::ProductSpec>* catalogue) {
  const bool inline_limits =
      std::any_of(tests.begin(), tests.end(), [](const io::TestDescription& t) { return !t.spec.empty(); });
  const std::string& product = tests.front().product;
  const bool listed = catalogue && catalogue->count(product) > 0 && !catalogue->at(product).limits.empty();
  if (inline_limits || listed) return;
  throw io::InputError(
      tests.front().path.string(), 0, product.empty() ? "sample.product" : "sample.product " + product,
      product.empty() ? "no limits to judge against (--require-spec: expected a [spec] table or a product "
                        "code found in the spec catalogue)"
      : catalogue     ? "the spec catalogue has no limits for this product (--require-spec: expected a [" +
                        product + "] table with limits in the catalogue, or a [spec] table in the test)"
                      : "no spec catalogue found (--require-spec: expected specs.toml beside the test, "
                        "--specs FILE, or a [spec] table in the test)");
}

/// Each material can be fitted (and, with --require-spec, judged); every problem is reported on `err`. Returns
/// how many materials are bad input.
int check_materials(const FitCommandOptions& options, const Batch& batch, Catalogues& catalogues,
                    std::ostream& err) {
  int problems = 0;
  for (const std::string& id : batch.order) {
    const std::vector<io::TestDescription>& tests = batch.by_sample.at(id);
    try {
      check_fittable(tests);
      const auto* catalogue = catalogues.for_test(tests.front());
      if (options.require_spec) check_required_spec(tests, catalogue);
    } catch (const io::InputError& e) {
      err << "spreadfit: " << e.what() << "\n";
      ++problems;
    }
  }
  return problems;
}

/// Every output path, before any work: none may be an input or another output, and each folder must exist.
/// Reported on `err`; returns false when one is refused.
bool check_outputs(const FitCommandOptions& options, const Batch& batch, std::ostream& err) {
  std::vector<RunFile> inputs, outputs;
  for (const std::string& id : batch.order)
    for (const io::TestDescription& t : batch.by_sample.at(id)) {
      inputs.push_back({t.path, "test description"});
      for (const io::ReadingSeries& s : t.series) inputs.push_back({s.source, "readings file"});
      if (!options.specs && std::filesystem::exists(t.path.parent_path() / "specs.toml"))
        inputs.push_back({t.path.parent_path() / "specs.toml", "spec catalogue"});
    }
  if (options.specs) inputs.push_back({*options.specs, "spec catalogue (--specs)"});
  if (options.json) outputs.push_back({*options.json, "--json"});
  if (options.csv) outputs.push_back({*options.csv, "--csv"});
  if (options.plot) {
    outputs.push_back({*options.plot, "--plot"});
    for (std::size_t i = 1; i < batch.order.size(); ++i)
      outputs.push_back({options.plot->parent_path() / (file_stem_safe(batch.order[i]) + ".svg"),
                         "--plot (sample " + batch.order[i] + ")"});
  }
  // A server history is no file: only an SQLite path can collide with another input or output.
  if (options.db && !history::is_server_uri(options.db->string())) outputs.push_back({*options.db, "--db"});
  try {
    if (options.out_dir) {
      check_output_folder(*options.out_dir, "--out-dir");
      for (const std::string& id : batch.order)
        for (const char* ext : {".json", ".svg"})
          outputs.push_back({*options.out_dir / (file_stem_safe(id) + ext), "--out-dir (sample " + id + ")"});
    }
    check_output_paths(inputs, outputs);
  } catch (const io::InputError& e) {
    err << "spreadfit: " << e.what() << "\n";
    return false;
  }
  return true;
}

/// Fits one material (its tests are moved out of the batch): its catalogue entry and prior looked up, its unusual
/// input values carried into the result's warnings. Bad input found here is kept in the run, not thrown.
MaterialRun fit_one_material(const FitCommandOptions& options, std::vector<io::TestDescription> tests,
                             const std::map<std::string, io::ProductSpec>* catalogue,
                             const std::optional<Law>& forced) {
  MaterialRun run;
  run.where = tests.front().path.string();
  try {
    const io::ProductSpec* from_catalogue = nullptr;
    const std::string& product = tests.front().product;
    if (catalogue) {
      const auto found = catalogue->find(product);
      if (found != catalogue->end()) from_catalogue = &found->second;
      else if (options.specs)
        run.notes += fmt::format("spreadfit: note: {}: no limits for product '{}' in {}\n", run.where,
                                 product.empty() ? std::string("(none given)") : product, options.specs->string());
    }
    std::string prior_absent;
    const std::optional<fit::FlowIndexPrior> prior = prior_for(from_catalogue, product, options, prior_absent);
    run.outcome = fit_material(std::move(tests), forced, from_catalogue, prior, prior_absent);
    // Unusual input values travel with the result, so the JSON and the table carry them too.
    report::FitOutcome& o = run.outcome;
    if (o.result())
      for (const io::TestDescription& t : o.tests)
        for (const std::string& w : t.warnings) o.candidates[std::size_t(o.chosen)].warnings.push_back(w);
  } catch (const io::InputError& e) {
    run.input_error = e.what();
  }
  return run;
}

/// What the run has found so far, for its exit code.
struct RunState {
  bool bad_input = false, failed = false, out_of_spec = false;
  int plotted = 0;  ///< materials drawn so far (--plot gives the first its file)
  nlohmann::json all = nlohmann::json::array();
  std::vector<report::FitOutcome> outcomes;
};

/// One fitted material's outputs, in input order: its table on `out`, its JSON and SVG (--out-dir, --plot), its
/// history record (--db); the JSON and the outcome are kept for the run's --json and --csv.
void report_material(const FitCommandOptions& options, const std::string& id, MaterialRun& run, RunState& state,
                     std::ostream& out, std::ostream& err) {
  err << run.notes;
  if (run.input_error) {
    err << "spreadfit: " << *run.input_error << "\n";
    state.bad_input = true;
    return;
  }
  const std::string& where = run.where;
  report::FitOutcome o = std::move(run.outcome);
  out << report::summary_table(o) << "\n";
  if (!o.result()) {
    state.failed = true;
    err << fmt::format("spreadfit: {}: sample {}: the fit failed; no parameters reported\n", where, id);
  }
  if (o.verdict.status == qc::Verdict::Status::Fail) state.out_of_spec = true;
  const nlohmann::json j = report::result_json(o);
  state.all.push_back(j);
  if (options.plot || options.out_dir) {
    // Both files of a material are rendered before either is written: a drawing that fails leaves no JSON.
    const std::string svg = report::fit_plot_svg(o, series_of(o.tests));
    if (options.out_dir) {
      io::write_file_atomically(*options.out_dir / (file_stem_safe(id) + ".json"), j.dump(2) + "\n");
      io::write_file_atomically(*options.out_dir / (file_stem_safe(id) + ".svg"), svg);
    }
    // --plot names one file: with several materials, the first gets it and the rest go beside it by sample id.
    if (options.plot) {
      const std::filesystem::path file =
          state.plotted == 0 ? *options.plot : options.plot->parent_path() / (file_stem_safe(id) + ".svg");
      io::write_file_atomically(file, svg);
    }
    ++state.plotted;
  }
  if (options.db) {
    try {
      const history::StoredResult stored = history::stored_result(o);
      const history::WriteOutcome written = history::record(*options.db, stored);
      out << history_record_note(*options.db, stored, written) << "\n";
    } catch (const io::InputError& e) {
      err << "spreadfit: " << e.what() << "\n";
      state.bad_input = true;
    }
  }
  state.outcomes.push_back(std::move(o));
}

}  // namespace

int run_fit_command(const FitCommandOptions& options, std::ostream& out, std::ostream& err) {
  const std::optional<Law> forced = forced_law(options.model);
  // Read and check every input before fitting anything: each bad file is reported, and then the run stops with
  // exit 2 and writes no output file (README), so a batch list is never left half-written.
  Batch batch;
  Catalogues catalogues(options);
  int problems = read_batch(options, batch, err);
  problems += check_materials(options, batch, catalogues, err);
  if (problems == 0 && !check_outputs(options, batch, err)) problems = 1;
  if (problems > 0) {
    // One bad input is its own one-line message; several get a closing line, so that a long batch's list is
    // not taken for a partial run.
    if (problems > 1) err << "spreadfit: " << problems << " problems above; nothing fitted and no output file written\n";
    return to_int(ExitCode::BadInput);
  }
  const std::vector<std::string>& order = batch.order;
  // Progress on stderr only for a person watching (a terminal), never in logs or pipes a plant system reads.
  const bool show_progress = ::isatty(STDERR_FILENO) == 1 && order.size() > 1;
  std::size_t started = 0;
  std::mutex progress_lock;
  // The catalogue of each material, looked up here once (the fits below only read the catalogues).
  std::vector<const std::map<std::string, io::ProductSpec>*> catalogue_of;
  for (const std::string& id : order) catalogue_of.push_back(catalogues.for_test(batch.by_sample.at(id).front()));
  // Fitting one material: what it prints goes into its own MaterialRun, written out in input order below.
  auto fit_one = [&](std::size_t index) {
    if (show_progress) {
      const std::lock_guard<std::mutex> hold(progress_lock);
      err << fmt::format("[{}/{}] fitting {}\n", ++started, order.size(), order[index]) << std::flush;
    }
    return fit_one_material(options, std::move(batch.by_sample.at(order[index])), catalogue_of[index], forced);
  };
  // The materials are fitted on every core at once (each fit is deterministic and the results are reported in input
  // order below, so the output equals a run of one material after another), except where --db makes a material
  // depend on another of the same run: its flow-index prior learns from the batches of its product recorded before
  // it, so a material whose product already came earlier in the run is fitted in turn, after those are recorded.
  // The first of each product (and one without a product code, or whose prior is the catalogue's, or any with
  // --no-prior) sees the history only as it was before the run, which no record of another product changes.
  std::vector<std::optional<MaterialRun>> runs(order.size());
  std::vector<std::size_t> independent;
  std::set<std::string> products_seen;
  for (std::size_t i = 0; i < order.size(); ++i) {
    const std::string& product = batch.by_sample.at(order[i]).front().product;
    const auto* catalogue = catalogue_of[i];
    const auto entry = catalogue ? catalogue->find(product) : std::map<std::string, io::ProductSpec>::const_iterator{};
    const bool catalogue_prior = catalogue && entry != catalogue->end() && entry->second.flow_index_prior;
    const bool first_of_product = products_seen.insert(product).second;
    if (!options.db || !options.use_prior || product.empty() || catalogue_prior || first_of_product)
      independent.push_back(i);
  }
  parallel_for(independent.size(), [&](std::size_t k) { runs[independent[k]] = fit_one(independent[k]); });
  RunState state;
  for (std::size_t index = 0; index < order.size(); ++index) {
    if (!runs[index]) runs[index] = fit_one(index);
    report_material(options, order[index], *runs[index], state, out, err);
  }
  if (options.csv && !state.outcomes.empty())
    io::write_file_atomically(*options.csv, report::summary_csv(state.outcomes));
  if (options.json && !state.all.empty())
    io::write_file_atomically(*options.json, (state.all.size() == 1 ? state.all.front() : state.all).dump(2) + "\n");
  if (state.bad_input) return to_int(ExitCode::BadInput);
  if (state.failed) return to_int(ExitCode::NumericalFailure);
  return to_int(state.out_of_spec ? ExitCode::OutOfSpec : ExitCode::Done);
}

CommandRegistration add_fit_command(CLI::App& app) {
  struct Given {
    std::vector<std::string> tests;
    std::string model;
    PathOption json, plot, out_dir, db, specs, csv;
    bool no_prior = false;
    bool require_spec = false;
  };
  const auto given = std::make_shared<Given>();
  CLI::App* fit = app.add_subcommand("fit", "Fit thin-film models to the readings of one or more tests.");
  fit->add_option("TEST.toml", given->tests, "Test descriptions (TOML), one per test")->required()->type_name("");
  fit->add_option("--model", given->model,
                  "Model to fit: " + std::string(model_names_help) +
                      " | auto (choose by AICc); default: as each test's [fit] model says")
      ->type_name("NAME");
  given->json.add_to(*fit, "--json", "FILE", "Write the results as JSON to FILE");
  given->plot.add_to(*fit, "--plot", "FILE.svg",
                     "Draw readings, fitted curve, uncertainty band and residuals to FILE.svg");
  given->out_dir.add_to(*fit, "--out-dir", "DIR",
                        "Write <sample id>.json and <sample id>.svg per material (tests sharing a sample id are one "
                        "material) into DIR");
  given->db.add_to(*fit, "--db", "DB",
                   "Append the results to the batch history DB: an SQLite file, or a postgresql:// URI of a shared "
                   "history on a server");
  given->specs.add_to(*fit, "--specs", "FILE", "Read product specifications from FILE");
  given->csv.add_to(*fit, "--csv", "FILE", "Write the results as a CSV table to FILE");
  fit->add_flag("--no-prior", given->no_prior,
                "Fit the readings alone: no flow-index prior from the spec catalogue or the history (--db)");
  fit->add_flag("--require-spec", given->require_spec,
                "Refuse (exit 2, nothing fitted) a material without limits: no [spec] and no catalogue entry");
  return {fit, [given](std::ostream& out, std::ostream& err) {
            FitCommandOptions options;
            options.tests.assign(given->tests.begin(), given->tests.end());
            options.model = given->model;
            options.json = given->json.get();
            options.plot = given->plot.get();
            options.out_dir = given->out_dir.get();
            options.db = given->db.get();
            options.specs = given->specs.get();
            options.csv = given->csv.get();
            options.use_prior = !given->no_prior;
            options.require_spec = given->require_spec;
            return run_fit_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
