#include "src/fit/flow_index_prior.hpp"
#include "src/fit/parameter_names.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "src/fit/fit_law.hpp"
#include "src/fit/fit_problem.hpp"

namespace spreadfit::fit {

namespace {

const ParameterEstimate* find(const FitResult& r, const std::string& name) {
  for (const ParameterEstimate& p : r.parameters)
    if (p.name == name) return &p;
  return nullptr;
}

}  // namespace

std::optional<FlowIndexPrior> learn_flow_index_prior(const std::vector<BatchFlowIndex>& batches,
                                                     std::string* why_not) {
  std::vector<double> n, v;
  for (const BatchFlowIndex& b : batches) {
    if (!b.determined || !(b.upper > b.lower) || !std::isfinite(b.value)) continue;
    const double se = (b.upper - b.lower) / (2.0 * 1.959964);  // a 95% interval spans +/- 1.96 se
    n.push_back(b.value);
    v.push_back(se * se);
  }
  const int k = int(n.size());
  if (k < min_batches_for_prior) {
    if (why_not)
      *why_not = fmt::format("{} earlier batch{} of this product determined the flow index from its readings; "
                             "{} are needed to learn a prior",
                             k, k == 1 ? "" : "es", min_batches_for_prior);
    return std::nullopt;
  }
  // DerSimonian & Laird (1986): fixed-effect weights, Cochran's Q, the moment estimate of the between-batch
  // variance tau^2, then the random-effects mean. The spread of a new batch's n is its predictive standard
  // deviation sqrt(tau^2 + var(mean)).
  double sw = 0, sw2 = 0, swn = 0;
  for (int i = 0; i < k; ++i) {
    const double w = 1.0 / v[i];
    sw += w, sw2 += w * w, swn += w * n[i];
  }
  const double fixed = swn / sw;
  double q = 0;
  for (int i = 0; i < k; ++i) q += (n[i] - fixed) * (n[i] - fixed) / v[i];
  const double tau2 = std::max(0.0, (q - (k - 1)) / (sw - sw2 / sw));
  double sr = 0, srn = 0;
  for (int i = 0; i < k; ++i) {
    const double w = 1.0 / (v[i] + tau2);
    sr += w, srn += w * n[i];
  }
  FlowIndexPrior prior;
  prior.typical = srn / sr;
  prior.spread = std::max(std::sqrt(tau2 + 1.0 / sr), min_learned_spread);
  prior.source = fmt::format("learned from {} earlier batches in the history", k);
  return prior;
}

FitResult fit_with_prior(const std::vector<FitSeries>& series, const FitResult& without, const FitOptions& options,
                         const FlowIndexPrior& prior) {
  const ParameterEstimate* n = find(without, std::string(parameter_name(Parameter::FlowIndex)));
  if (!n || !without.converged()) return without;
  FitResult out = without;
  out.without_prior = *n;
  // The readings' n against the prior's: the difference over its standard deviation, sqrt(se^2 + spread^2), the
  // readings' se taken from the side of their 95% interval that faces the prior (the profile interval is
  // asymmetric); beyond 2.58 (two-sided 1%) they disagree. Only a side the readings close can contradict the prior:
  // an open side says nothing.
  const bool above = n->value > prior.typical;
  const bool open = above ? n->lower_open : n->upper_open;
  const double se = (above ? n->value - n->lower : n->upper - n->value) / 1.959964;
  const double z = std::abs(n->value - prior.typical) / std::sqrt(se * se + prior.spread * prior.spread);
  const bool conflict = !open && z > 2.576;
  if (conflict) {
    out.quality.push_back(FitQuality::PriorConflict);
    out.warnings.push_back(fmt::format(
        "the flow index of this batch ({:.3g}, 95% {:.3g} to {:.3g}) contradicts the product's prior ({:.3g} +/- "
        "{:.2g}, {}): the formulation or the process may have changed; the prior was not applied and these are "
        "the readings' own values",
        n->value, n->lower, n->upper, prior.typical, prior.spread, prior.source));
    out.prior_note = "prior not applied: the readings contradict it";
    return out;
  }
  FitOptions with = options;
  with.flow_index_prior = prior;
  // The prior's residual is in units of the residual standard deviation (FitProblem::residuals).
  const FitProblem scale(series, without.law, options);
  with.prior_scale = without.sigma / scale.weight_sigma(0);
  with.global_evaluations = 0;  // the fit without the prior is the start: no second search of the box
  FitResult r = fit_law(series, without.law, with, {without});
  if (!r.converged()) {
    out.prior_note = fmt::format("prior not applied: the fit with it failed ({})", r.reason);
    return out;
  }
  r.without_prior = *n;
  r.evaluations += without.evaluations;
  // How much it helped: the judged parameter's interval, before and after (in log width, as the parameters span
  // decades).
  for (const Parameter judged : {Parameter::YieldStress, Parameter::Consistency}) {
    const std::string name(parameter_name(judged));
    const ParameterEstimate* a = find(without, name);
    const ParameterEstimate* b = find(r, name);
    if (!a || !b || a->upper_only || b->upper_only || !(a->lower > 0) || !(b->lower > 0)) continue;
    const double ratio = std::log(b->upper / b->lower) / std::log(a->upper / a->lower);
    r.prior_note = fmt::format("the product's flow-index prior ({:.3g} +/- {:.2g}, {}) {} the {} interval from "
                               "{:.4g}-{:.4g} to {:.4g}-{:.4g} {} ({:.0f}% of its width on a log scale)",
                               prior.typical, prior.spread, prior.source, ratio < 1.0 ? "narrowed" : "moved",
                               parameter_info(judged).plain_name, a->lower,
                               a->upper, b->lower, b->upper, b->unit, 100.0 * ratio);
    break;
  }
  if (r.prior_note.empty())
    r.prior_note = fmt::format("the product's flow-index prior ({:.3g} +/- {:.2g}, {}) entered the fit",
                               prior.typical, prior.spread, prior.source);
  r.warnings.push_back(r.prior_note + "; switch it off with --no-prior");
  return r;
}

}  // namespace spreadfit::fit
