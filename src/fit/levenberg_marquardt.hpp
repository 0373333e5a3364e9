// Bounded Levenberg-Marquardt on a residual function, with a forward-difference Jacobian (Marquardt 1963;
// Nocedal & Wright, Numerical Optimization, ch. 10). Bounds are kept by projection; a parameter resting on a
// bound is reported as such so the caller can switch to a profile interval.
#pragma once

#include <Eigen/Core>
#include <functional>
#include <string>

namespace spreadfit::fit {

struct LmOptions {
  int max_iterations = 40;       ///< iterations (each costs one Jacobian: size() + 1 residual calls)
  double cost_tolerance = 1e-6;  ///< stop when the relative cost decrease of an accepted step is below this
  double step_tolerance = 1e-6;  ///< stop when the largest parameter change is below this (absolute)
  double decrease_tolerance = 1e-2;  ///< stop when the Gauss-Newton predicted decrease < this x residual variance
  double stall_tolerance = 0.005;   ///< two accepted steps in a row lowering the cost by less than this x
                                    ///< residual variance end the search (a flat valley)
  double initial_damping = 1e-3; ///< first lambda relative to the largest diagonal of J^T J (small from a good start);
                                 ///< with Marquardt's per-parameter scaling on top, a problem should be scaled to
                                 ///< parameters of order one (the fits work in logarithms)
  int broyden_refresh = 4;       ///< finite-difference Jacobian every this many iterations, Broyden updates
                                 ///< between (1: finite differences every iteration)
  Eigen::VectorXd fd_step;       ///< finite-difference step per parameter (required)
  /// A Jacobian from a nearby point (rows = residuals, columns = parameters) to start from, updated by Broyden
  /// like any other; empty or mis-sized: finite differences at the start. A warm-started refit (a profile's next
  /// point) then begins with one residual call instead of size() + 1.
  Eigen::MatrixXd initial_jacobian;
  bool confirm_on_update = true;  ///< a convergence judged on a Broyden-updated Jacobian is confirmed with a
                                  ///< finite-difference one (false: accepted as judged, for refits that use only
                                  ///< the cost)
  bool final_jacobian = true;    ///< leave a finite-difference Jacobian at the returned point (for a covariance);
                                 ///< false saves up to size() residual calls where only x and the cost are used
                                 ///< (profile refits). The search path and x are the same either way.
};

/// Why the search ended; one value per return path of levenberg_marquardt. The first five are convergence
/// (`converged` true), MaxIterations is not, the ModelFailed ones set `model_failed`.
enum class LmStatus {
  NotRun,                      ///< a result that no search has filled in
  CostTolerance,               ///< relative cost decrease of an accepted step below cost_tolerance
  StepTolerance,               ///< largest parameter change below step_tolerance
  DecreaseTolerance,           ///< Gauss-Newton predicted decrease below decrease_tolerance x residual variance
  Stall,                       ///< three accepted steps in a row below stall_tolerance x residual variance
  NoDecrease,                  ///< no damped step lowers the cost (a numerical minimum)
  MaxIterations,               ///< max_iterations reached without meeting a tolerance
  ModelFailedAtStart,          ///< the residual function failed at the (projected) start
  ModelFailedDifferentiating,  ///< the residual function failed on every side of a finite-difference step
};

/// Short fixed name of a status (for logs and test messages), e.g. "cost_tolerance".
const char* lm_status_name(LmStatus status);

struct LmResult {
  Eigen::VectorXd x;        ///< best parameters
  Eigen::VectorXd r;        ///< residuals at x
  Eigen::MatrixXd jacobian; ///< at x (columns of parameters resting on a bound included); with
                            ///< final_jacobian false, possibly a Broyden update, one from an earlier point, or
                            ///< one whose known columns are the model's closed forms
  double cost = 0;          ///< 0.5 |r|^2
  int iterations = 0;
  bool converged = false;
  bool model_failed = false; ///< stopped because the residual function failed (the point is not an optimum)
  LmStatus status = LmStatus::NotRun;  ///< why it stopped, as a value (message says it in words)
  std::string message;      ///< why it stopped
};

/// Returns false from f to mark a failed evaluation (treated as an infinitely bad point). f must be safe to call
/// from several threads at once: the columns of a finite-difference Jacobian are evaluated in parallel.
using ResidualFunction = std::function<bool(const Eigen::VectorXd& x, Eigen::VectorXd& r)>;
/// A residual function that also knows some columns of its Jacobian in closed form (a fit's consistency and
/// release time, from the readings' rates: models/forward.hpp). With `columns` null it gives the residuals alone;
/// otherwise it also sets *columns to (residuals x parameters), exact derivatives in the columns it knows and NaN
/// in the others (or to an empty matrix: none known). The same thread-safety as ResidualFunction.
using ResidualColumnsFunction =
    std::function<bool(const Eigen::VectorXd& x, Eigen::VectorXd& r, Eigen::MatrixXd* columns)>;

LmResult levenberg_marquardt(const ResidualFunction& f, const Eigen::VectorXd& x0, const Eigen::VectorXd& lower,
                             const Eigen::VectorXd& upper, const LmOptions& options);
/// The same search using the columns f knows: they replace finite differences while searching (a refresh of the
/// Jacobian differences only the other columns, and a Broyden update keeps the known ones exact), but a convergence
/// is confirmed, and the final Jacobian computed, with finite differences in every column as before (options
/// confirm_on_update, final_jacobian): the closed forms hold for the equations, the differences for the solver's
/// readings, which differ from them by the discretisation (up to a few percent near arrest).
LmResult levenberg_marquardt(const ResidualColumnsFunction& f, const Eigen::VectorXd& x0, const Eigen::VectorXd& lower,
                             const Eigen::VectorXd& upper, const LmOptions& options);

/// Forward-difference Jacobian of f at x (steps reversed at an upper bound), one column a thread
/// (src/parallel_for.hpp). Returns false if f failed.
bool finite_difference_jacobian(const ResidualFunction& f, const Eigen::VectorXd& x, const Eigen::VectorXd& r,
                                const Eigen::VectorXd& upper, const Eigen::VectorXd& step, Eigen::MatrixXd& J);
/// The same, differencing only the columns that `known` (r.size() x x.size(), or empty) does not hold finite; the
/// known ones are copied.
bool finite_difference_jacobian(const ResidualFunction& f, const Eigen::VectorXd& x, const Eigen::VectorXd& r,
                                const Eigen::VectorXd& upper, const Eigen::VectorXd& step, const Eigen::MatrixXd& known,
                                Eigen::MatrixXd& J);

}  // namespace spreadfit::fit
