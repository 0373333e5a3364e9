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

}  // namespace

nlohmann::json result_json(const FitOutcome& o) {
  using nlohmann::json;
  const io::TestDescription& first = o.tests.front();
  json j;
  j["sample"] = {{"id", first.sample_id}, {"density_kg_m3", first.density}};
  if (!first.product.empty()) j["sample"]["product"] = first.product;
  if (!first.site.empty()) j["sample"]["site"] = first.site;
  if (!first.tested.empty()) j["sample"]["tested"] = first.tested;
  if (first.temperature) j["sample"]["temperature_K"] = *first.temperature;
  if (o.tests.size() == 1) {
    j["rig"] = rig_json(first);
  } else {
    j["rig"] = json::array();
    for (const auto& t : o.tests) j["rig"].push_back(rig_json(t));
  }
  const fit::FitResult* r = o.result();
  j["model"] = r ? json(std::string(law_name(r->law))) : json(nullptr);
  j["parameters"] = json::object();
  if (r) {
    int origins = 0;
    for (const auto& p : r->parameters) origins += fit::is_parameter(p.name, fit::Parameter::TimeOrigin);
    for (const auto& p : r->parameters) {
      if (fit::is_parameter(p.name, fit::Parameter::TimeOrigin) && origins > 1) continue;  // listed per series under fit.time_origins
      json e = {{"value", p.value}, {"unit", p.unit}, {"ci95", {p.lower, p.upper}}};
      if (p.upper_only) e["upper_bound_only"] = true;
      if (p.lower_open && !p.upper_only) e["lower_open"] = true;
      if (p.upper_open) e["upper_open"] = true;
      if (!p.identifiable) e["identifiable"] = false;
      e["interval"] = p.profiled ? "profile likelihood" : "quadratic";
      j["parameters"][p.name] = e;
    }
  }
  if (o.reference_temperature) {
    json ref = {{"temperature_K", *o.reference_temperature}, {"parameters", json::object()}};
    for (const auto& p : o.reference_parameters)
      ref["parameters"][p.name] = {{"value", p.value}, {"unit", p.unit}, {"ci95", {p.lower, p.upper}}};
    j["at_reference_temperature"] = ref;
  }
  json fit;
  const fit::FitResult* shown = r ? r : (o.candidates.empty() ? nullptr : &o.candidates.front());
  fit["converged"] = r != nullptr;
  if (shown) {
    if (r) {
      fit["rmse"] = std::isfinite(r->rmse) ? json(r->rmse) : json(nullptr);
      fit["rmse_unit"] = "m";
      fit["reading_sigma"] = r->sigma;
      fit["aicc"] = std::isfinite(r->aicc) ? json(r->aicc) : json(nullptr);
      fit["iterations"] = r->iterations;
      if (r->time_origins.size() > 1) fit["time_origins"] = r->time_origins;
      json corr = json::array();
      for (Eigen::Index a = 0; a < r->correlation.rows(); ++a) {
        json row = json::array();
        for (Eigen::Index b = 0; b < r->correlation.cols(); ++b) row.push_back(r->correlation(a, b));
        corr.push_back(row);
      }
      fit["correlation"] = {{"parameters", r->names}, {"matrix", corr}};
      // The fitted vector and its covariance (log of material parameters, release times in s), so that `predict`
      // can carry this result's uncertainty to another rig. Undetermined entries are null.
      if (r->estimate.size() == Eigen::Index(r->names.size())) {
        json cov = json::array();
        for (Eigen::Index a = 0; a < r->covariance.rows(); ++a) {
          json row = json::array();
          for (Eigen::Index b = 0; b < r->covariance.cols(); ++b)
            row.push_back(std::isfinite(r->covariance(a, b)) ? json(r->covariance(a, b)) : json(nullptr));
          cov.push_back(row);
        }
        fit["log_space"] = {{"parameters", r->names},
                            {"estimate", std::vector<double>(r->estimate.data(), r->estimate.data() + r->estimate.size())},
                            {"covariance", cov}};
        // Parameter vectors drawn from the likelihood (src/fit/likelihood_draws.hpp): predict's band uses them.
        if (!r->draws.empty()) {
          json draws = json::array();
          for (const Eigen::VectorXd& d : r->draws) draws.push_back(std::vector<double>(d.data(), d.data() + d.size()));
          fit["log_space"]["draws"] = draws;
          fit["log_space"]["draws_effective_size"] = r->draws_effective_size;
        }
        if (!r->ridge.empty()) {
          json ridge = json::array();
          for (const Eigen::VectorXd& d : r->ridge) ridge.push_back(std::vector<double>(d.data(), d.data() + d.size()));
          fit["log_space"]["ridge"] = ridge;
        }
      }
    }
    fit["points"] = shown->points;
  }
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
  if (r) {
    json quality = json::array();
    for (fit::FitQuality q : r->quality) quality.push_back(std::string(fit_quality_name(q)));
    fit["quality"] = quality;
    if (r->prior)
      fit["prior"] = {{"parameter", fit::parameter_name(fit::Parameter::FlowIndex)}, {"typical", r->prior->typical}, {"spread", r->prior->spread},
                      {"source", r->prior->source}};
    if (!r->prior_note.empty()) fit["prior_note"] = r->prior_note;
    if (r->without_prior) {
      const fit::ParameterEstimate& n = *r->without_prior;
      fit[std::string(fit::parameter_name(fit::Parameter::FlowIndex)) + "_without_prior"] = {{"value", n.value}, {"ci95", {n.lower, n.upper}},
                                         {"determined", n.identifiable && !n.lower_open && !n.upper_open}};
    }
  }
  json warnings = json::array();
  if (r)
    for (const auto& w : r->warnings) warnings.push_back(w);
  if (!r)
    for (const auto& c : o.candidates)
      if (!c.reason.empty()) warnings.push_back(std::string(law_name(c.law)) + ": " + c.reason);
  fit["warnings"] = warnings;
  j["fit"] = fit;

  json checks = json::array();
  for (const auto& c : o.verdict.checks) {
    json e = {{"parameter", c.parameter}, {"low", c.low}, {"high", c.high}, {"pass", c.pass}};
    if (c.available) e["value"] = c.value;
    else e["value"] = nullptr;
    if (c.marginal) e["marginal"] = true;
    if (!c.findings.empty()) e["findings"] = c.findings;
    checks.push_back(e);
  }
  j["verdict"] = {{"status", std::string(qc::verdict_status_name(o.verdict.status))}, {"checks", checks}};
  j["caution"] = bench_caution;
  j["software"] = {{"name", std::string(software_name)}, {"version", std::string(software_version())}};
  return j;
}

}  // namespace spreadfit::report
