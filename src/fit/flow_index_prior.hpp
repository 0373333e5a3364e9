// Product knowledge on the flow index: a formulation's n changes little from batch to batch, while one short
// test often cannot separate n from the consistency (DEVELOPERS.md, "The inverse problem"). A prior (typical value and
// batch-to-batch spread) enters the fit as one more observation of n, so the posterior mode and the profile
// likelihood intervals are those of the penalised least squares (a normal prior; Gelman et al. 2013, Bayesian
// Data Analysis, section 14.8).
//  - From a spec catalogue entry (flow_index_prior = [typical, spread]), or learned from the product's earlier
//    batches in the history by empirical Bayes: the random-effects mean and between-batch variance of their
//    flow indices (DerSimonian & Laird 1986, Controlled Clinical Trials 7, eq. 3-4), each batch's own standard
//    error taken from its 95% interval. It needs at least `min_batches` batches whose readings alone determined n.
//  - The prior is never allowed to hide a change: the batch is fitted without it first; when that fit's n differs
//    from the typical value by more than 2.58 standard deviations of the difference (the readings' standard error
//    from their 95% interval, and the spread), the prior is not applied, the result is the readings' own, and the
//    batch is flagged (FitQuality::PriorConflict: the formulation may have changed).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

/// A batch's flow index as the readings alone gave it.
struct BatchFlowIndex {
  double value = 0, lower = 0, upper = 0;  ///< estimate and 95% interval [-]
  bool determined = false;                 ///< both sides closed (not open at the law's range)
};

inline constexpr int min_batches_for_prior = 5;
/// Floor of a learned spread (common practice, no source: batch-to-batch n of one recipe is rarely known better).
inline constexpr double min_learned_spread = 0.02;

/// The prior learned from earlier batches, or nothing (with the reason in *why_not) when fewer than
/// min_batches_for_prior of them determined n.
std::optional<FlowIndexPrior> learn_flow_index_prior(const std::vector<BatchFlowIndex>& batches,
                                                     std::string* why_not = nullptr);

/// The fit of `law` with the prior, starting from `without` (the same readings fitted without it). Returns
/// `without` unchanged, plus a PriorConflict finding and warning, when the readings contradict the prior; else the
/// prior's result, whose prior_note says how much the prior narrowed the yield stress's (or else the
/// consistency's) interval. The result carries the readings-alone flow index in without_prior.
FitResult fit_with_prior(const std::vector<FitSeries>& series, const FitResult& without, const FitOptions& options,
                         const FlowIndexPrior& prior);

}  // namespace spreadfit::fit
