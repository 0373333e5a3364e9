// An embedded one-step method with a continuous extension plus a step-size controller, put together as a
// Boost.Odeint dense-output stepper (dense_output_stepper_tag), so odeint's integrate_times drives it and its
// max_step_checker bounds the steps between two observations. Observations between step ends are read from the
// method's continuous extension, so requested times do not cut the steps short.
//
// Method concept (e.g. TridiagonalRodas): error_order; bool do_step(sys, x, t, dt, x_new, error);
// calc_state(s, x_old, x_new, x) for s in [0, 1] of the last successful step.
#pragma once

#include <Eigen/Core>
#include <boost/numeric/odeint/stepper/stepper_categories.hpp>
#include <boost/numeric/odeint/util/odeint_error.hpp>
#include <cstddef>
#include <limits>
#include <stdexcept>
#include <string>
#include <type_traits>
#include <functional>
#include <utility>

#include "models/step_size_controller.hpp"

namespace spreadfit {

template <class Method>
class AdaptiveDenseStepper {
 public:
  using state_type = Eigen::VectorXd;
  using deriv_type = Eigen::VectorXd;
  using value_type = double;
  using time_type = double;
  using order_type = unsigned short;
  using stepper_category = boost::numeric::odeint::dense_output_stepper_tag;

  /// max_rejections: rejected tries in a row before do_step gives up (odeint's step_adjustment_error, naming the
  /// bound, as odeint's own controlled steppers throw).
  AdaptiveDenseStepper(Method method, StepSizeController controller, int max_rejections = 60)
      : method_(std::move(method)), controller_(controller), max_rejections_(max_rejections) {}

  void initialize(const state_type& x0, double t0, double dt0) {
    x_ = x0;
    t_ = t0;
    dt_ = dt0;
    x_old_ = x0;
    t_old_ = t0;
    controller_.reset();
  }

  /// One accepted step; returns (t_old, t_new).
  template <class System>
  std::pair<double, double> do_step(System&& system) {
    // odeint hands the system over as given to integrate_* (often a std::reference_wrapper).
    const auto& sys = static_cast<const std::unwrap_reference_t<std::decay_t<System>>&>(system);
    for (int tries = 0;; ++tries) {
      if (tries >= max_rejections_)
        throw boost::numeric::odeint::step_adjustment_error(std::to_string(max_rejections_) + " rejected steps in a row at t = " +
                                 std::to_string(t_) + " s (AdaptiveDenseStepper max_rejections)");
      const double dt = dt_;
      double err = std::numeric_limits<double>::quiet_NaN();
      if (method_.do_step(sys, x_, t_, dt, x_try_, error_)) err = controller_.error_norm(x_, x_try_, error_);
      if (controller_.judge(err, dt_)) {
        x_old_.swap(x_);
        x_.swap(x_try_);
        t_old_ = t_;
        t_ += dt;
        last_dt_ = dt;
        ++steps_;
        return {t_old_, t_};
      }
      ++rejected_;
    }
  }

  /// State at t in [previous_time(), current_time()] from the method's continuous extension.
  void calc_state(double t, state_type& x) const {
    if (t == t_) {
      x = x_;
      return;
    }
    method_.calc_state((t - t_old_) / last_dt_, x_old_, x_, x);
  }

  const state_type& current_state() const { return x_; }
  double current_time() const { return t_; }
  double current_time_step() const { return dt_; }
  const state_type& previous_state() const { return x_old_; }
  double previous_time() const { return t_old_; }

  const Method& method() const { return method_; }
  std::size_t steps() const { return steps_; }
  std::size_t rejected_steps() const { return rejected_; }

 private:
  Method method_;
  StepSizeController controller_;
  int max_rejections_;
  state_type x_, x_old_, x_try_, error_;
  double t_ = 0.0, t_old_ = 0.0, dt_ = 0.0, last_dt_ = 1.0;
  std::size_t steps_ = 0, rejected_ = 0;
};

}  // namespace spreadfit
