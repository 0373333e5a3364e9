// A fourth-order, L-stable, stiffly accurate Rosenbrock method with an embedded third-order solution and a
// third-order continuous extension, for autonomous systems x' = f(x) whose Jacobian is tridiagonal; one step costs
// one Jacobian, one O(N) tridiagonal factorisation, six right-hand sides and six O(N) solves.
//
// Method: RODAS of Hairer & Wanner, Solving Ordinary Differential Equations II (2nd ed., 1996), section VI.4, with
// the coefficient set and dense-output coefficients of their code as shipped in Boost.Odeint's rosenbrock4
// (default_rosenbrock_coefficients). In that form, with W = I/(gamma dt) - J,
//     W g_i = f(x + sum_j a_ij g_j) + sum_j c_ij g_j / dt           (i = 1..6, a_6j: x_6 = x_5 + g_5),
//     x_new = x_5 + g_5 + g_6,  embedded x_5 + g_5,  error estimate g_6,
//     x(t + s dt) = (1 - s) x + s (x_new + (1 - s)(cont3 + s cont4)),  cont = sum_j d_kj g_j.
// Odeint's rosenbrock4 forms a dense N x N Jacobian and LU (O(N^3) a step); here the same method runs on the three
// diagonals. The method is exact-Jacobian Rosenbrock: a stale or approximate J lowers its order, so J is formed at
// every step, from the system's analytic tridiagonal_jacobian. Time derivative terms are absent (autonomous).
//
// Step-size control is not here: do_step takes a step of the size it is given and returns its error estimate, so
// the method's order can be checked at fixed steps (tests/models/test_rosenbrock_order.cpp) and any controller
// (models/step_size_controller.hpp) can drive it (models/adaptive_dense_stepper.hpp).
#pragma once

#include <Eigen/Core>
#include <cmath>
#include <concepts>
#include <cstddef>

namespace spreadfit {

/// A system for the tridiagonal steppers: f(x) by sys(x, dxdt, t), and f with its Jacobian's three diagonals by
/// sys.tridiagonal_jacobian(x, t, dxdt, lower, diag, upper) (lower[i] = df_i/dx_{i-1}, upper[i] = df_i/dx_{i+1}).
template <class S>
concept TridiagonalSystem = requires(const S& s, const Eigen::VectorXd& x, Eigen::VectorXd& v, double t) {
  s(x, v, t);
  s.tridiagonal_jacobian(x, t, v, v, v, v);
};

/// Factorisation of a tridiagonal matrix without pivoting (Thomas algorithm), stored for repeated solves. Fine for
/// the diagonally dominant W = I/(gamma dt) - J of the steppers; a zero or non-finite pivot reports failure.
class TridiagonalLu {
 public:
  /// lower[0] and upper[n-1] are ignored.
  bool factorize(const Eigen::VectorXd& lower, const Eigen::VectorXd& diag, const Eigen::VectorXd& upper) {
    return factorize_shifted(0.0, 1.0, lower, diag, upper);
  }
  /// The same for the matrix shift I + scale T, T the tridiagonal (lower, diag, upper), without forming it: the
  /// steppers' W = I/(gamma dt) - J is (1/(gamma dt), -1, J) and needs no temporaries in the step loop.
  bool factorize_shifted(double shift, double scale, const Eigen::VectorXd& lower, const Eigen::VectorXd& diag,
                         const Eigen::VectorXd& upper) {
    const Eigen::Index n = diag.size();
    lower_.resize(n);
    inverse_pivot_.resize(n);
    ratio_.resize(n);
    double denom = shift + scale * diag[0];
    for (Eigen::Index i = 0;; ++i) {
      if (!(std::abs(denom) > 1e-300) || !std::isfinite(denom)) return false;
      inverse_pivot_[i] = 1.0 / denom;
      if (i + 1 == n) break;
      ratio_[i] = scale * upper[i] * inverse_pivot_[i];
      lower_[i + 1] = scale * lower[i + 1];
      denom = shift + scale * diag[i + 1] - lower_[i + 1] * ratio_[i];
    }
    return true;
  }
  /// Solves in place. The pivots are stored inverted: the forward sweep is a chain of dependent operations, and a
  /// division in it costs several multiplications' latency (it was most of the step's solve time).
  void solve(Eigen::VectorXd& b) const {
    const Eigen::Index n = b.size();
    b[0] *= inverse_pivot_[0];
    for (Eigen::Index i = 1; i < n; ++i) b[i] = (b[i] - lower_[i] * b[i - 1]) * inverse_pivot_[i];
    for (Eigen::Index i = n - 2; i >= 0; --i) b[i] -= ratio_[i] * b[i + 1];
  }

 private:
  Eigen::VectorXd lower_, inverse_pivot_, ratio_;
};

// RODAS coefficients (Hairer & Wanner 1996, VI.4) as in Boost.Odeint's default_rosenbrock_coefficients.
struct RodasCoefficients {
  double gamma = 0.25;
  double c2 = 0.386, c3 = 0.21, c4 = 0.63;
  double c21 = -0.5668800000000000e+01, a21 = 0.1544000000000000e+01;
  double c31 = -0.2430093356833875e+01, c32 = -0.2063599157091915e+00;
  double a31 = 0.9466785280815826e+00, a32 = 0.2557011698983284e+00;
  double c41 = -0.1073529058151375e+00, c42 = -0.9594562251023355e+01, c43 = -0.2047028614809616e+02;
  double a41 = 0.3314825187068521e+01, a42 = 0.2896124015972201e+01, a43 = 0.9986419139977817e+00;
  double c51 = 0.7496443313967647e+01, c52 = -0.1024680431464352e+02, c53 = -0.3399990352819905e+02,
         c54 = 0.1170890893206160e+02;
  double a51 = 0.1221224509226641e+01, a52 = 0.6019134481288629e+01, a53 = 0.1253708332932087e+02,
         a54 = -0.6878860361058950e+00;
  double c61 = 0.8083246795921522e+01, c62 = -0.7981132988064893e+01, c63 = -0.3152159432874371e+02,
         c64 = 0.1631930543123136e+02, c65 = -0.6058818238834054e+01;
  double d21 = 0.1012623508344586e+02, d22 = -0.7487995877610167e+01, d23 = -0.3480091861555747e+02,
         d24 = -0.7992771707568823e+01, d25 = 0.1025137723295662e+01;
  double d31 = -0.6762803392801253e+00, d32 = 0.6087714651680015e+01, d33 = 0.1643084320892478e+02,
         d34 = 0.2476722511418386e+02, d35 = -0.6594389125716872e+01;
};

class TridiagonalRodas {
 public:
  static constexpr unsigned order = 4;        ///< order of x_new
  static constexpr unsigned error_order = 3;  ///< order of the embedded solution the error estimate compares with

  /// One step of size dt from x (time t): x_new and the error estimate. Returns false when W is singular or a
  /// stage is not finite (a step that is too large for the state, e.g. crossed nodes): the caller shrinks dt.
  /// f and J at x are kept, so a retry from the same x with another dt costs no new Jacobian.
  template <TridiagonalSystem System>
  bool do_step(const System& sys, const Eigen::VectorXd& x, double t, double dt, Eigen::VectorXd& x_new,
               Eigen::VectorXd& error) {
    const Eigen::Index n = x.size();
    if (!(have_point_ && x_point_.size() == n && (x_point_.array() == x.array()).all())) {
      sys.tridiagonal_jacobian(x, t, f0_, jl_, jd_, ju_);
      ++rhs_calls_;
      ++jacobians_;
      x_point_ = x;
      have_point_ = f0_.allFinite() && jl_.allFinite() && jd_.allFinite() && ju_.allFinite();
      if (!have_point_) return false;
    }
    if (!lu_.factorize_shifted(1.0 / (k_.gamma * dt), -1.0, jl_, jd_, ju_)) return false;
    const double inv_dt = 1.0 / dt;

    g1_ = f0_;
    lu_.solve(g1_);
    stage_ = x + k_.a21 * g1_;
    if (!stage(sys, t + k_.c2 * dt, g2_, k_.c21 * inv_dt * g1_)) return false;
    stage_ = x + k_.a31 * g1_ + k_.a32 * g2_;
    if (!stage(sys, t + k_.c3 * dt, g3_, inv_dt * (k_.c31 * g1_ + k_.c32 * g2_))) return false;
    stage_ = x + k_.a41 * g1_ + k_.a42 * g2_ + k_.a43 * g3_;
    if (!stage(sys, t + k_.c4 * dt, g4_, inv_dt * (k_.c41 * g1_ + k_.c42 * g2_ + k_.c43 * g3_))) return false;
    stage_ = x + k_.a51 * g1_ + k_.a52 * g2_ + k_.a53 * g3_ + k_.a54 * g4_;
    if (!stage(sys, t + dt, g5_, inv_dt * (k_.c51 * g1_ + k_.c52 * g2_ + k_.c53 * g3_ + k_.c54 * g4_))) return false;
    stage_ += g5_;
    if (!stage(sys, t + dt, error,
               inv_dt * (k_.c61 * g1_ + k_.c62 * g2_ + k_.c63 * g3_ + k_.c64 * g4_ + k_.c65 * g5_)))
      return false;
    x_new = stage_ + error;
    return x_new.allFinite();
  }

  /// After a successful do_step from x_old to x_new: the state at fraction s in [0, 1] of that step.
  void calc_state(double s, const Eigen::VectorXd& x_old, const Eigen::VectorXd& x_new, Eigen::VectorXd& x) const {
    const double s1 = 1.0 - s;
    x = s1 * x_old +
        s * (x_new + s1 * ((k_.d21 * g1_ + k_.d22 * g2_ + k_.d23 * g3_ + k_.d24 * g4_ + k_.d25 * g5_) +
                           s * (k_.d31 * g1_ + k_.d32 * g2_ + k_.d33 * g3_ + k_.d34 * g4_ + k_.d35 * g5_)));
  }

  std::size_t rhs_calls() const { return rhs_calls_; }
  std::size_t jacobians() const { return jacobians_; }

 private:
  // One stage: g = W^-1 (f(stage_) + correction).
  template <class System, class Correction>
  bool stage(const System& sys, double t, Eigen::VectorXd& g, const Correction& correction) {
    sys(stage_, fs_, t);
    ++rhs_calls_;
    g = fs_ + correction;
    if (!g.allFinite()) return false;
    lu_.solve(g);
    return true;
  }

  static constexpr RodasCoefficients k_{};

  bool have_point_ = false;
  Eigen::VectorXd x_point_;
  std::size_t rhs_calls_ = 0, jacobians_ = 0;
  TridiagonalLu lu_;
  Eigen::VectorXd f0_, jl_, jd_, ju_, fs_, stage_, g1_, g2_, g3_, g4_, g5_;
};

}  // namespace spreadfit
