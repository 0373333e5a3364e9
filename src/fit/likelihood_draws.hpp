// Parameter vectors drawn from the fit's likelihood, for bands on the same or another rig (predict, fit plots):
// sampling-importance-resampling (Rubin 1988, in Bayesian Statistics 3; Gelman et al. 2013, Bayesian Data
// Analysis, section 10.4). The target is the posterior under a flat prior on the fitted (log) parameters within
// their physical box, exp(-(cost - cost_min) / s^2). The proposal follows the likelihood's curved ridge: an equal
// mixture of multivariate Student t densities (4 degrees of freedom) centred on the optimum and on the points the
// profile walks passed through (src/fit/profile_likelihood.hpp, ProfileSide::trace), each with the quadratic
// fit's correlations and a local scale (the quadratic standard error, at most a quarter of the profile interval's
// half-width). A single ellipse around the optimum either misses the bend of the ridge or, made wide enough, puts
// almost every draw off it. Weights are target / mixture density; `keep` draws are resampled systematically. A
// band built from them is as wide as the readings allow and no wider.
#pragma once

#include <Eigen/Core>
#include <vector>

namespace spreadfit::fit {

class FitProblem;

struct LikelihoodDraws {
  std::vector<Eigen::VectorXd> draws;  ///< resampled parameter vectors (the problem's layout)
  int proposals = 0;                   ///< proposal draws evaluated
  double effective_size = 0;           ///< Kish's effective sample size of the weights, (sum w)^2 / sum w^2
};

/// x, cost: the optimum of `problem`; s2: residual variance; covariance: the quadratic one at x (non-finite
/// entries allowed); lower/upper: each parameter's 95% interval in the problem's coordinates (box ends where
/// open); centres: further mixture centres (profile traces). Deterministic for a given seed; forward solves on
/// every core.
LikelihoodDraws likelihood_draws(const FitProblem& problem, const Eigen::VectorXd& x, double cost, double s2,
                                 const Eigen::MatrixXd& covariance, const Eigen::VectorXd& lower,
                                 const Eigen::VectorXd& upper, const std::vector<Eigen::VectorXd>& centres,
                                 int proposals = 400, int keep = 200, unsigned seed = 20261202u);

}  // namespace spreadfit::fit
