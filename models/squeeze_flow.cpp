#include "models/squeeze_flow.hpp"

#include <algorithm>
#include <array>
#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/tools/roots.hpp>
#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <cstdint>
#include <exception>
#include <limits>
#include <numbers>
#include <stdexcept>
#include <string>
#include <utility>

#include "models/closed_forms.hpp"
#include "models/input_check.hpp"

// Derivation of the yield-stress form (checked against film_flux and a direct integration in the tests).
//
// Slit flux. The half gap b = h/2 with the mid-plane as a symmetry plane is a film of depth b under the
// stress gradient G, so q_slit = 2 film_flux(m, G, b). Put G = tau_y g / b (= (2 tau_y / h) g). Then the
// yield height is Y = b - tau_y / G = b (1 - 1/g) = b x with x = 1 - 1/g, (G/K)^(1/n) = (tau_y/K)^(1/n) g^(1/n)
// b^(-1/n), and film_flux = n/(n+1) (tau_y/K)^(1/n) b^2 g^(1/n) x^(1+1/n) (1 - n x/(2n+1)); hence
//   q_slit = (tau_y/K)^(1/n) b^2 phi(g),  phi(g) = 2n/(n+1) g^(1/n) x^(1+1/n) (1 - n x/(2n+1)).
// Mass balance: q_slit(r) = r (-dh/dt)/2, i.e. phi(g(r)) = s beta with s = r/R and
//   beta = R (-dh/dt) / (2 (tau_y/K)^(1/n) b^2).
// Load: F = integral_0^R pi r^2 G dr = (2 pi R^3 tau_y / h) integral_0^1 s^2 g ds, i.e. F h / (2 pi R^3 tau_y) = Psi.
// Change of variable s = phi(g)/beta (phi increasing, phi(1) = 0), ds = phi'(g) dg / beta:
//   Psi = beta^-3 integral_1^{g_w} g phi^2 phi' dg = beta^-3 { [g phi^3/3]_1^{g_w} - (1/3) integral_1^{g_w} phi^3 dg }
//       = g_w/3 - (1/(3 phi(g_w)^3)) integral_1^{g_w} phi^3 dg,   with beta = phi(g_w).
//
// Numerically stable form. With e = g_w - 1 and g = 1 + e q (q in [0, 1]):
//   integral_1^{g_w} phi^3 dg / phi(g_w)^3 = e kappa(e),
//   kappa(e) = integral_0^1 q^(3+3/n) (g_w/g)^3 ((1 - b x(g)) / (1 - b x_w))^3 dq,  b = n/(2n+1),
// because phi(g)/phi(g_w) = (g/g_w)^(1/n) (x/x_w)^(1+1/n) (...) and x/x_w = q g_w/g. So
//   Psi = 1/3 + e (1 - kappa)/3,
// with no cancellation near the plastic limit (kappa -> n/(4n+3) as e -> 0) nor for a near-power-law sample
// (kappa -> n/(n+3) as e -> infinity, recovering Scott's law). The integrand behaves like q^(3/n) for large e;
// q = w^3 makes it smooth enough that a 30-point Gauss-Legendre rule is accurate to ~1e-13 relative over
// n in [0.2, 2] and e in [1e-8, 1e12] (measured against an adaptive Gauss-Kronrod reference in long double).
// Differentiating the integral form, dPsi/dg_w = (integral phi^3 dg) phi'(g_w) / phi(g_w)^4 = kappa (e phi'/phi)(g_w) >
// 0.
//
// The gap follows from Psi: F h / (2 pi R^3 tau_y) with R^3 = (V/(pi h))^(3/2) is (h / h_a)^(5/2) / 3, where h_a is
// the plastic-limit gap (closed_form::squeeze_arrest_gap). So h = h_a (3 Psi)^(2/5): the gap is an explicit function
// of e, and the ODE is integrated in y = ln e. The right-hand side then needs one quadrature and no root finding;
// the gap never falls below h_a (e > 0, kappa < 1), and y decreases like -n ln t as the sample stops.

namespace spreadfit {

namespace {

using std::numbers::pi;

void validate_rig(const SqueezeRig& rig) {
  if (!std::isfinite(rig.volume) || rig.volume <= 0) reject_input("volume", rig.volume, "a finite value > 0 m^3");
  if (!std::isfinite(rig.force) || rig.force <= 0) reject_input("force", rig.force, "a finite value > 0 N");
  if (!std::isfinite(rig.initial_gap) || rig.initial_gap < 0)
    reject_input("initial_gap", rig.initial_gap, "a finite value >= 0 m (0 selects (4V/pi)^(1/3))");
}

void validate_options(const SqueezeOptions& o) {
  if (!std::isfinite(o.rel_tol) || o.rel_tol <= 0 || o.rel_tol >= 1) reject_input("rel_tol", o.rel_tol, "a value in (0, 1)");
  if (o.max_steps < 1) reject_input("max_steps", static_cast<double>(o.max_steps), "at least 1");
  if (!std::isfinite(o.arrest_tolerance) || o.arrest_tolerance <= 0 || o.arrest_tolerance >= 1)
    reject_input("arrest_tolerance", o.arrest_tolerance, "a value in (0, 1)");
}

void validate_times(const std::vector<double>& times) {
  for (std::size_t i = 0; i < times.size(); ++i) {
    const std::string field = "times[" + std::to_string(i) + "]";
    if (!std::isfinite(times[i]) || times[i] < 0) reject_input(field, times[i], "a finite value >= 0 s");
    if (i > 0 && times[i] < times[i - 1]) reject_input(field, times[i], "times in non-decreasing order");
  }
}

// --- tau_y = 0: Scott (1931), F = [2 pi K R^(n+3)/(n+3)] ((2n+1)/n)^n (-dh/dt)^n / h^(2n+1); n = 1 is Stefan's
// law F = 3 pi mu R^4 (-dh/dt) / (2 h^3). Solved for -dh/dt.
double power_law_rate(double volume, double force, const Material& m, double h) {
  const double n = m.flow_index;
  const double R = squeeze_disc_radius(volume, h);
  const double drive = force * (n + 3) * std::pow(h, 2 * n + 1) / (2 * pi * m.consistency * std::pow(R, n + 3));
  return n / (2 * n + 1) * std::pow(drive, 1 / n);
}

// --- tau_y > 0: the scaled form derived at the top of this file. ---------------------------------------------
class YieldSqueeze {
 public:
  YieldSqueeze(const SqueezeRig& rig, const Material& m)
      : volume_(rig.volume),
        n_(m.flow_index),
        b_(n_ / (2 * n_ + 1)),
        stress_ratio_(m.yield_stress / m.consistency),
        arrest_gap_(closed_form::squeeze_arrest_gap(m.yield_stress, rig.force, rig.volume)) {
    // 30-point Gauss-Legendre rule on w in [0, 1] (boost stores the positive half of the rule on [-1, 1]),
    // with q = w^3, dq = 3 w^2 dw, and the weight carrying q^(3+3/n) dq/dw.
    using Rule = boost::math::quadrature::gauss<double, rule_size>;
    const double power = 3 + 3 / n_;
    for (std::size_t i = 0; i < rule_size / 2; ++i) {
      for (int side : {-1, 1}) {
        const double w = 0.5 * (1 + side * Rule::abscissa()[i]);
        const double q = w * w * w;
        const std::size_t k = 2 * i + (side > 0 ? 1 : 0);
        node_[k] = q;
        weight_[k] = 0.5 * Rule::weights()[i] * 3 * w * w * std::pow(q, power);
      }
    }
  }

  double arrest_gap() const { return arrest_gap_; }

  /// kappa(e) = integral_0^1 q^(3+3/n) (g_w/g)^3 ((1 - b x)/(1 - b x_w))^3 dq on the fixed rule built in the
  /// constructor: the factor q^(3+3/n) dq/dw depends on n only, so no power is taken per evaluation.
  double kappa(double e) const {
    const double g_w = 1 + e;
    // (g_w/g) (1 - b x)/(1 - b x_w) = [g_w / (1 - b x_w)] (g - b e q) / g^2, with x = e q / g: one division a node.
    const double scale = g_w / (1 - b_ * e / g_w);
    double sum = 0;
    for (std::size_t i = 0; i < rule_size; ++i) {
      const double eq = e * node_[i];
      const double g = 1 + eq;
      const double ratio = (g - b_ * eq) / (g * g);
      sum += weight_[i] * ratio * ratio * ratio;
    }
    return sum * scale * scale * scale;
  }

  /// e phi'(g_w) / phi(g_w), from ln phi = (1/n) ln g + (1+1/n) ln x + ln(1 - b x), dx/dg = 1/g^2, x = e/g_w.
  double log_slope(double e) const {
    const double g_w = 1 + e;
    const double x_w = e / g_w;
    return e / (n_ * g_w) + (1 + 1 / n_) / g_w - b_ * e / (g_w * g_w * (1 - b_ * x_w));
  }

  /// Gap [m] at rim excess e = g_w - 1: h = h_a (3 Psi)^(2/5) = h_a (1 + e (1 - kappa))^(2/5).
  double gap(double e) const { return gap(e, kappa(e)); }
  double gap(double e, double k) const { return arrest_gap_ * std::pow(1 + e * (1 - k), 0.4); }

  /// -dh/dt [m/s] at rim excess e and gap h: (tau_y/K)^(1/n) h^2 phi(g_w) / (2 R), with
  /// (tau_y/K)^(1/n) g_w^(1/n) grouped as (tau_y g_w / K)^(1/n) so neither factor overflows for a tiny yield stress.
  double rate(double e, double h) const {
    const double g_w = 1 + e;
    const double x_w = e / g_w;
    const double phi_scaled =
        2 * n_ / (n_ + 1) * std::pow(stress_ratio_ * g_w, 1 / n_) * std::pow(x_w, 1 + 1 / n_) * (1 - b_ * x_w);
    return h * h * phi_scaled / (2 * squeeze_disc_radius(volume_, h));
  }

  /// d(ln e)/dt, the ODE right-hand side: de/dt = (dh/dt) / (dh/de), dh/de = (2/5) h Psi'/Psi.
  double log_excess_rate(double e) const {
    const double k = kappa(e);
    const double h = gap(e, k);
    const double psi = (1 + e * (1 - k)) / 3;
    const double dpsi_de = k * log_slope(e);
    const double dh_de = 0.4 * h * dpsi_de / psi;
    return -rate(e, h) / (e * dh_de);
  }

  /// Rim excess e at gap h > h_a: solves 3 (Psi - 1/3) = e (1 - kappa(e)) = P, P = (h/h_a)^(5/2) - 1.
  /// Bracket from Psi <= g_w/3 (kappa >= 0) and Psi >= g_w/(n+3) (phi(g)/g^(1/n) increases with g, so
  /// integral phi^3 dg <= g_w phi(g_w)^3 n/(n+3)): e in [P, P + n Psi].
  double excess_at_gap(double h) const {
    const double P = std::expm1(2.5 * std::log(h / arrest_gap_));
    const double lo = P;
    const double hi = P + n_ * (1 + P) / 3;
    auto f = [&](double e) {
      const double k = kappa(e);
      return std::make_pair(e * (1 - k) - P, 3 * k * log_slope(e));
    };
    std::uintmax_t iterations = 60;
    // kappa varies slowly with e (from n/(4n+3) at 0 to n/(n+3) at infinity), so P / (1 - kappa(P)) is close.
    const double guess = P / (1 - kappa(P));
    return boost::math::tools::newton_raphson_iterate(f, std::clamp(guess, lo, hi), lo, hi,
                                                      std::numeric_limits<double>::digits - 6, iterations);
  }

 private:
  double volume_;
  double n_;
  double b_;             // n/(2n+1)
  double stress_ratio_;  // tau_y / K
  double arrest_gap_;
  static constexpr std::size_t rule_size = 30;  // even: boost's table has no node at the centre
  std::array<double, rule_size> node_{};
  std::array<double, rule_size> weight_{};
};

/// Integrates dy/dtau = f(y) t_c e^tau in the stretched time tau = ln(1 + t/t_c). Where f(y) = f0 e^(a (y - y0))
/// (a local power law in the gap or gap excess), y = y0 - ln(1 + a |f0| t) / a exactly, so t_c = 1/(a |f0|), with a
/// measured at y0, makes y linear in tau: exact for Stefan and Scott (a = (3n+5)/(2n)), and the approach to arrest
/// (e ~ t^-n, a -> 1/n) is again linear in tau. The stepper then takes steps of nearly constant size in tau instead
/// of ever-growing ones in t.
/// How integrate_log_state ended: Ok with an empty message, else the status and what failed (naming the bound).
struct Ended {
  SolveStatus status = SolveStatus::Ok;
  std::string message;
};

/// Writes y at each time through out(i, y).
template <class Rhs, class Out>
Ended integrate_log_state(const Rhs& f, double y0, const std::vector<double>& times, const SqueezeOptions& o,
                                std::size_t& steps, Out out) {
  namespace odeint = boost::numeric::odeint;
  const double f0 = f(y0);
  if (!std::isfinite(f0)) return {SolveStatus::NonFiniteState, "the initial rate is not finite"};
  if (f0 == 0) {  // nothing moves (cannot happen above the arrest gap, kept for safety)
    for (std::size_t i = 0; i < times.size(); ++i) out(i, y0);
    return {};
  }
  // Local exponent a = d ln|f| / dy by a central difference (the step only sets the time scale, not the accuracy).
  const double dy = 1e-4;
  const double a = std::log(f(y0 + dy) / f(y0 - dy)) / (2 * dy);
  const double t_c = 1 / (std::abs(f0) * (std::isfinite(a) && a > 0.05 ? a : 1.0));
  auto system = [&](const double& y, double& dydtau, double tau) { dydtau = f(y) * t_c * std::exp(tau); };
  // The error is controlled absolutely on y = ln(gap or gap excess), i.e. relatively on the gap.
  auto stepper = odeint::make_dense_output(o.rel_tol, 0.0, odeint::runge_kutta_dopri5<double>());
  stepper.initialize(y0, 0.0, 1e-2);
  try {
    for (std::size_t i = 0; i < times.size(); ++i) {
      if (times[i] == 0) {
        out(i, y0);
        continue;
      }
      const double tau = std::log1p(times[i] / t_c);
      while (stepper.current_time() < tau) {
        if (steps >= o.max_steps)
          return {SolveStatus::StepLimit, "SqueezeOptions::max_steps = " + std::to_string(o.max_steps) +
                                              " time steps per solve reached before t = " + shortest_text(times[i]) + " s"};
        stepper.do_step(system);
        ++steps;
        if (!std::isfinite(stepper.current_state()))
          return {SolveStatus::NonFiniteState, "the state became non-finite at t = " +
                                                   shortest_text(t_c * std::expm1(stepper.current_time())) + " s"};
      }
      double y = 0;
      stepper.calc_state(tau, y);
      out(i, y);
    }
  } catch (const odeint::step_adjustment_error& ex) {  // odeint's bound on rejected steps in a row
    return {SolveStatus::StepSizeUnderflow, std::string("no acceptable time step: ") + ex.what()};
  }
  return {};
}

/// True when the yield stress is so small against the load that the scaled form would overflow: at
/// (h/h_a)^(5/2) > 1e200 the rim gradient g_w exceeds 1e200 and the yield stress changes the rate by O(1/g_w).
/// The power-law (Scott) branch is then exact to rounding. Also true for h_a = 0 (a yield stress that underflows).
bool yield_stress_negligible(double h, double arrest_gap) { return !(std::pow(h / arrest_gap, 2.5) < 1e200); }

}  // namespace

double squeeze_disc_radius(double volume, double gap) { return std::sqrt(volume / (pi * gap)); }

double squeeze_initial_gap(const SqueezeRig& rig) {
  return rig.initial_gap > 0 ? rig.initial_gap : std::cbrt(4 * rig.volume / pi);
}

double squeeze_rate(const SqueezeRig& rig, const Material& m, double gap) {
  validate_rig(rig);
  validate(m);
  if (!std::isfinite(gap) || gap <= 0) reject_input("gap", gap, "a finite value > 0 m");
  if (m.yield_stress == 0) return power_law_rate(rig.volume, rig.force, m, gap);
  const YieldSqueeze model(rig, m);
  if (gap <= model.arrest_gap()) return 0.0;
  if (yield_stress_negligible(gap, model.arrest_gap())) return power_law_rate(rig.volume, rig.force, m, gap);
  const double e = model.excess_at_gap(gap);
  return model.rate(e, gap);
}

SqueezeSolution solve_squeeze(const SqueezeRig& rig, const Material& m, const std::vector<double>& times,
                              const SqueezeOptions& options) {
  validate_rig(rig);
  validate(m);
  validate_options(options);
  validate_times(times);
  SqueezeSolution sol;
  const double h0 = squeeze_initial_gap(rig);
  sol.gaps.assign(times.size(), h0);
  Ended ended;

  if (m.yield_stress > 0) sol.arrest_gap = closed_form::squeeze_arrest_gap(m.yield_stress, rig.force, rig.volume);
  if (m.yield_stress == 0 || (h0 > sol.arrest_gap && yield_stress_negligible(h0, sol.arrest_gap))) {
    // State y = ln h: dy/dt = -rate(h)/h.
    auto f = [&](double y) {
      const double h = std::exp(y);
      return -power_law_rate(rig.volume, rig.force, m, h) / h;
    };
    auto out = [&](std::size_t i, double y) { sol.gaps[i] = std::exp(y); };
    ended = integrate_log_state(f, std::log(h0), times, options, sol.steps, out);
  } else {
    const YieldSqueeze model(rig, m);
    if (h0 <= sol.arrest_gap) {
      sol.arrested = true;
      sol.message = "initial gap at or below the arrest gap: the yield stress carries the load, no motion";
      return sol;
    }
    // State y = ln e (e = g_w - 1, see the derivation at the top).
    auto f = [&](double y) { return model.log_excess_rate(std::exp(y)); };
    auto out = [&](std::size_t i, double y) { sol.gaps[i] = model.gap(std::exp(y)); };
    ended = integrate_log_state(f, std::log(model.excess_at_gap(h0)), times, options, sol.steps, out);
    if (ended.status == SolveStatus::Ok && !times.empty())
      sol.arrested = sol.gaps.back() - sol.arrest_gap <= options.arrest_tolerance * sol.arrest_gap;
  }
  // The load is applied at h0 exactly (the log state round-trips it only to rounding).
  for (std::size_t i = 0; i < times.size() && times[i] == 0; ++i) sol.gaps[i] = h0;
  if (ended.status != SolveStatus::Ok) {
    sol.status = ended.status;
    sol.message = ended.message;
    sol.gaps.clear();
  }
  return sol;
}

namespace squeeze_detail {

double slit_flux(double n, double g) {
  if (!(g > 1)) return 0.0;
  const double x = 1 - 1 / g;
  return 2 * n / (n + 1) * std::pow(g, 1 / n) * std::pow(x, 1 + 1 / n) * (1 - n * x / (2 * n + 1));
}

double load_function(double n, double g_w) {
  if (!(g_w > 1)) return 1.0 / 3.0;
  // Unit rig and material: only n enters kappa.
  const YieldSqueeze model(SqueezeRig{1.0, 1.0, 0.0}, Material{1.0, 1.0, n});
  const double e = g_w - 1;
  return (1 + e * (1 - model.kappa(e))) / 3;
}

}  // namespace squeeze_detail

}  // namespace spreadfit
