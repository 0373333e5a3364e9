#include "src/report/result_json.hpp"
#include "src/fit/parameter_names.hpp"

#include "src/version.hpp"

namespace spreadfit::report {

namespace {

nlohmann::json rig_json(const io::TestDescription& t) {
  nlohmann::json j;
  j["kind"] = std::string(io::rig_kind_name(t.setup.rig));
  j["reading"] = std::string(reading_name(t.setup.reading));
  std::visit(overloaded{[&](const ChannelRig& rig) {
                          j["width_m"] = rig.width;
                          j["reservoir_length_m"] = rig.reservoir_length;
                          j["volume_m3"] = rig.volume;
                          j["side_wall_drag"] = rig.side_wall_drag;
                        },
                        [&](const PlateRig& rig) {
                          j["ring_radius_m"] = rig.ring_radius;
                          j["volume_m3"] = rig.volume;
                        },
                        [&](const SqueezeRig& rig) {
                          j["volume_m3"] = rig.volume;
                          j["force_N"] = rig.force;
                          if (rig.initial_gap > 0) j["initial_gap_m"] = rig.initial_gap;
                        },
                        [&](const SlumpRig& rig) {
                          j["radius_m"] = rig.radius;
                          j["height_m"] = rig.height;
                        }},
      t.setup.rig);
  j["source"] = t.path.string();
  return j;
}

// --- the blocks of result_json, in the README's order -----------------------------------------------------------

using nlohmann::json;

// "sample": the id and density of the material, with the product, site, test date and temperature when given.
json sample_json(const io::TestDescription& first) {
  json sample = {{"id", first.sample_id}, {"density_kg_m3", first.density}};
  if (!first.product.empty()) sample["product"] = first.product;
  if (!first.site.empty()) sample["site"] = first.site;
  if (!first.tested.empty()) sample["tested"] = first.tested;
  if (first.temperature) sample["temperature_K"] = *first.temperature;
  return sample;
}

// "rig": one object for one test, an array for a joint fit of several.
json rigs_json(const FitOutcome& o) {
  if (o.tests.size() == 1) return rig_json(o.tests.front());
  json rigs = json::array();
  for (const auto& t : o.tests) rigs.push_back(rig_json(t));
  return rigs;
}

// "parameters": each fitted parameter with its unit, 95% interval, how the interval was found, and what is open
// or undetermined about it. Several release times are listed per series under fit.time_origins instead.
json parameters_json(const fit::FitResult* r) {
  json parameters = json::object();
  if (!r) return parameters;
  int origins = 0;
  for (const auto& p : r->parameters) origins += fit::is_parameter(p.name, fit::Parameter::TimeOrigin);
  for (const auto& p : r->parameters) {
    if (fit::is_parameter(p.name, fit::Parameter::TimeOrigin) && origins > 1) continue;
    json e = {{"value", p.value}, {"unit", p.unit}, {"ci95", {p.lower, p.upper}}};
    if (p.upper_only) e["upper_bound_only"] = true;
    if (p.lower_open && !p.upper_only) e["lower_open"] = true;
    if (p.upper_open) e["upper_open"] = true;
    if (!p.identifiable) e["identifiable"] = false;
    e["interval"] = p.profiled ? "profile likelihood" : "quadratic";
    parameters[p.name] = e;
  }
  return parameters;
}

// "at_reference_temperature": the parameters carried to the product's reference temperature.
json reference_temperature_json(const FitOutcome& o) {
  json ref = {{"temperature_K", *o.reference_temperature}, {"parameters", json::object()}};
  for (const auto& p : o.reference_parameters)
    ref["parameters"][p.name] = {{"value", p.value}, {"unit", p.unit}, {"ci95", {p.lower, p.upper}}};
  return ref;
}

// A matrix as rows of numbers, an entry that is not finite as null when `null_if_not_finite`.
json matrix_json(const Eigen::MatrixXd& m, bool null_if_not_finite) {
  json rows = json::array();
  for (Eigen::Index a = 0; a < m.rows(); ++a) {
    json row = json::array();
    for (Eigen::Index b = 0; b < m.cols(); ++b)
      row.push_back(!null_if_not_finite || std::isfinite(m(a, b)) ? json(m(a, b)) : json(nullptr));
    rows.push_back(row);
  }
  return rows;
}

// fit.log_space: the fitted vector and its covariance (log of material parameters, release times in s), so that
// `predict` can carry this result's uncertainty to another rig; undetermined entries are null. With them the
// parameter vectors drawn from the likelihood (src/fit/likelihood_draws.hpp), which predict's band uses, and the
// profile walks' ridge.
json log_space_json(const fit::FitResult& r) {
  json log_space = {{"parameters", r.names},
                    {"estimate", std::vector<double>(r.estimate.data(), r.estimate.data() + r.estimate.size())},
                    {"covariance", matrix_json(r.covariance, true)}};
  if (!r.draws.empty()) {
    json draws = json::array();
    for (const Eigen::VectorXd& d : r.draws) draws.push_back(std::vector<double>(d.data(), d.data() + d.size()));
    log_space["draws"] = draws;
    log_space["draws_effective_size"] = r.draws_effective_size;
  }
  if (!r.ridge.empty()) {
    json ridge = json::array();
    for (const Eigen::VectorXd& d : r.ridge) ridge.push_back(std::vector<double>(d.data(), d.data() + d.size()));
    log_space["ridge"] = ridge;
  }
  return log_space;
}

// The converged fit's figures into "fit": misfit, reading sigma, AICc, iterations, release times per series,
// the correlation matrix and the log-space block (when the estimate has one entry per name).
void converged_fit_json(const fit::FitResult& r, json& fit) {
  fit["rmse"] = std::isfinite(r.rmse) ? json(r.rmse) : json(nullptr);
  fit["rmse_unit"] = "m";
  fit["reading_sigma"] = r.sigma;
  fit["aicc"] = std::isfinite(r.aicc) ? json(r.aicc) : json(nullptr);
  fit["iterations"] = r.iterations;
  if (r.time_origins.size() > 1) fit["time_origins"] = r.time_origins;
  fit["correlation"] = {{"parameters", r.names}, {"matrix", matrix_json(r.correlation, false)}};
  if (r.estimate.size() == Eigen::Index(r.names.size())) fit["log_space"] = log_space_json(r);
}

// The candidate laws into "fit": each with its status, AICc, Akaike weight and reason; the forward solves of
// them all; why the law was chosen and which law describes the readings best.
void candidates_json(const FitOutcome& o, json& fit) {
  int evaluations = 0;
  json candidates = json::array();
  for (std::size_t i = 0; i < o.candidates.size(); ++i) {
    const fit::FitResult& c = o.candidates[i];
    evaluations += c.evaluations;
    json e = {{"model", std::string(law_name(c.law))}, {"status", std::string(fit::fit_status_name(c.status))}};
    e["aicc"] = c.converged() && std::isfinite(c.aicc) ? json(c.aicc) : json(nullptr);
    if (i < o.weights.size()) e["akaike_weight"] = o.weights[i];
    if (!c.reason.empty()) e["reason"] = c.reason;
    candidates.push_back(e);
  }
  fit["evaluations"] = evaluations;
  fit["candidates"] = candidates;
  if (!o.choice_explanation.empty()) fit["choice"] = o.choice_explanation;
  if (o.best_description >= 0)
    fit["best_description"] = std::string(law_name(o.candidates[std::size_t(o.best_description)].law));
}

// The converged fit's quality findings and the flow-index prior (with the flow index fitted without it) into
// "fit".
void quality_and_prior_json(const fit::FitResult& r, json& fit) {
  json quality = json::array();
  for (fit::FitQuality q : r.quality) quality.push_back(std::string(fit_quality_name(q)));
  fit["quality"] = quality;
  if (r.prior)
    fit["prior"] = {{"parameter", fit::parameter_name(fit::Parameter::FlowIndex)},
                    {"typical", r.prior->typical},
                    {"spread", r.prior->spread},
                    {"source", r.prior->source}};
  if (!r.prior_note.empty()) fit["prior_note"] = r.prior_note;
  if (r.without_prior) {
    const fit::ParameterEstimate& n = *r.without_prior;
    fit[std::string(fit::parameter_name(fit::Parameter::FlowIndex)) + "_without_prior"] = {
        {"value", n.value},
        {"ci95", {n.lower, n.upper}},
        {"determined", n.identifiable && !n.lower_open && !n.upper_open}};
  }
}

// "fit": whether it converged, the converged fit's figures, the points fitted, the candidates, quality and prior,
// and the warnings (without a converged fit, each candidate's reason).
json fit_json(const FitOutcome& o) {
  const fit::FitResult* r = o.result();
  json fit;
  const fit::FitResult* shown = r ? r : (o.candidates.empty() ? nullptr : &o.candidates.front());
  fit["converged"] = r != nullptr;
  if (shown) {
    if (r) converged_fit_json(*r, fit);
    fit["points"] = shown->points;
  }
  candidates_json(o, fit);
  if (r) quality_and_prior_json(*r, fit);
  json warnings = json::array();
  if (r)
    for (const auto& w : r->warnings) warnings.push_back(w);
  if (!r)
    for (const auto& c : o.candidates)
      if (!c.reason.empty()) warnings.push_back(std::string(law_name(c.law)) + ": " + c.reason);
  fit["warnings"] = warnings;
  return fit;
}

// "verdict": the status and each spec check (value null when the fit gave none).
json verdict_json(const qc::Verdict& verdict) {
  json checks = json::array();
  for (const auto& c : verdict.checks) {
    json e = {{"parameter", c.parameter}, {"low", c.low}, {"high", c.high}, {"pass", c.pass}};
    if (c.available)
      e["value"] = c.value;
    else
      e["value"] = nullptr;
    if (c.marginal) e["marginal"] = true;
    if (!c.findings.empty()) e["findings"] = c.findings;
    checks.push_back(e);
  }
  return {{"status", std::string(qc::verdict_status_name(verdict.status))}, {"checks", checks}};
}

}  // namespace

nlohmann::json result_json(const FitOutcome& o) {
  const fit::FitResult* r = o.result();
  json j;
  j["sample"] = sample_json(o.tests.front());
  j["rig"] = rigs_json(o);
  j["model"] = r ? json(std::string(law_name(r->law))) : json(nullptr);
  j["parameters"] = parameters_json(r);
  if (o.reference_temperature) j["at_reference_temperature"] = reference_temperature_json(o);
  j["fit"] = fit_json(o);
  j["verdict"] = verdict_json(o.verdict);
  j["caution"] = bench_caution;
  j["software"] = {{"name", std::string(software_name)}, {"version", std::string(software_version())}};
  return j;
}

}  // namespace spreadfit::report
