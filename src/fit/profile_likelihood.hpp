// Profile-likelihood intervals for any bounded least-squares problem (Bates & Watts 1988, Nonlinear Regression
// Analysis and Its Applications, section 6.1: the profile t function; Venzon & Moolgavkar 1988).
//
// For parameter j held at a value v, the other parameters are re-optimised (a "refit") and the profile t is
//     tau(v) = sign(v - x_j) sqrt(2 (cost(v) - cost_min) / s^2),     cost = 0.5 |r|^2,
// where s^2 is the residual variance (1 when the residuals are already weighted by a stated uncertainty and the
// fit agrees with it). The 95% interval is {v : |tau(v)| <= t(n - p, 0.975)}. Unlike the quadratic (Wald)
// interval it follows the curved ridges of a thin-film fit, where the consistency and the flow index trade off
// against each other and against the yield stress.
//
// Why a walk and not a root search: each side is traced outward from the optimum by continuation, every refit
// warm-started from the previous one (linear extrapolation of the other parameters along the trace), with the
// step at most doubling, until tau crosses the cut-off; the crossing is then interpolated (tau is close to linear
// in v, Bates & Watts fig. 6.4) and refined. Where a refit lands far past the cut-off (a wall), the step is
// halved from the last point below instead, and the walk stays within half the way to the wall. A secant from the
// Wald guess may leap over a bend of the ridge into a second valley, and its answer then jumps between two values
// when the readings move by a hair; the walk finds the first crossing, which moves continuously with the data. A
// side that reaches the parameter's box before the cut-off is open: the readings bound the parameter on one side
// only.
#pragma once

#include <Eigen/Core>
#include <mutex>
#include <optional>
#include <vector>

#include "src/fit/levenberg_marquardt.hpp"

namespace spreadfit::fit {

enum class ProfileEnd {
  Crossed,  ///< tau reached the cut-off: a finite limit
  Bound,    ///< the parameter's box was reached first: this side is open
  Failed    ///< refits kept failing (the model could not be evaluated): the side is reported open
};

struct ProfileSide {
  double limit = 0;  ///< the parameter's value at the limit (the box limit when open)
  ProfileEnd end = ProfileEnd::Failed;
  int refits = 0;    ///< conditional fits spent on this side
  /// The full parameter vectors of the refits along the walk with tau within 1.5 x the cut-off: points on the
  /// likelihood's ridge (src/fit/likelihood_draws.hpp centres its proposals on them).
  std::vector<Eigen::VectorXd> trace;
  std::vector<double> trace_tau;  ///< the profile t at each trace point
  /// At a crossed limit, what re-evaluating it on another model of the same readings needs: the full parameter
  /// vector there (the conditional optimum, interpolated across the last bracket when the limit was not refitted
  /// itself), the residuals' Jacobian in the other parameters near it (the last refit's), and the slope of tau
  /// outward (d tau / d|v - x_j|) and of the full parameter vector (the ridge's direction, per unit of |v - x_j|)
  /// across the bracket. Empty / 0 on an open side.
  Eigen::VectorXd at_limit, limit_direction;
  Eigen::MatrixXd limit_jacobian;
  double limit_slope = 0;
};

struct ProfileOptions {
  int max_refits = 10;         ///< refits a side, tracing and refining together (the loop's bound; each
                               ///< halving of a step at a wall adds one, six at most)
  int refit_iterations = 12;   ///< Levenberg-Marquardt iterations of one refit
  /// A refit ends when its Gauss-Newton predicted decrease is below this x s^2 (LmOptions::decrease_tolerance):
  /// the cost then errs by about that much, tau at the cut-off by about 0.3% at the default, well inside
  /// `tolerance`. Smaller for a comparison with another program's profile to more digits.
  double refit_decrease_tolerance = 1e-2;
  double tolerance = 0.04;     ///< accepted relative error of tau at the limit
  double first_step = 0.5;     ///< the walk's first step, as a fraction of the quadratic (Wald) half-width
  double max_first_step = 0.5; ///< ... and at most this much (in the parameter's units)
  double step_tolerance = 3e-3; ///< a bracket this narrow (relative to max(1, |value|)) ends the refinement
};

class ProfileLikelihood {
 public:
  /// f, lower, upper, fd_step: the problem as given to levenberg_marquardt; best: its optimum (x, cost);
  /// s2: residual variance; q: the cut-off (t quantile); covariance: the quadratic covariance at the optimum
  /// (entries may be infinite), used for the first step and warm start only; jacobian: the residuals' Jacobian
  /// at the optimum (empty if none), which starts the first refit of every side instead of finite differences.
  /// Each later refit starts from the Jacobian the previous one ended with (a nearby point of the same walk).
  ProfileLikelihood(ResidualFunction f, Eigen::VectorXd lower, Eigen::VectorXd upper, Eigen::VectorXd fd_step,
                    Eigen::VectorXd best_x, double best_cost, double s2, double q, Eigen::MatrixXd covariance,
                    ProfileOptions options = {}, Eigen::MatrixXd jacobian = {});
  /// The same for a model that knows some Jacobian columns in closed form (a fit's consistency and release times):
  /// the refits search with them (levenberg_marquardt's ResidualColumnsFunction overload).
    ProfileLikelihood(ResidualColumnsFunction f, Eigen::VectorXd lower, Eigen::VectorXd upper, Eigen::VectorXd fd_step,
                    Eigen::VectorXd best_x, double best_cost, double s2, double q, Eigen::MatrixXd covariance,
                    ProfileOptions options = {}, Eigen::MatrixXd jacobian = {});

  /// One side (dir = +1 upper, -1 lower) of parameter j's interval. Safe to call from several threads.
  ProfileSide side(int j, int dir) const;

  /// A point found by a refit with a clearly lower cost than the optimum (the optimum was not one: the caller
  /// should polish from it and profile again), if any.
  std::optional<Eigen::VectorXd> better_point() const;
  /// The lowest cost a refit found (the optimum's own cost when none found a lower one).
  double better_cost() const;

 private:
  struct Refit {
    bool ok = false;
    double tau = 0;
    Eigen::VectorXd rest;      // the other parameters at the conditional optimum
    Eigen::MatrixXd jacobian;  // the residuals' Jacobian in them, where the refit ended (the next one's start)
  };
  /// confirmed: a convergence judged on an updated Jacobian is confirmed by differences (LmOptions::confirm_on_update).
  Refit refit(int j, double value, const Eigen::VectorXd& warm, const Eigen::MatrixXd& warm_jacobian,
              bool confirmed = false) const;

  ResidualColumnsFunction f_;
  Eigen::VectorXd lower_, upper_, step_, best_;
  double best_cost_, s2_, q_;
  Eigen::MatrixXd cov_, jacobian_;
  ProfileOptions options_;
  mutable std::mutex better_lock_;
  mutable std::optional<Eigen::VectorXd> better_;
  mutable double better_cost_;
};

}  // namespace spreadfit::fit
