// Bounded Levenberg-Marquardt on a residual function, with a forward-difference Jacobian (Marquardt 1963;
// Nocedal & Wright, Numerical Optimization, ch. 10). Bounds are kept by projection; a parameter resting on a
// bound is reported as such so the caller can switch to a profile interval.
#pragma once

#include <Eigen/Core>
#include <functional>
#include <string>

namespace spreadfit {

struct LmOptions {
  int max_iterations = 40;       ///< iterations (each costs one Jacobian: size() + 1 residual calls)
  double cost_tolerance = 1e-6;  ///< stop when the relative cost decrease of an accepted step is below this
  double step_tolerance = 1e-6;  ///< stop when the largest parameter change is below this (absolute)
  double decrease_tolerance = 1e-2;  ///< stop when the Gauss-Newton predicted decrease < this x residual variance
  double stall_tolerance = 0.005;   ///< two accepted steps in a row lowering the cost by less than this x
                                    ///< residual variance end the search (a flat valley)
  double initial_damping = 1e-3; ///< first lambda relative to the largest diagonal of J^T J (small from a good start)
  int broyden_refresh = 4;       ///< finite-difference Jacobian every this many iterations, Broyden updates
                                 ///< between (1: finite differences every iteration)
  Eigen::VectorXd fd_step;       ///< finite-difference step per parameter (required)
};

struct LmResult {
  Eigen::VectorXd x;        ///< best parameters
  Eigen::VectorXd r;        ///< residuals at x
  Eigen::MatrixXd jacobian; ///< at x (columns of parameters resting on a bound included)
  double cost = 0;          ///< 0.5 |r|^2
  int iterations = 0;
  bool converged = false;
  bool model_failed = false; ///< stopped because the residual function failed (the point is not an optimum)
  std::string message;      ///< why it stopped
};

/// Returns false from f to mark a failed evaluation (treated as an infinitely bad point). f must be safe to call
/// from several threads at once: the columns of a finite-difference Jacobian are evaluated in parallel.
using ResidualFunction = std::function<bool(const Eigen::VectorXd& x, Eigen::VectorXd& r)>;

LmResult levenberg_marquardt(const ResidualFunction& f, const Eigen::VectorXd& x0, const Eigen::VectorXd& lower,
                             const Eigen::VectorXd& upper, const LmOptions& options);

/// Forward-difference Jacobian of f at x (steps reversed at an upper bound), one column a thread
/// (src/parallel_for.hpp). Returns false if f failed.
bool finite_difference_jacobian(const ResidualFunction& f, const Eigen::VectorXd& x, const Eigen::VectorXd& r,
                                const Eigen::VectorXd& upper, const Eigen::VectorXd& step, Eigen::MatrixXd& J);

}  // namespace spreadfit
