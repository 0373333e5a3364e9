#include "src/fit/likelihood_draws.hpp"

#include <Eigen/Cholesky>
#include <algorithm>
#include <cmath>
#include <limits>
#include <random>

#include "src/fit/fit_problem.hpp"
#include "src/parallel_for.hpp"

namespace spreadfit::fit {

LikelihoodDraws likelihood_draws(const FitProblem& problem, const Eigen::VectorXd& x, double cost, double s2,
                                 const Eigen::MatrixXd& covariance, const Eigen::VectorXd& lower,
                                 const Eigen::VectorXd& upper, const std::vector<Eigen::VectorXd>& centres,
                                 int proposals, int keep, unsigned seed) {
  LikelihoodDraws out;
  const Eigen::Index p = x.size();
  if (p == 0 || proposals <= 0 || keep <= 0) return out;
  // Local scale: the quadratic standard error, at most a quarter of the profile half-width (the mixture's centres
  // carry the ridge's extent), never below a small floor.
  Eigen::VectorXd scale(p);
  for (Eigen::Index i = 0; i < p; ++i) {
    const double half = 0.5 * (upper[i] - lower[i]);
    const double se = std::sqrt(covariance(i, i));
    scale[i] = std::max(std::isfinite(se) ? std::min(se, 0.25 * half) : 0.25 * half, 1e-4);
  }
  Eigen::MatrixXd c = Eigen::MatrixXd::Identity(p, p);
  for (Eigen::Index a = 0; a < p; ++a)
    for (Eigen::Index b = 0; b < p; ++b)
      if (a != b) {
        const double r = covariance(a, b) / std::sqrt(covariance(a, a) * covariance(b, b));
        if (std::isfinite(r)) c(a, b) = std::clamp(r, -0.95, 0.95);
      }
  Eigen::LLT<Eigen::MatrixXd> llt(c);
  if (llt.info() != Eigen::Success) {
    c.setIdentity();
    llt.compute(c);
  }
  const Eigen::MatrixXd L = llt.matrixL();
  const Eigen::MatrixXd c_inv = llt.solve(Eigen::MatrixXd::Identity(p, p));
  constexpr double nu = 4.0;
  std::vector<Eigen::VectorXd> mu{x};
  for (const Eigen::VectorXd& m : centres)
    if (m.size() == p && m.allFinite()) mu.push_back(m);
  // log of the mixture density at t (up to a constant common to every draw).
  auto log_mixture = [&](const Eigen::VectorXd& t) {
    double top = -std::numeric_limits<double>::infinity();
    std::vector<double> terms;
    for (const Eigen::VectorXd& m : mu) {
      const Eigen::VectorXd u = (t - m).cwiseQuotient(scale);
      terms.push_back(-0.5 * (nu + double(p)) * std::log1p(u.dot(c_inv * u) / nu));
      top = std::max(top, terms.back());
    }
    double sum = 0;
    for (double v : terms) sum += std::exp(v - top);
    return top + std::log(sum / double(mu.size()));
  };

  // Proposals first, from one generator in a fixed order (reproducible), then the solves on every core. A draw
  // outside the physical box is drawn again (a truncated proposal; its density differs from the untruncated one
  // by a near-constant factor, which the normalised weights ignore).
  std::mt19937 rng(seed);
  std::normal_distribution<double> normal(0.0, 1.0);
  std::chi_squared_distribution<double> chi2(nu);
  std::uniform_int_distribution<std::size_t> pick(0, mu.size() - 1);
  std::vector<Eigen::VectorXd> theta;
  std::vector<double> log_q;
  for (int k = 0; k < proposals; ++k) {
    for (int attempt = 0; attempt < 50; ++attempt) {
      const Eigen::VectorXd& m = mu[pick(rng)];
      Eigen::VectorXd z(p);
      for (Eigen::Index i = 0; i < p; ++i) z[i] = normal(rng);
      const Eigen::VectorXd t = m + scale.cwiseProduct(L * z * std::sqrt(nu / chi2(rng)));
      const bool inside = ((t - problem.lower()).array() >= 0).all() && ((problem.upper() - t).array() >= 0).all();
      if (!inside && attempt < 49) continue;
      theta.push_back(t.cwiseMax(problem.lower()).cwiseMin(problem.upper()));
      log_q.push_back(log_mixture(theta.back()));
      break;
    }
  }
  std::vector<double> log_w(theta.size(), -std::numeric_limits<double>::infinity());
  parallel_for(theta.size(), [&](std::size_t k) {
    Eigen::VectorXd r;
    if (!problem.residuals(theta[k], r)) return;
    log_w[k] = -(0.5 * r.squaredNorm() - cost) / s2 - log_q[k];
  });
  out.proposals = int(theta.size());
  const double top = *std::max_element(log_w.begin(), log_w.end());
  if (!std::isfinite(top)) return out;
  std::vector<double> w(log_w.size());
  double sum = 0, sum2 = 0;
  for (std::size_t k = 0; k < w.size(); ++k) {
    w[k] = std::isfinite(log_w[k]) ? std::exp(log_w[k] - top) : 0.0;
    sum += w[k];
    sum2 += w[k] * w[k];
  }
  out.effective_size = sum * sum / sum2;
  // Systematic resampling (Kitagawa 1996): one uniform offset, `keep` equally spaced points on the cumulative
  // weights.
  std::uniform_real_distribution<double> uniform(0.0, 1.0);
  const double step = sum / keep;
  double target = uniform(rng) * step, cumulative = 0;
  std::size_t k = 0;
  for (int j = 0; j < keep; ++j, target += step) {
    while (k + 1 < w.size() && cumulative + w[k] < target) cumulative += w[k++];
    out.draws.push_back(theta[k]);
  }
  return out;
}

}  // namespace spreadfit::fit
