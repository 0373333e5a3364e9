#include "src/fit/profile_likelihood.hpp"

#include <algorithm>
#include <cmath>
#include <utility>
#include <vector>

namespace spreadfit::fit {

ProfileLikelihood::ProfileLikelihood(ResidualFunction f, Eigen::VectorXd lower, Eigen::VectorXd upper,
                                     Eigen::VectorXd fd_step, Eigen::VectorXd best_x, double best_cost, double s2,
                                     double q, Eigen::MatrixXd covariance, ProfileOptions options,
                                     Eigen::MatrixXd jacobian)
    : ProfileLikelihood(
          ResidualColumnsFunction([f = std::move(f)](const Eigen::VectorXd& x, Eigen::VectorXd& r,
                                                     Eigen::MatrixXd* columns) {
            if (columns) columns->resize(0, 0);
            return f(x, r);
          }),
          std::move(lower), std::move(upper), std::move(fd_step), std::move(best_x), best_cost, s2, q,
          std::move(covariance), options, std::move(jacobian)) {}

ProfileLikelihood::ProfileLikelihood(ResidualColumnsFunction f, Eigen::VectorXd lower, Eigen::VectorXd upper,
                                     Eigen::VectorXd fd_step, Eigen::VectorXd best_x, double best_cost, double s2,
                                     double q, Eigen::MatrixXd covariance, ProfileOptions options,
                                     Eigen::MatrixXd jacobian)
    : f_(std::move(f)),
      lower_(std::move(lower)),
      upper_(std::move(upper)),
      step_(std::move(fd_step)),
      best_(std::move(best_x)),
      best_cost_(best_cost),
      s2_(s2),
      q_(q),
      cov_(std::move(covariance)),
      jacobian_(std::move(jacobian)),
      options_(options),
      better_cost_(best_cost) {}

double ProfileLikelihood::better_cost() const {
  const std::lock_guard<std::mutex> hold(better_lock_);
  return better_cost_;
}

std::optional<Eigen::VectorXd> ProfileLikelihood::better_point() const {
  const std::lock_guard<std::mutex> hold(better_lock_);
  return better_;
}

ProfileLikelihood::Refit ProfileLikelihood::refit(int j, double value, const Eigen::VectorXd& warm,
                                                  const Eigen::MatrixXd& warm_jacobian, bool confirmed) const {
  const Eigen::Index p = best_.size();
  Eigen::VectorXd lo(p - 1), hi(p - 1), h(p - 1);
  for (Eigen::Index i = 0, k = 0; i < p; ++i) {
    if (i == j) continue;
    lo[k] = lower_[i];
    hi[k] = upper_[i];
    h[k] = step_[i];
    ++k;
  }
  auto full = [&](const Eigen::VectorXd& rest) {
    Eigen::VectorXd theta(p);
    for (Eigen::Index i = 0, k = 0; i < p; ++i) theta[i] = i == j ? value : rest[k++];
    return theta;
  };
  // The held parameter's column drops out of the known ones.
  const ResidualColumnsFunction g = [&](const Eigen::VectorXd& rest, Eigen::VectorXd& r, Eigen::MatrixXd* columns) {
    if (!columns) return f_(full(rest), r, nullptr);
    Eigen::MatrixXd all;
    if (!f_(full(rest), r, &all)) return false;
    if (all.cols() != p) {
      columns->resize(0, 0);
      return true;
    }
    columns->resize(all.rows(), p - 1);
    for (Eigen::Index i = 0, k = 0; i < p; ++i)
      if (i != j) columns->col(k++) = all.col(i);
    return true;
  };
  LmOptions o;
  o.max_iterations = options_.refit_iterations;
  o.initial_damping = 1e-6;
  o.decrease_tolerance = options_.refit_decrease_tolerance;
  o.fd_step = h;
  o.final_jacobian = false;  // a refit gives a conditional optimum and its cost, never a covariance
  o.initial_jacobian = warm_jacobian;
  // Converged on an updated Jacobian's predicted decrease without confirming by finite differences: the refit's
  // cost then errs by about decrease_tolerance (0.01) of the residual variance, which moves tau near the cut-off by
  // about 0.3%, well inside the tolerance of the limit (4%); the confirmation cost a third of the profiles' solves.
  o.confirm_on_update = confirmed;
  const LmResult sub = p > 1 ? levenberg_marquardt(g, warm.cwiseMax(lo).cwiseMin(hi), lo, hi, o) : [&] {
    LmResult only;
    only.x = Eigen::VectorXd(0);
    only.model_failed = !f_(full(only.x), only.r, nullptr);
    only.cost = 0.5 * only.r.squaredNorm();
    return only;
  }();
  Refit out;
  // A refit the model failed in is no conditional optimum: no information, and no warm start for the next one.
  if (sub.model_failed || sub.r.size() == 0 || !std::isfinite(sub.cost)) return out;
  out.ok = true;
  out.rest = sub.x;
  out.jacobian = sub.jacobian;
  out.tau = std::sqrt(2.0 * std::max(sub.cost - best_cost_, 0.0) / s2_);
  // Clearly below the optimum (by more than 1% of one unit of the cut-off scale): the optimum was not one.
  if (sub.cost < best_cost_ - 0.01 * s2_) {
    const std::lock_guard<std::mutex> hold(better_lock_);
    if (sub.cost < better_cost_) {
      better_cost_ = sub.cost;
      better_ = full(sub.x);
    }
  }
  return out;
}

ProfileSide ProfileLikelihood::side(int j, int dir) const {
  const Eigen::Index p = best_.size();
  const double x = best_[j];
  const double room = dir > 0 ? upper_[j] - x : x - lower_[j];
  ProfileSide out;
  out.limit = dir > 0 ? upper_[j] : lower_[j];
  out.end = ProfileEnd::Bound;
  if (room <= 1e-9) return out;

  // The quadratic approximation gives the first step and the direction in which the other parameters move
  // (their regression on parameter j: cov(rest, j) / var(j)); where it is undetermined, a fixed first step.
  Eigen::VectorXd rest0(p - 1), slope = Eigen::VectorXd::Zero(p - 1), lo(p - 1), hi(p - 1);
  const double var = cov_.size() ? cov_(j, j) : std::numeric_limits<double>::infinity();
  for (Eigen::Index i = 0, k = 0; i < p; ++i) {
    if (i == j) continue;
    rest0[k] = best_[i];
    lo[k] = lower_[i];
    hi[k] = upper_[i];
    if (std::isfinite(var) && var > 0 && std::isfinite(cov_(i, j))) slope[k] = cov_(i, j) / var;
    ++k;
  }
  // The Jacobian each refit starts from: the optimum's without column j, then the last refit's.
  Eigen::MatrixXd jacobian;
  if (jacobian_.cols() == p && p > 1) {
    jacobian.resize(jacobian_.rows(), p - 1);
    for (Eigen::Index i = 0, k = 0; i < p; ++i)
      if (i != j) jacobian.col(k++) = jacobian_.col(i);
  }
  const double goal = q_, tol = options_.tolerance;
  auto refit_at = [&](double value, const Eigen::VectorXd& warm) {
    Refit r = refit(j, value, warm, jacobian);
    // A point at or past the cut-off sets a limit (a bracket's outer end), and a refit that stopped short of its
    // conditional optimum errs high there, putting the limit short of the region: on a squeeze whose profile of
    // the consistency rises slowly before a wall, one bound fell at 3.9 Pa.s^n where the region reaches 7.9. Such
    // a refit goes on from where it stopped until its convergence is confirmed by differences.
    if (r.ok && r.tau >= goal * (1.0 - tol)) {
      Refit again = refit(j, value, r.rest, r.jacobian, true);
      if (again.ok && again.tau < r.tau) r = std::move(again);
    }
    if (r.ok && r.jacobian.size() > 0) jacobian = r.jacobian;
    return r;
  };
  const double wald = std::isfinite(var) && var > 0 ? q_ * std::sqrt(var) : options_.max_first_step;
  const double first = std::min({options_.first_step * wald, options_.max_first_step, room});

  struct Point {
    double t, tau;
    Eigen::VectorXd rest;
  };
  Point prev{0.0, 0.0, rest0};
  std::optional<Point> before;  // the point before prev, for extrapolating the trace
  double t = std::max(first, 1e-6 * std::max(1.0, std::abs(x)));
  int failures = 0;
  auto warm_at = [&](double at) -> Eigen::VectorXd {
    Eigen::VectorXd w = before ? Eigen::VectorXd(prev.rest + (prev.rest - before->rest) * (at - prev.t) /
                                                                 (prev.t - before->t))
                               : Eigen::VectorXd(rest0 + slope * (dir * at));
    return w.cwiseMax(lo).cwiseMin(hi);
  };
  auto full_at = [&](double at, const Eigen::VectorXd& rest) {
    Eigen::VectorXd theta(p);
    for (Eigen::Index i = 0, k = 0; i < p; ++i) theta[i] = i == j ? x + dir * at : rest[k++];
    return theta;
  };
  auto keep_trace = [&](double at, const Refit& r) {
    if (!r.ok || r.tau > 1.5 * goal) return;
    out.trace.push_back(full_at(at, r.rest));
    out.trace_tau.push_back(r.tau);
  };
  // A crossed limit at `at`, the bracket's ends (t, tau, rest) on either side of it.
  auto crossed_at = [&](double at, const Eigen::VectorXd& rest, double ta, double tau_a, const Eigen::VectorXd& rest_a,
                        double tb, double tau_b, const Eigen::VectorXd& rest_b) {
    out.limit = x + dir * at;
    out.end = ProfileEnd::Crossed;
    out.at_limit = full_at(at, rest);
    out.limit_jacobian = jacobian;
    out.limit_slope = (tau_b - tau_a) / (tb - ta);
    out.limit_direction = (full_at(tb, rest_b) - full_at(ta, rest_a)) / (tb - ta);
  };
  // Where tau leapt far past the cut-off (a wall: the conditional optimum runs into a corner of the box, or the
  // flow can no longer reach the readings), the smallest such distance; the walk then never steps more than
  // halfway to it, from the last point below the cut-off, and starts its refits there (on the ridge).
  double wall = std::numeric_limits<double>::infinity();
  Eigen::VectorXd wall_rest;  // the refit there
  const double width_tol = options_.step_tolerance * std::max(1.0, std::abs(x));
  bool wall_rechecked = false;
  int budget = options_.max_refits;  // refits for this side: each halving at a wall adds one, six at most
  while (out.refits < budget) {
    const bool near_wall = std::isfinite(wall);
    Refit r = refit_at(x + dir * t, near_wall ? prev.rest : warm_at(t));
    ++out.refits;
    if (!r.ok && before && !near_wall) {
      // The extrapolated warm start may land where the model cannot be solved (a stiff, nearly arrested corner):
      // start again from the last point of the trace before counting a failure.
      r = refit_at(x + dir * t, prev.rest);
      ++out.refits;
    } else if (r.ok && r.tau > 1.5 * goal && !near_wall) {
      // A wall: tau leapt far past the cut-off in one step. The refit may have left the ridge for another branch
      // of the conditional optimum (the extrapolated start overshot a bend); the start from the last point of the
      // trace follows the ridge itself. The lower of the two is the conditional optimum.
      const Eigen::MatrixXd kept = jacobian;
      Refit again = refit_at(x + dir * t, prev.rest);
      ++out.refits;
      if (again.ok && again.tau < r.tau) r = std::move(again);
      else jacobian = kept;
    }
    if (r.ok && r.tau > 1.5 * goal && t - prev.t > width_tol) {
      // Past a wall: the crossing lies between the last point below and here, and a bracket with a wall at one end
      // is refined from the near side in tiny steps (regula falsi; a squeeze's consistency bound stopped at 6.2 of
      // a region reaching 7.9 when the refits ran out). Halve the step instead, from the ridge.
      if (t < wall) {
        wall_rechecked = false;
        wall_rest = r.rest;
      }
      wall = std::min(wall, t);
      t = prev.t + 0.5 * (t - prev.t);
      budget = std::min(budget + 1, options_.max_refits + 6);
      continue;
    }
    if (r.ok && t >= wall) wall = std::numeric_limits<double>::infinity();  // it was no wall
    keep_trace(t, r);
    if (!r.ok) {
      // Step back towards the last good point; three failures in a row end the side (reported open).
      if (++failures >= 3) {
        out.end = ProfileEnd::Failed;
        return out;
      }
      t = prev.t + 0.5 * (t - prev.t);
      continue;
    }
    failures = 0;
    if (r.tau >= goal * (1.0 - tol)) {
      if (r.tau <= goal * (1.0 + tol)) {
        crossed_at(t, r.rest, prev.t, prev.tau, prev.rest, t, r.tau, r.rest);
        return out;
      }
      // Bracketed between prev (below) and this point (above): regula falsi on tau with the Illinois
      // modification (Dowell & Jarratt 1971), which keeps a steep side (the profile of a yield stress rises like a
      // wall where the sample could no longer reach its final spread) from stalling the search; refits are
      // warm-started by interpolating the trace. Ends when tau is within the tolerance or the bracket is
      // narrower than step_tolerance.
      Point a = prev, b{t, r.tau, r.rest};
      double fa = a.tau - goal, fb = b.tau - goal;
      int last = 0;  // which end was replaced last: -1 a, +1 b
      double ts = a.t - fa * (b.t - a.t) / (fb - fa);
      auto between = [&](double at) {
        const double w = (at - a.t) / (b.t - a.t);
        return Eigen::VectorXd(((1.0 - w) * a.rest + w * b.rest).cwiseMax(lo).cwiseMin(hi));
      };
      while (out.refits < budget && b.t - a.t > width_tol) {
        const Refit m = refit_at(x + dir * ts, between(ts));
        ++out.refits;
        keep_trace(ts, m);
        if (!m.ok) break;
        if (std::abs(m.tau / goal - 1.0) <= tol) {
          crossed_at(ts, m.rest, a.t, a.tau, a.rest, b.t, b.tau, b.rest);
          return out;
        }
        if (m.tau < goal) {
          a = Point{ts, m.tau, m.rest};
          fa = m.tau - goal;
          if (last == -1) fb *= 0.5;
          last = -1;
        } else {
          b = Point{ts, m.tau, m.rest};
          fb = m.tau - goal;
          if (last == +1) fa *= 0.5;
          last = +1;
        }
        ts = a.t - fa * (b.t - a.t) / (fb - fa);
      }
      crossed_at(ts, between(ts), a.t, a.tau, a.rest, b.t, b.tau, b.rest);
      return out;
    }
    if (t >= room * (1.0 - 1e-12)) return out;  // the box's edge within the cut-off: open
    // Next step: the secant of tau aimed a little past the cut-off, so the crossing is usually bracketed in one;
    // the step at most doubles (continuation: the warm start stays good) and at least grows by half.
    const double dt = t - prev.t;
    const double rate = (r.tau - prev.tau) / dt;
    double next = rate > 0 ? t + 1.15 * (goal - r.tau) / rate : t + 2.0 * dt;
    next = std::clamp(next, t + 0.5 * dt, t + 2.0 * dt);
    if (next >= wall) {
      // The secant would pass the wall: look at the wall once more, from the ridge nearer to it now (a refit from
      // far away may have landed on another branch: a false wall), then halve towards it.
      next = wall_rechecked ? t + 0.5 * (wall - t) : wall;
      wall_rechecked = true;
    }
    before = prev;
    prev = Point{t, r.tau, r.rest};
    t = std::min(next, room);
  }
  // Out of refits below the cut-off. With a wall found beyond the last point reached, the crossing lies between
  // them: the wall is reported, wide by at most that gap, and not moved by the fine model's re-evaluation (its
  // secant would start from a point far past the cut-off). A squeeze's yield stress was reported undetermined,
  // and its fit not identifiable, when a walk ran out of refits 0.07 short of a wall it had bracketed. Without a
  // wall the limit lies beyond the last point reached, so the side is reported open (errs wide, never narrow).
  if (std::isfinite(wall) && prev.tau < goal) {
    out.limit = x + dir * wall;
    out.end = ProfileEnd::Crossed;
    out.at_limit = full_at(wall, wall_rest);
    return out;
  }
  out.end = ProfileEnd::Failed;
  return out;
}

}  // namespace spreadfit::fit
