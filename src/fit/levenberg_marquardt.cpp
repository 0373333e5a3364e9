#include "src/fit/levenberg_marquardt.hpp"

#include <Eigen/Cholesky>
#include <Eigen/QR>
#include <algorithm>
#include <cmath>
#include <vector>

#include "src/parallel_for.hpp"

namespace spreadfit::fit {

const char* lm_status_name(LmStatus status) {
  switch (status) {
    case LmStatus::NotRun:
      return "not_run";
    case LmStatus::CostTolerance:
      return "cost_tolerance";
    case LmStatus::StepTolerance:
      return "step_tolerance";
    case LmStatus::DecreaseTolerance:
      return "decrease_tolerance";
    case LmStatus::Stall:
      return "stall";
    case LmStatus::NoDecrease:
      return "no_decrease";
    case LmStatus::MaxIterations:
      return "max_iterations";
    case LmStatus::ModelFailedAtStart:
      return "model_failed_at_start";
    case LmStatus::ModelFailedDifferentiating:
      return "model_failed_differentiating";
  }
  return "unknown";
}

bool finite_difference_jacobian(const ResidualFunction& f, const Eigen::VectorXd& x, const Eigen::VectorXd& r,
                                const Eigen::VectorXd& upper, const Eigen::VectorXd& step, Eigen::MatrixXd& J) {
  return finite_difference_jacobian(f, x, r, upper, step, Eigen::MatrixXd(), J);
}

bool finite_difference_jacobian(const ResidualFunction& f, const Eigen::VectorXd& x, const Eigen::VectorXd& r,
                                const Eigen::VectorXd& upper, const Eigen::VectorXd& step, const Eigen::MatrixXd& known,
                                Eigen::MatrixXd& J) {
  J.resize(r.size(), x.size());
  const bool some_known = known.rows() == r.size() && known.cols() == x.size();
  std::vector<Eigen::Index> differenced;
  for (Eigen::Index j = 0; j < x.size(); ++j)
    if (some_known && known.col(j).allFinite())
      J.col(j) = known.col(j);
    else
      differenced.push_back(j);
  std::vector<char> ok(differenced.size(), 0);
  parallel_for(differenced.size(), [&](std::size_t column) {
    const Eigen::Index j = differenced[column];
    double h = step[j];
    if (x[j] + h > upper[j]) h = -h;
    Eigen::VectorXd xp = x, rp;
    xp[j] = x[j] + h;
    if (!f(xp, rp) || rp.size() != r.size()) {
      // The model may fail on one side only (a stiff, nearly arrested flow at the edge of what it can solve):
      // the difference on the other side, then a smaller step, before giving up.
      bool solved = false;
      for (double g : {-h, 0.25 * h, -0.25 * h}) {
        xp[j] = x[j] + g;
        if (f(xp, rp) && rp.size() == r.size()) {
          h = g;
          solved = true;
          break;
        }
      }
      if (!solved) return;
    }
    J.col(j) = (rp - r) / h;
    ok[column] = 1;
  });
  return std::all_of(ok.begin(), ok.end(), [](char c) { return c != 0; });
}

namespace {

// The result's end: status, message and the flags they imply.
LmResult& end_search(LmResult& out, LmStatus status, const char* message) {
  out.status = status;
  out.message = message;
  out.converged = status == LmStatus::CostTolerance || status == LmStatus::StepTolerance ||
                  status == LmStatus::DecreaseTolerance || status == LmStatus::Stall || status == LmStatus::NoDecrease;
  out.model_failed = status == LmStatus::ModelFailedAtStart || status == LmStatus::ModelFailedDifferentiating;
  return out;
}

LmResult& failed_differentiating(LmResult& out) {
  return end_search(out, LmStatus::ModelFailedDifferentiating, "the model failed while differentiating");
}

// Active set: a parameter on a bound that the gradient pushes further out is held there (its row and column of
// J^T J decoupled, its gradient zeroed), so the step and the convergence test concern the free parameters only.
void hold_parameters_on_bounds(const Eigen::VectorXd& x, const Eigen::VectorXd& lower, const Eigen::VectorXd& upper,
                               Eigen::MatrixXd& JtJ, Eigen::VectorXd& g) {
  for (Eigen::Index j = 0; j < g.size(); ++j) {
    const double span = upper[j] - lower[j];
    const bool at_lower = x[j] <= lower[j] + 1e-9 * span && g[j] > 0;
    const bool at_upper = x[j] >= upper[j] - 1e-9 * span && g[j] < 0;
    if (at_lower || at_upper) {
      const double d = std::max(JtJ(j, j), 1e-300);
      JtJ.row(j).setZero();
      JtJ.col(j).setZero();
      JtJ(j, j) = d;
      g[j] = 0.0;
    }
  }
}

// Statistical convergence: the undamped Gauss-Newton step would lower the cost by 0.5 g^T (J^T J)^-1 g; once that
// is a negligible fraction of the residual variance s^2 = |r|^2 / (m - p), further steps move the parameters by a
// negligible fraction of their standard errors (the objective's numerical noise would otherwise keep the
// iteration busy for nothing).
bool gauss_newton_decrease_negligible(const Eigen::MatrixXd& JtJ, const Eigen::VectorXd& g, const Eigen::VectorXd& r,
                                      double tolerance) {
  const Eigen::Index m = r.size(), p = g.size();
  const double s2 = r.squaredNorm() / double(std::max<Eigen::Index>(1, m - p));
  const Eigen::VectorXd gn = JtJ.completeOrthogonalDecomposition().solve(g);
  const double predicted = 0.5 * g.dot(gn);
  return std::isfinite(predicted) && predicted <= tolerance * s2;
}

// The damped step -(J^T J + lambda D)^-1 g, D Marquardt's scaling: each parameter damped by its own curvature
// (floored so a flat direction is damped too).
Eigen::VectorXd damped_step(const Eigen::MatrixXd& JtJ, const Eigen::VectorXd& g, double lambda) {
  Eigen::MatrixXd A = JtJ;
  const double floor = 1e-12 * std::max(JtJ.diagonal().maxCoeff(), 1e-300);
  for (Eigen::Index j = 0; j < A.rows(); ++j) A(j, j) += lambda * std::max(JtJ(j, j), floor);
  return -A.ldlt().solve(g);
}

}  // namespace

LmResult levenberg_marquardt(const ResidualFunction& f, const Eigen::VectorXd& x0, const Eigen::VectorXd& lower,
                             const Eigen::VectorXd& upper, const LmOptions& o) {
  const ResidualColumnsFunction none = [&f](const Eigen::VectorXd& x, Eigen::VectorXd& r, Eigen::MatrixXd* columns) {
    if (columns) columns->resize(0, 0);
    return f(x, r);
  };
  return levenberg_marquardt(none, x0, lower, upper, o);
}

LmResult levenberg_marquardt(const ResidualColumnsFunction& model, const Eigen::VectorXd& x0,
                             const Eigen::VectorXd& lower, const Eigen::VectorXd& upper, const LmOptions& o) {
  const ResidualFunction f = [&model](const Eigen::VectorXd& x, Eigen::VectorXd& r) { return model(x, r, nullptr); };
  LmResult out;
  out.x = x0.cwiseMax(lower).cwiseMin(upper);
  Eigen::MatrixXd known, trial_known;  // the closed-form columns at out.x and at the trial point
  if (!model(out.x, out.r, &known))
    return end_search(out, LmStatus::ModelFailedAtStart, "the model could not be evaluated at the starting point");
  const Eigen::Index p = out.x.size();
  // Which columns the model gives in closed form (the same at every point).
  std::vector<char> is_known(std::size_t(p), 0);
  if (known.rows() == out.r.size() && known.cols() == p)
    for (Eigen::Index j = 0; j < p; ++j) is_known[std::size_t(j)] = known.col(j).allFinite() ? 1 : 0;
  const bool all_known = p > 0 && std::all_of(is_known.begin(), is_known.end(), [](char c) { return c != 0; });
  out.cost = 0.5 * out.r.squaredNorm();
  double lambda = -1.0;
  int stalls = 0;
  Eigen::VectorXd trial_r;
  // Broyden (1965) rank-one updates replace the finite-difference Jacobian between refreshes: one residual call
  // an iteration instead of p + 1. The Jacobian is recomputed every `broyden_refresh` iterations, whenever an
  // updated one fails to give a step, and before any convergence is declared (the covariance needs a true one).
  // A refresh differences only the columns the model does not know (Partial); a confirmation differences all of
  // them (Differenced).
  enum class Jacobian { Updated, Partial, Differenced };
  Jacobian state = Jacobian::Updated;
  int since_refresh = 0;
  if (o.initial_jacobian.rows() == out.r.size() && o.initial_jacobian.cols() == p && o.initial_jacobian.allFinite()) {
    out.jacobian = o.initial_jacobian;
    for (Eigen::Index j = 0; j < p; ++j)
      if (is_known[std::size_t(j)]) out.jacobian.col(j) = known.col(j);
  }
  // Every column differenced (a confirmation), or only those the model does not know (a refresh).
  auto difference = [&](bool every_column) {
    const bool partial = !every_column && known.size() > 0;
    const bool ok =
        finite_difference_jacobian(f, out.x, out.r, upper, o.fd_step, partial ? known : Eigen::MatrixXd(), out.jacobian);
    state = partial ? Jacobian::Partial : Jacobian::Differenced;
    since_refresh = 0;
    return ok;
  };
  auto differenced = [&] { return difference(true); };
  auto refresh = [&] { return difference(false); };
  // With closed-form columns, a search that ends on a small step or decrease (step, cost or stall tolerance) has
  // perhaps only been slowed by a poor column in an ill-conditioned problem (Lanczos3 with its known columns 10% off
  // crept along for 2000 iterations): every column is differenced and the search goes on, unless it just was.
  const bool closed_form = std::any_of(is_known.begin(), is_known.end(), [](char c) { return c != 0; });
  bool confirming = false;  // the last refresh was such a confirmation
  auto end_confirmed = [&] {
    if (!closed_form || !o.confirm_on_update || state == Jacobian::Differenced) return true;
    confirming = true;
    stalls = 0;
    return false;
  };
  for (out.iterations = 0; out.iterations < o.max_iterations; ++out.iterations) {
    if (confirming) {
      confirming = false;
      if (!differenced()) return failed_differentiating(out);
    }
    if (state == Jacobian::Updated && (o.broyden_refresh <= 1 || since_refresh >= o.broyden_refresh || out.jacobian.size() == 0) &&
        !refresh())
      return failed_differentiating(out);
    Eigen::MatrixXd JtJ = out.jacobian.transpose() * out.jacobian;
    Eigen::VectorXd g = out.jacobian.transpose() * out.r;
    hold_parameters_on_bounds(out.x, lower, upper, JtJ, g);
    if (lambda < 0) lambda = o.initial_damping * JtJ.diagonal().maxCoeff();
    if (gauss_newton_decrease_negligible(JtJ, g, out.r, o.decrease_tolerance)) {
      if (state != Jacobian::Differenced && o.confirm_on_update) {  // confirm with a differenced Jacobian
        if (!differenced()) return failed_differentiating(out);
        --out.iterations;
        continue;
      }
      return end_search(out, LmStatus::DecreaseTolerance,
                        "predicted decrease below decrease_tolerance of the residual variance");
    }
    bool accepted = false;
    // A refreshed Jacobian gets twelve ever more damped tries; an updated one two, then a refreshed one is computed
    // (a residual call a try either way, and a poor model of the residuals fails at every damping).
    const int attempts = state != Jacobian::Updated ? 12 : 2;
    for (int attempt = 0; attempt < attempts && !accepted; ++attempt) {
      const Eigen::VectorXd dx = damped_step(JtJ, g, lambda);
      const Eigen::VectorXd x_new = (out.x + dx).cwiseMax(lower).cwiseMin(upper);
      const double step = (x_new - out.x).cwiseAbs().maxCoeff();
      if (!(step > o.step_tolerance)) {
        if (!end_confirmed()) break;
        if (state != Jacobian::Differenced && o.final_jacobian) differenced();
        return end_search(out, LmStatus::StepTolerance, "parameter change below step_tolerance");
      }
      if (model(x_new, trial_r, &trial_known) && trial_r.allFinite()) {
        const double c = 0.5 * trial_r.squaredNorm();
        if (c < out.cost) {
          const double decrease = (out.cost - c) / std::max(out.cost, 1e-300);
          if (o.broyden_refresh > 1) {
            // The secant condition J dx = dr on the columns the model does not know; the known ones exact.
            Eigen::VectorXd taken = x_new - out.x;
            const Eigen::VectorXd mismatch = trial_r - out.r - out.jacobian * taken;
            for (Eigen::Index j = 0; j < p; ++j)
              if (is_known[std::size_t(j)]) taken[j] = 0;
            if (taken.squaredNorm() > 0) out.jacobian += mismatch * taken.transpose() / taken.squaredNorm();
            for (Eigen::Index j = 0; j < p; ++j)
              if (is_known[std::size_t(j)] && trial_known.rows() == trial_r.size() && trial_known.cols() == p &&
                  trial_known.col(j).allFinite())
                out.jacobian.col(j) = trial_known.col(j);
            state = all_known ? Jacobian::Partial : Jacobian::Updated;
            ++since_refresh;
          } else {
            state = Jacobian::Updated;
          }
          // A decrease that is a negligible fraction of the residual variance is a stall (a flat valley: the data
          // do not pin the parameters down); three in a row end the search with the point reached.
          const double s2 = trial_r.squaredNorm() / double(std::max<Eigen::Index>(1, trial_r.size() - p));
          stalls = (out.cost - c) < o.stall_tolerance * s2 ? stalls + 1 : 0;
          out.x = x_new;
          out.r = trial_r;
          out.cost = c;
          std::swap(known, trial_known);
          lambda = std::max(lambda / 5.0, 1e-12);
          accepted = true;
          if ((decrease < o.cost_tolerance || stalls >= 3) && end_confirmed()) {
            // Keep the Jacobian at the final point for the covariance.
            if (o.final_jacobian) differenced();
            return stalls >= 3 ? end_search(out, LmStatus::Stall,
                                            "cost stationary within the residual variance (stall_tolerance)")
                               : end_search(out, LmStatus::CostTolerance, "relative cost decrease below cost_tolerance");
          }
          continue;
        }
      }
      lambda *= 4.0;
    }
    if (confirming) continue;
    // An updated Jacobian may just be poor: retry with a refreshed one, and a refreshed one with every column
    // differenced (the closed forms are the equations', not quite the solver's).
    if (!accepted && state != Jacobian::Differenced) {
      if (!(state == Jacobian::Updated ? refresh() : differenced())) return failed_differentiating(out);
      continue;
    }
    // No damped step improves the cost: at a (numerical) minimum for this model's smoothness.
    if (!accepted) return end_search(out, LmStatus::NoDecrease, "no further decrease possible");
  }
  if (o.final_jacobian) differenced();
  end_search(out, LmStatus::MaxIterations, "");
  out.message = "stopped after max_iterations (" + std::to_string(o.max_iterations) + ")";
  return out;
}

}  // namespace spreadfit::fit
