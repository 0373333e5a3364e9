// Fitting a law to readings: starting point from a global search on the low-order surrogate, polish by
// Levenberg-Marquardt on the full model, intervals from the Jacobian (profile likelihood where one-sided), and
// model choice by AICc.
//
// Stages and why:
//  1. Global: NLopt GN_DIRECT_L (Gablonsky & Kelley 2001) on the one-state low-order model (microseconds a
//     solve), over the bounded log box of the material parameters with release times at zero. Deterministic,
//     needs no start, and cheap enough to sample every law's box; the surrogate is within a few percent of the
//     full model (scripts/bench), so it lands in the right basin. Then NLopt LN_BOBYQA, still on the surrogate,
//     frees the release times together with the material parameters.
//  2. Local: Levenberg-Marquardt with a forward-difference Jacobian on the full model (Eigen), the natural
//     method for a small least-squares problem: quadratic convergence near the optimum, and the Jacobian it ends
//     with gives the covariance. Each iteration costs (parameters + 1) forward solves.
//  3. Uncertainty: covariance s^2 (J^T J)^-1 in log space, Student-t 95% intervals; a parameter resting on its
//     lower bound (a yield stress the data do not need) gets a one-sided profile-likelihood upper bound.
#pragma once

#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

/// Fits one law. Never throws for numerical trouble: the status and reason say what happened.
/// Throws std::invalid_argument for invalid options or empty data.
/// `hints` are materials from related fits (e.g. the power law for Herschel-Bulkley); the polish starts from
/// whichever of them or the global stage's point fits the full model best.
FitResult fit_law(const std::vector<FitSeries>& series, Law law, const FitOptions& options = {},
                  const std::vector<FitResult>& hints = {});

/// `fit` with the likelihood draws and ridge of FitOptions::likelihood_draws (src/fit/likelihood_draws.hpp) when it
/// was fitted without them: a refit from it (no global search), whose draws, ridge and effective size are copied
/// into it; everything else of `fit` is kept. Unchanged when it already has draws, did not converge, or the options
/// ask for none. For a caller that fits twice (with a flow-index prior, src/fit/flow_index_prior.hpp) and so skips
/// the draws of the first fit unless that fit is the one reported.
FitResult with_likelihood_draws(const std::vector<FitSeries>& series, FitResult fit, const FitOptions& options);

/// Fits a law the user named, as fit_auto fits the law it reports: its special cases first (the power law and
/// Bingham for Herschel-Bulkley, Newtonian for those two; quadratic intervals), then the law from the best of them
/// and its own first fit, so that a named law and `auto` give the same answer for the same law. Laws without
/// special cases (Newtonian) are fitted once. Evaluations count every fit's solves.
FitResult fit_named(const std::vector<FitSeries>& series, Law law, const FitOptions& options = {});

struct ModelChoice {
  std::vector<FitResult> candidates;  ///< every law tried, in all_laws() order
  int chosen = -1;                    ///< the reported result (index into candidates), -1 if none converged
  int best_description = -1;          ///< the law AICc prefers (index into candidates)
  std::vector<double> weights;        ///< Akaike weights of the candidates (0 for a failed fit)
  std::string explanation;            ///< plain words: which law describes the readings best and what is reported

  /// Index into candidates of the fit of `law`; -1 when that law was not tried.
  int index_of(Law law) const;
  /// The fit of `law`; nullptr when that law was not tried.
  const FitResult* candidate(Law law) const;
};

/// Fits every law and names the best description by AICc, preferring the simpler law when the evidence is weak
/// (AICc within 2 of the best; Burnham & Anderson 2002). The reported result is the general law's
/// (Herschel-Bulkley) with profile-likelihood intervals, so its intervals include the uncertainty of the law;
/// a liquid (best described as Newtonian, with a power-law flow index settled within 0.8 to 1.25) reports its
/// viscosity.
ModelChoice fit_auto(const std::vector<FitSeries>& series, const FitOptions& options = {});

/// Corrected Akaike information criterion for least squares with k estimated parameters (variance included):
/// n ln(SSR/n) + 2k + 2k(k+1)/(n-k-1) (Hurvich & Tsai 1989).
double aicc(double weighted_ssr, int points, int k);

}  // namespace spreadfit::fit
