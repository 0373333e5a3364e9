// An L-stable, second-order Rosenbrock stepper for stiff systems whose Jacobian is tridiagonal, written to
// Boost.Odeint's ControlledStepper concept so that odeint's integrate_* drivers (and their max_step_checker loop
// guards) drive it like any stock stepper.
//
// Method: ROS2 of Verwer, Spee, Blom & Hundsdorfer (1999), SIAM J. Sci. Comput. 20, 1456-1480, eq. (2.4):
//   gamma = 1 + 1/sqrt(2),  W = I - gamma h J
//   W k1 = f(y_n)
//   W k2 = f(y_n + h k1) - 2 k1
//   y_{n+1} = y_n + (3/2) h k1 + (1/2) h k2,
// with the embedded first-order solution y_n + h k1, so the local error estimate is (h/2)(k1 + k2).
// The Jacobian is formed by finite differences with three colours (columns i, i+3, i+6, ... perturbed together),
// i.e. three extra right-hand-side calls, and W is solved in O(N) by the Thomas algorithm. ROS2 keeps order two
// for any matrix J in W (Verwer et al. 1999, section 2; from memory: it is what lets them use approximate
// Jacobians), so J may be kept for `jacobian_reuse` accepted steps; the error control still judges every step, and
// a step rejected on a kept J is retried with a fresh one. A retry at the same point reuses f(y_n) and a fresh J. A stock dense
// stepper (odeint's rosenbrock4) costs O(N^3) a step; for N ~ 40-80 this stepper is one to two orders faster.
//
// The system is a plain callable sys(const Eigen::VectorXd& x, Eigen::VectorXd& dxdt, double t); it must be
// autonomous in the sense that its Jacobian does not need a time derivative (true for the thin-film models).
#pragma once

#include <Eigen/Core>
#include <algorithm>
#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>
#include <boost/numeric/odeint/stepper/stepper_categories.hpp>
#include <cmath>
#include <cstddef>

namespace spreadfit {

class TridiagonalRosenbrock2 {
 public:
  using state_type = Eigen::VectorXd;
  using deriv_type = Eigen::VectorXd;
  using value_type = double;
  using time_type = double;
  using order_type = unsigned short;
  using stepper_category = boost::numeric::odeint::controlled_stepper_tag;

  /// abs_tol and rel_tol act per component: err_i / (abs_tol + rel_tol |x_i|) <= 1 accepts a step.
  /// jacobian_reuse: accepted steps a finite-difference Jacobian serves (1: a fresh one every step).
  TridiagonalRosenbrock2(double abs_tol, double rel_tol, int jacobian_reuse = 1)
      : abs_tol_(abs_tol), rel_tol_(rel_tol), reuse_(std::max(jacobian_reuse, 1)) {}

  static constexpr order_type order() { return 2; }

  std::size_t rhs_calls() const { return rhs_calls_; }
  std::size_t rejected_steps() const { return rejected_; }

  template <class System>
  boost::numeric::odeint::controlled_step_result try_step(System&& sys, state_type& x, double& t, double& dt) {
    using boost::numeric::odeint::fail;
    using boost::numeric::odeint::success;
    const Eigen::Index n = x.size();
    resize(n);
    const bool same_point = have_f0_ && t == t_f0_ && x.size() == x_f0_.size() && (x.array() == x_f0_.array()).all();
    if (!same_point) {
      sys(x, f0_, t);
      ++rhs_calls_;
      x_f0_ = x;
      t_f0_ = t;
      have_f0_ = true;
      ++age_;
    }
    if (age_ >= reuse_ || refresh_) {
      jacobian(sys, x, t);
      age_ = 0;
      refresh_ = false;
    }
    const double gamma = 1.0 + 1.0 / std::sqrt(2.0);
    // W = I - gamma dt J, in the three diagonals.
    for (Eigen::Index i = 0; i < n; ++i) {
      wd_[i] = 1.0 - gamma * dt * jd_[i];
      wl_[i] = -gamma * dt * jl_[i];
      wu_[i] = -gamma * dt * ju_[i];
    }
    if (!factorize()) {
      dt *= 0.25;
      reject();
      return fail;
    }
    k1_ = f0_;
    solve(k1_);
    y1_ = x + dt * k1_;
    sys(y1_, f1_, t + dt);
    ++rhs_calls_;
    k2_ = f1_ - 2.0 * k1_;
    solve(k2_);
    // Error against the embedded first-order solution, scaled per component.
    double err = 0.0;
    for (Eigen::Index i = 0; i < n; ++i) {
      const double e = 0.5 * dt * (k1_[i] + k2_[i]);
      const double ynew = x[i] + 1.5 * dt * k1_[i] + 0.5 * dt * k2_[i];
      const double sc = abs_tol_ + rel_tol_ * std::max(std::abs(x[i]), std::abs(ynew));
      err = std::max(err, std::abs(e) / sc);
    }
    if (!std::isfinite(err)) {
      dt *= 0.25;
      reject();
      return fail;
    }
    // Standard controller for an order-2 method with a first-order estimate: h_new = h * 0.9 err^(-1/2).
    const double factor = std::clamp(0.9 / std::sqrt(std::max(err, 1e-12)), 0.2, 5.0);
    if (err > 1.0) {
      dt *= std::min(factor, 0.9);
      reject();
      return fail;
    }
    x += 1.5 * dt * k1_ + 0.5 * dt * k2_;
    t += dt;
    dt *= factor;
    return success;
  }

 private:
  // A rejected step on a kept Jacobian is retried with a fresh one (it may have been the cause).
  void reject() {
    ++rejected_;
    if (age_ > 0) refresh_ = true;
  }

  void resize(Eigen::Index n) {
    if (f0_.size() == n) return;
    for (auto* v : {&f0_, &f1_, &k1_, &k2_, &y1_, &xp_, &fp_, &jd_, &jl_, &ju_, &wd_, &wl_, &wu_, &cp_})
      v->resize(n);
  }

  // Finite-difference tridiagonal Jacobian: row i holds jl_[i] = df_i/dx_{i-1}, jd_[i] = df_i/dx_i,
  // ju_[i] = df_i/dx_{i+1}.
  template <class System>
  void jacobian(System& sys, const state_type& x, double t) {
    const Eigen::Index n = x.size();
    for (int colour = 0; colour < 3; ++colour) {
      xp_ = x;
      for (Eigen::Index j = colour; j < n; j += 3) xp_[j] += delta(x[j]);
      sys(xp_, fp_, t);
      ++rhs_calls_;  // f0_ is f at x: the caller evaluated it at this point
      for (Eigen::Index j = colour; j < n; j += 3) {
        const double d = xp_[j] - x[j];
        if (j > 0) ju_[j - 1] = (fp_[j - 1] - f0_[j - 1]) / d;
        jd_[j] = (fp_[j] - f0_[j]) / d;
        if (j + 1 < n) jl_[j + 1] = (fp_[j + 1] - f0_[j + 1]) / d;
      }
    }
  }

  // A small perturbation on purpose: the thin-film velocities are steep functions of the nodes near a yield
  // surface, and a coarse Jacobian there (1.5e-8 relative was tried) traps ROS2 on a spurious fixed point as the
  // flow arrests. States are O(1) (scaled by the caller), so 1e-10 leaves ~1e-6 relative rounding in J.
  double delta(double xj) const { return 1e-10 * std::max(std::abs(xj), 1.0); }

  // Thomas algorithm, split into factorisation (once a step) and two solves.
  bool factorize() {
    const Eigen::Index n = wd_.size();
    double denom = wd_[0];
    if (!(std::abs(denom) > 0) || !std::isfinite(denom)) return false;
    cp_[0] = wu_[0] / denom;
    wd_[0] = denom;
    for (Eigen::Index i = 1; i < n; ++i) {
      denom = wd_[i] - wl_[i] * cp_[i - 1];
      if (!(std::abs(denom) > 1e-300) || !std::isfinite(denom)) return false;
      wd_[i] = denom;
      cp_[i] = wu_[i] / denom;
    }
    return true;
  }

  void solve(Eigen::VectorXd& b) const {
    const Eigen::Index n = b.size();
    b[0] /= wd_[0];
    for (Eigen::Index i = 1; i < n; ++i) b[i] = (b[i] - wl_[i] * b[i - 1]) / wd_[i];
    for (Eigen::Index i = n - 2; i >= 0; --i) b[i] -= cp_[i] * b[i + 1];
  }

  double abs_tol_;
  double rel_tol_;
  int reuse_ = 1;
  std::size_t rhs_calls_ = 0;
  std::size_t rejected_ = 0;
  // f(y_n) at the point (x_f0_, t_f0_), and the age of the Jacobian in accepted steps; a new stepper starts with
  // age_ = reuse_ so that its first step forms one.
  bool have_f0_ = false;
  double t_f0_ = 0.0;
  Eigen::VectorXd x_f0_;
  int age_ = 1 << 20;
  bool refresh_ = false;
  Eigen::VectorXd f0_, f1_, k1_, k2_, y1_, xp_, fp_, jd_, jl_, ju_, wd_, wl_, wu_, cp_;
};

}  // namespace spreadfit
