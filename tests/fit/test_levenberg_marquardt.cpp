// The Levenberg-Marquardt kernel (src/fit/levenberg_marquardt.hpp) on NIST StRD nonlinear regression problems
// from both certified starting points, scored the way the StRD documentation scores software: the log relative
// error LRE = -log10(|estimate - certified| / |certified|), the number of matching significant digits (B. D.
// McCullough, "Assessing the reliability of statistical software", The American Statistician, 1998 and 1999; cited from
// memory). Certified values: tests/fit/nist_strd_problems.hpp (NIST ITL StRD).
#include <doctest/doctest.h>

#include <Eigen/Cholesky>
#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include "nist_strd_problems.hpp"
#include "src/fit/levenberg_marquardt.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

namespace {

/// LRE of an estimate against a certified value, capped at the 11 digits NIST certifies.
double log_relative_error(double estimate, double certified) {
  const double rel = std::abs(estimate - certified) / std::abs(certified);
  if (rel == 0.0) return 11.0;
  return std::min(11.0, -std::log10(rel));
}

fit::ResidualFunction residuals_of(const StrdProblem& p) {
  return [&p](const Eigen::VectorXd& b, Eigen::VectorXd& r) {
    r.resize(Eigen::Index(p.x.size()));
    for (std::size_t i = 0; i < p.x.size(); ++i) r[Eigen::Index(i)] = p.model(b, p.x[i]) - p.y[i];
    return r.allFinite();
  };
}

/// Options for a certification run: the statistical stopping rules that suit a noisy forward model (decrease and
/// stall relative to the residual variance) are switched off, so the search runs to the cost's numerical minimum.
fit::LmOptions certification_options(const Eigen::VectorXd& scale) {
  fit::LmOptions o;
  o.max_iterations = 2000;
  o.cost_tolerance = 1e-15;
  o.step_tolerance = 0.0;
  o.decrease_tolerance = 0.0;
  o.stall_tolerance = 0.0;
  o.broyden_refresh = 1;
  // Forward differences: a step of sqrt(machine epsilon) relative to the parameter's size (Dennis and Schnabel,
  // Numerical Methods for Unconstrained Optimization, 1983, sec. 5.4).
  o.fd_step = scale.cwiseAbs().cwiseMax(1e-12) * std::sqrt(std::numeric_limits<double>::epsilon());
  return o;
}

struct Scores {
  fit::LmResult result;
  double rss_lre = 0;
  double worst_parameter_lre = 0;
  double worst_sd_lre = 0;
};

/// Runs the kernel from a start, then once more from the point reached with finite-difference steps sized to
/// that point (the start's magnitudes may be far from the solution's: MGH09's first start is 100x off), and
/// scores the result. Unbounded: the StRD problems have no bounds.
Scores solve(const StrdProblem& p, const std::vector<double>& start) {
  const auto n = Eigen::Index(start.size());
  const Eigen::VectorXd x0 = Eigen::Map<const Eigen::VectorXd>(start.data(), n);
  const Eigen::VectorXd lower = Eigen::VectorXd::Constant(n, -std::numeric_limits<double>::infinity());
  const Eigen::VectorXd upper = Eigen::VectorXd::Constant(n, std::numeric_limits<double>::infinity());
  const fit::ResidualFunction f = residuals_of(p);
  Scores s;
  const fit::LmResult first = levenberg_marquardt(f, x0, lower, upper, certification_options(x0));
  s.result = first.model_failed ? first : fit::levenberg_marquardt(f, first.x, lower, upper, certification_options(first.x));
  s.result.iterations += first.iterations;
  const fit::LmResult& r = s.result;
  s.rss_lre = log_relative_error(r.r.squaredNorm(), p.certified_rss);
  s.worst_parameter_lre = 11.0;
  for (Eigen::Index j = 0; j < n; ++j)
    s.worst_parameter_lre = std::min(s.worst_parameter_lre, log_relative_error(r.x[j], p.certified[std::size_t(j)]));
  // Standard deviations as StRD defines them: sqrt(diag(s^2 (J^T J)^-1)), s^2 = RSS / (n_obs - n_par).
  const double s2 = r.r.squaredNorm() / double(r.r.size() - n);
  const Eigen::MatrixXd cov = s2 * (r.jacobian.transpose() * r.jacobian).ldlt().solve(Eigen::MatrixXd::Identity(n, n));
  s.worst_sd_lre = 11.0;
  for (Eigen::Index j = 0; j < n; ++j)
    s.worst_sd_lre = std::min(s.worst_sd_lre, log_relative_error(std::sqrt(cov(j, j)), p.certified_sd[std::size_t(j)]));
  return s;
}

bool is_convergence(fit::LmStatus s) {
  return s == fit::LmStatus::CostTolerance || s == fit::LmStatus::StepTolerance || s == fit::LmStatus::DecreaseTolerance ||
         s == fit::LmStatus::Stall || s == fit::LmStatus::NoDecrease;
}

/// Digits required of a problem (LRE): the thresholds are the StRD scoring scale, set half a digit or more below
/// what the kernel reaches with forward differences so a compiler or library change does not flip them.
struct Digits {
  double parameters, standard_deviations, rss;
};

void check_certified(const StrdProblem& p, int start_number, Digits want) {
  const Scores s = solve(p, start_number == 1 ? p.start1 : p.start2);
  const std::string status = fit::lm_status_name(s.result.status);
  CAPTURE(p.name);
  CAPTURE(start_number);
  CAPTURE(status);
  MESSAGE(p.name, " start ", start_number, ": LRE rss ", s.rss_lre, ", parameters ", s.worst_parameter_lre,
          ", standard deviations ", s.worst_sd_lre, ", ", status, ", ", s.result.iterations, " iterations");
  CHECK(s.result.converged);
  CHECK(is_convergence(s.result.status));
  CHECK_FALSE(s.result.model_failed);
  CHECK(s.rss_lre >= want.rss);
  CHECK(s.worst_parameter_lre >= want.parameters);
  // Standard deviations come from a forward-difference Jacobian (about half the digits of double precision).
  CHECK(s.worst_sd_lre >= want.standard_deviations);
}

}  // namespace

// Certified values: NIST ITL StRD, Misra1a.dat (tests/fit/nist_strd_problems.hpp).
TEST_CASE("levenberg_marquardt reaches the NIST StRD certified values: Misra1a, both starts") {
  check_certified(misra1a(), 1, {8.0, 6.0, 10.0});
  check_certified(misra1a(), 2, {8.0, 6.0, 10.0});
}

// Certified values: NIST ITL StRD, Chwirut2.dat.
TEST_CASE("levenberg_marquardt reaches the NIST StRD certified values: Chwirut2, both starts") {
  check_certified(chwirut2(), 1, {7.0, 6.0, 10.0});
  check_certified(chwirut2(), 2, {7.0, 6.0, 10.0});
}

// Certified values: NIST ITL StRD, Lanczos3.dat. Three nearly collinear exponentials: the
// parameters are the least well determined of the set.
TEST_CASE("levenberg_marquardt reaches the NIST StRD certified values: Lanczos3, both starts") {
  check_certified(lanczos3(), 1, {5.0, 3.5, 10.0});
  check_certified(lanczos3(), 2, {5.0, 3.5, 10.0});
}

// Certified values: NIST ITL StRD, Thurber.dat (higher level of difficulty).
TEST_CASE("levenberg_marquardt reaches the NIST StRD certified values: Thurber, both starts") {
  check_certified(thurber(), 1, {6.0, 5.0, 10.0});
  check_certified(thurber(), 2, {6.0, 5.0, 10.0});
}

// Certified values: NIST ITL StRD, MGH09.dat (higher level of difficulty). From start 1 (100 times the solution's size)
// the kernel does not reach the certified minimum: it drifts along the valley toward the local minimum at infinity that
// the dataset file describes and stops there on step_tolerance (a known limit, not checked here).
TEST_CASE("levenberg_marquardt reaches the NIST StRD certified values: MGH09, start 2") {
  check_certified(mgh09(), 2, {6.0, 6.0, 10.0});
}

// The status enum agrees with the flags other code reads (converged, model_failed) on every kind of ending.
TEST_CASE("levenberg_marquardt status: model failure at the start, while differentiating, and max_iterations") {
  const StrdProblem p = misra1a();
  const fit::ResidualFunction good = residuals_of(p);
  const Eigen::VectorXd x0 = Eigen::Vector2d(500, 1e-4);
  const Eigen::VectorXd lower = Eigen::Vector2d(0, 0), upper = Eigen::Vector2d(1e4, 1);
  fit::LmOptions o = certification_options(x0);

  const fit::ResidualFunction never = [](const Eigen::VectorXd&, Eigen::VectorXd&) { return false; };
  const fit::LmResult at_start = levenberg_marquardt(never, x0, lower, upper, o);
  CHECK(at_start.status == fit::LmStatus::ModelFailedAtStart);
  CHECK(at_start.model_failed);
  CHECK_FALSE(at_start.converged);

  // Evaluates only at the start itself: every finite-difference side fails.
  const fit::ResidualFunction only_at_start = [&](const Eigen::VectorXd& b, Eigen::VectorXd& r) {
    return b == x0 && good(b, r);
  };
  const fit::LmResult differentiating = levenberg_marquardt(only_at_start, x0, lower, upper, o);
  CHECK(differentiating.status == fit::LmStatus::ModelFailedDifferentiating);
  CHECK(differentiating.model_failed);
  CHECK_FALSE(differentiating.converged);

  o.max_iterations = 2;  // Misra1a from start 1 needs far more (see the certified run above)
  const fit::LmResult short_run = levenberg_marquardt(good, x0, lower, upper, o);
  CHECK(short_run.status == fit::LmStatus::MaxIterations);
  CHECK_FALSE(short_run.converged);
  CHECK_FALSE(short_run.model_failed);
  CHECK(short_run.iterations == 2);
  CHECK(std::string(fit::lm_status_name(short_run.status)) == "max_iterations");
}
