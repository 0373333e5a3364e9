#include "src/fit/surrogate_start.hpp"

#include <algorithm>
#include <exception>
#include <functional>
#include <limits>
#include <nlopt.hpp>
#include <stdexcept>
#include <vector>

namespace spreadfit::fit {

namespace {

// Minimises 0.5 |surrogate residuals(theta)|^2 over the first `count` parameters of theta (the rest
// held) with `algorithm` and `budget` evaluations; returns the best point seen (`start` if none was better).
// NLopt turns exceptions into a generic failure, so the original is kept and rethrown.
Eigen::VectorXd minimise_surrogate(const FitProblem& problem, const Eigen::VectorXd& start, nlopt::algorithm algorithm,
                                   int count, int budget) {
  Eigen::VectorXd best = start, theta = start, r;
  double best_cost = std::numeric_limits<double>::infinity();
  std::exception_ptr error;
  std::function<double(const double*)> objective = [&](const double* x) {
    try {
      for (int i = 0; i < count; ++i) theta[i] = x[i];
      problem.surrogate_residuals(theta, r);
      const double c = r.allFinite() ? 0.5 * r.squaredNorm() : 1e300;
      if (c < best_cost) {
        best_cost = c;
        best = theta;
      }
      return c;
    } catch (...) {
      error = std::current_exception();
      throw nlopt::forced_stop();
    }
  };
  nlopt::opt opt(algorithm, unsigned(count));
  opt.set_lower_bounds(std::vector<double>(problem.lower().data(), problem.lower().data() + count));
  opt.set_upper_bounds(std::vector<double>(problem.upper().data(), problem.upper().data() + count));
  opt.set_maxeval(budget);
  if (algorithm == nlopt::LN_BOBYQA) opt.set_xtol_abs(1e-4);
  opt.set_min_objective(
      [](unsigned, const double* x, double*, void* data) -> double {
        return (*static_cast<std::function<double(const double*)>*>(data))(x);
      },
      &objective);
  std::vector<double> x(start.data(), start.data() + count);
  double value = 0;
  try {
    opt.optimize(x, value);
  } catch (const std::runtime_error&) {
    // NLopt's ways of stopping early (nlopt::forced_stop and nlopt::roundoff_limited derive from
    // std::runtime_error, as does its generic failure): the best point seen is kept either way.
  } catch (const std::invalid_argument&) {
    // NLopt refuses a start that rounding put a hair outside the box ("bounds ... fail"): the start is kept.
  }
  if (error) std::rethrow_exception(error);
  return best;
}

}  // namespace

// DIRECT's cost grows quickly with the dimension and the release times are nuisance parameters, so DIRECT searches
// the material parameters only, with the clock started at the release (clamped into the box), the least
// surprising guess; BOBYQA then frees the release times from DIRECT's point, handing the polish a start whose
// release times are already consistent with the material.
Eigen::VectorXd global_start(const FitProblem& problem, int evaluations) {
  const int p = problem.size();
  const int pm = problem.material_parameters();
  Eigen::VectorXd best = 0.5 * (problem.lower() + problem.upper());
  for (int i = pm; i < p; ++i) best[i] = std::clamp(0.0, problem.lower()[i], problem.upper()[i]);
  if (evaluations <= 0) return best;
  best = minimise_surrogate(problem, best, nlopt::GN_DIRECT_L, pm, evaluations);
  if (p > pm) best = minimise_surrogate(problem, best, nlopt::LN_BOBYQA, p, evaluations / 3);
  return best;
}

}  // namespace spreadfit::fit
