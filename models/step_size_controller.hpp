// Step-size control of an embedded one-step method, kept apart from the method itself so that a method can be
// checked at fixed steps (its order) and a controller changed without touching the method.
//
// The error norm is the largest scaled component, err = max_i |e_i| / (abs_tol + rel_tol max(|x_i|, |x_new,i|)),
// and a step is accepted when err <= 1. The new step follows Gustafsson's predictive (PI) controller as given by
// Hairer & Wanner, Solving Ordinary Differential Equations II (2nd ed., 1996), section IV.8, eq. (8.21):
//     h_new = h * min(safety err^(-1/k), safety err^(-1/k) (h / h_old)(err_old / err)^(1/k)),
// k = the order of the embedded estimate + 1, err_old >= 1e-2 (as in their RODAS code); it damps the oscillating step sequences the plain controller
// h * safety * err^(-1/k) gives on stiff problems. A rejected step shrinks by the plain factor (at most to 1/5).
#pragma once

#include <algorithm>
#include <cmath>

namespace spreadfit {

struct StepSizeControl {
  double safety = 0.9;      ///< factor on the predicted step
  double min_factor = 0.2;  ///< smallest ratio of new to old step
  double max_factor = 6.0;  ///< largest ratio of new to old step
  bool predictive = true;   ///< Gustafsson's predictive controller (false: the plain err^(-1/k) rule)
};

class StepSizeController {
 public:
  /// error_order: order of the method's embedded error estimate (3 for a 4(3) pair).
  StepSizeController(double abs_tol, double rel_tol, unsigned error_order, StepSizeControl control = {})
      : abs_tol_(abs_tol), rel_tol_(rel_tol), exponent_(1.0 / (error_order + 1.0)), c_(control) {}

  /// Scaled error norm of an error estimate e for the step x -> x_new (any Eigen-like vectors).
  template <class Vector>
  double error_norm(const Vector& x, const Vector& x_new, const Vector& e) const {
    double err = 0.0;
    for (decltype(x.size()) i = 0; i < x.size(); ++i) {
      const double sc = abs_tol_ + rel_tol_ * std::max(std::abs(x[i]), std::abs(x_new[i]));
      err = std::max(err, std::abs(e[i]) / sc);
    }
    return err;
  }

  /// Judges a step of size dt with error norm err (NaN counts as a failure). Returns true to accept; either way dt
  /// becomes the next step to try.
  bool judge(double err, double& dt) {
    if (!std::isfinite(err)) {
      dt *= c_.min_factor;
      rejected_last_ = true;
      return false;
    }
    const double e = std::max(err, 1e-10);
    double factor = c_.safety * std::pow(e, -exponent_);
    if (err > 1.0) {
      dt *= std::clamp(factor, c_.min_factor, 0.9);
      rejected_last_ = true;
      return false;
    }
    if (c_.predictive && have_last_)
      factor = std::min(factor, factor * (dt / dt_last_) * std::pow(err_last_ / e, exponent_));
    // No growth right after a rejection (Hairer & Wanner, IV.8: avoids a reject-accept cycle).
    const double upper = rejected_last_ ? 1.0 : c_.max_factor;
    dt_last_ = dt;
    err_last_ = std::max(e, 1e-2);
    have_last_ = true;
    rejected_last_ = false;
    dt *= std::clamp(factor, c_.min_factor, upper);
    return true;
  }

  /// Forget the step history (a new start: the driver moved the state or the step).
  void reset() {
    have_last_ = false;
    rejected_last_ = false;
  }

 private:
  double abs_tol_, rel_tol_, exponent_;
  StepSizeControl c_;
  bool have_last_ = false, rejected_last_ = false;
  double dt_last_ = 0.0, err_last_ = 1.0;
};

}  // namespace spreadfit
