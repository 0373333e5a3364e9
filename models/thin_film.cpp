#include "models/thin_film.hpp"

#include <boost/numeric/odeint/integrate/integrate_times.hpp>
#include <boost/numeric/odeint/util/odeint_error.hpp>
#include <algorithm>
#include <atomic>
#include <cmath>
#include <functional>
#include <limits>
#include <numbers>
#include <string>
#include <utility>
#include <stdexcept>

#include <tbb/parallel_invoke.h>

#include "models/adaptive_dense_stepper.hpp"
#include "models/side_wall.hpp"
#include "models/tridiagonal_rodas.hpp"
#include "models/tridiagonal_rosenbrock.hpp"

namespace spreadfit {

namespace {

struct StepLimitReached {};
struct NonFiniteStateReached {
  double time;  // [s], the requested time whose state was not finite
};

/// The bound on time steps of one solve, in odeint's step-checker form. odeint's max_step_checker is reset at every
/// requested time, which would make max_steps a bound between two readings; this one is never reset, so
/// SpreadingOptions::max_steps bounds the whole solve, as documented. The count is shared by the grids of an
/// extrapolated solve, which run at the same time (`spent`, atomic): together they take at most max_steps.
class SolveStepBudget {
 public:
  SolveStepBudget(std::size_t max_steps, std::atomic<std::size_t>& spent) : max_steps_(max_steps), spent_(spent) {}
  void operator()() {
    std::size_t before = spent_.load(std::memory_order_relaxed);
    do {
      if (before >= max_steps_) throw StepLimitReached{};
    } while (!spent_.compare_exchange_weak(before, before + 1, std::memory_order_relaxed));
    ++steps_;
  }
  void reset() {}  // called by odeint at every requested time: the budget is per solve
  std::size_t steps() const { return steps_; }  // this grid's steps

 private:
  std::size_t max_steps_;
  std::atomic<std::size_t>& spent_;
  std::size_t steps_ = 0;
};

}  // namespace

SpreadingSystem::SpreadingSystem(const SpreadingProblem& problem, int cells, double grading)
    : p_(problem),
      film_(problem.material),
      walls_(problem.channel_width > 0 ? &side_wall_table() : nullptr),
      inverse_width_(problem.channel_width > 0 ? 1.0 / problem.channel_width : 0.0) {
  initial_.resize(cells);
  for (int i = 1; i <= cells; ++i) initial_[i - 1] = 1.0 - std::pow(1.0 - double(i) / cells, grading);
  initial_[cells - 1] = 1.0;
  mass_.resize(cells);
  double left = 0.0;
  for (int j = 0; j < cells; ++j) {
    mass_[j] = p_.initial_height * cell_area(left, initial_[j]);
    left = initial_[j];
  }
  // Front cell: profile h = c d^alpha with mean hbar over width w: c = (1 + alpha) hbar / w^alpha; at the midpoint
  // d = w/2 the height is (1 + alpha) 2^-alpha hbar and the slope 2 alpha h_mid / w.
  front_alpha_ = 1.0 / (p_.material.flow_index + 2.0);
  front_height_factor_ = (1.0 + front_alpha_) * std::pow(2.0, -front_alpha_);
}

double SpreadingSystem::cell_area(double left, double right) const {
  const double L = p_.initial_extent;
  if (p_.geometry == Geometry::Planar) return (right - left) * L;
  return 0.5 * (right - left) * (right + left) * L * L;
}

double SpreadingSystem::area_slope(double node) const {
  const double L = p_.initial_extent;
  return p_.geometry == Geometry::Planar ? L : node * L * L;
}

// Node velocity v = -sign(slope) U(rho g |slope|, depth), U = film velocity times the side-wall factor, with
// dv/dslope = -rho g dU/dG and dv/ddepth = -sign(slope) dU/dh.
// Y and P are the yielded depth and the power of the film kernel's three passes (film_velocity_kernel.hpp).
SpreadingSystem::NodeVelocity SpreadingSystem::node_velocity(double slope, double depth, double Y, double P) const {
  const FilmVelocity fv = film_.with_derivatives(p_.rho_g * std::abs(slope), depth, Y, P);
  double U = fv.u, U_G = fv.du_dG, U_h = fv.du_dh;
  if (walls_) {
    const SideWallFactor sw = walls_->factor_with_slope(depth * inverse_width_);
    U_h = U_h * sw.f + U * sw.df * inverse_width_;
    U *= sw.f;
    U_G *= sw.f;
  }
  const double sign = slope > 0 ? 1.0 : -1.0;
  return {-sign * U, -p_.rho_g * U_G, -sign * U_h};
}

void SpreadingSystem::tridiagonal_jacobian(const Eigen::VectorXd& x, double /*t*/, Eigen::VectorXd& dxdt,
                                           Eigen::VectorXd& lower, Eigen::VectorXd& diag,
                                           Eigen::VectorXd& upper) const {
  const Eigen::Index n = x.size();
  const double L = p_.initial_extent, inverse_L = 1.0 / L;
  dxdt.resize(n);
  lower.setZero(n);
  diag.setZero(n);
  upper.setZero(n);
  // Per cell j (between nodes j-1 and j, node -1 the wall or axis at 0): width, height and the height's
  // derivatives in its two nodes, dh/dx_right = -h A'(x_right)/A, dh/dx_left = +h A'(x_left)/A.
  thread_local Eigen::VectorXd w, h, dh_left, dh_right;
  w.resize(n);
  h.resize(n);
  dh_left.resize(n);
  dh_right.resize(n);
  double left = 0.0;
  for (Eigen::Index j = 0; j < n; ++j) {
    w[j] = (x[j] - left) * L;
    if (!(w[j] > 0)) {
      dxdt.setConstant(std::numeric_limits<double>::quiet_NaN());
      return;
    }
    const double inverse_area = 1.0 / cell_area(left, x[j]);
    h[j] = mass_[j] * inverse_area;
    dh_right[j] = -h[j] * area_slope(x[j]) * inverse_area;
    dh_left[j] = h[j] * area_slope(left) * inverse_area;
    left = x[j];
  }
  thread_local NodeStates nodes;
  node_states(w, h, nodes);
  const Eigen::VectorXd &slope = nodes.slope, &depth = nodes.depth, &yielded = nodes.yielded, &power = nodes.power;
  const Eigen::Index f = n - 1;
  // Interior node i between cells i and i+1, differentiated in hl, hr, wl, wr; the widths move with
  // dw/dx_right = L, dw/dx_left = -L; dxdt = v/L.
  for (Eigen::Index i = 0; i + 1 < n; ++i) {
    const double wl = w[i], wr = w[i + 1], hl = h[i], hr = h[i + 1], inverse_sum = 1.0 / (wl + wr);
    const NodeVelocity nv = node_velocity(slope[i], depth[i], yielded[i], power[i]);
    const double a_hl = (nv.dv_dslope * -2.0 + nv.dv_ddepth * wr) * inverse_sum;
    const double a_hr = (nv.dv_dslope * 2.0 + nv.dv_ddepth * wl) * inverse_sum;
    const double a_wl = (-nv.dv_dslope * slope[i] + nv.dv_ddepth * (hr - depth[i])) * inverse_sum;
    const double a_wr = (-nv.dv_dslope * slope[i] + nv.dv_ddepth * (hl - depth[i])) * inverse_sum;
    dxdt[i] = nv.v * inverse_L;
    if (i > 0) lower[i] = (a_hl * dh_left[i] - a_wl * L) * inverse_L;
    diag[i] = (a_hl * dh_right[i] + a_wl * L + a_hr * dh_left[i + 1] - a_wr * L) * inverse_L;
    upper[i] = (a_hr * dh_right[i + 1] + a_wr * L) * inverse_L;
  }
  // Front node: h_mid = F h, slope = -2 alpha h_mid / w of the last cell.
  const double h_mid = depth[f];
  const NodeVelocity nv = node_velocity(slope[f], h_mid, yielded[f], power[f]);
  const double a_h = (nv.dv_dslope * slope[f] / h_mid + nv.dv_ddepth) * front_height_factor_;
  const double a_w = -nv.dv_dslope * slope[f] / w[f];
  dxdt[f] = nv.v * inverse_L;
  if (f > 0) lower[f] = (a_h * dh_left[f] - a_w * L) * inverse_L;
  diag[f] = (a_h * dh_right[f] + a_w * L) * inverse_L;
}

Eigen::VectorXd SpreadingSystem::heights(const Eigen::VectorXd& x) const {
  Eigen::VectorXd h(x.size());
  double left = 0.0;
  for (Eigen::Index j = 0; j < x.size(); ++j) {
    h[j] = mass_[j] / cell_area(left, x[j]);
    left = x[j];
  }
  return h;
}

double SpreadingSystem::volume(const Eigen::VectorXd& x) const {
  const Eigen::VectorXd h = heights(x);
  double v = 0.0, left = 0.0;
  for (Eigen::Index j = 0; j < x.size(); ++j) {
    v += h[j] * cell_area(left, x[j]);
    left = x[j];
  }
  return p_.geometry == Geometry::Planar ? v : 2.0 * std::numbers::pi * v;
}

void SpreadingSystem::operator()(const Eigen::VectorXd& x, Eigen::VectorXd& dxdt, double /*t*/) const {
  const Eigen::Index n = x.size();
  const double L = p_.initial_extent, inverse_L = 1.0 / L;
  dxdt.resize(n);
  // Cell widths and heights; a crossed pair of nodes makes the step fail (NaN) so the stepper retries smaller.
  thread_local Eigen::VectorXd w, h;
  w.resize(n);
  h.resize(n);
  double left = 0.0;
  for (Eigen::Index j = 0; j < n; ++j) {
    w[j] = (x[j] - left) * L;
    if (!(w[j] > 0)) {
      dxdt.setConstant(std::numeric_limits<double>::quiet_NaN());
      return;
    }
    h[j] = mass_[j] / cell_area(left, x[j]);
    left = x[j];
  }
  // The film velocity from the node states, times the side-wall factor, against the slope.
  thread_local NodeStates nodes;
  node_states(w, h, nodes);
  for (Eigen::Index i = 0; i < n; ++i) {
    double u = film_.velocity(nodes.depth[i], nodes.yielded[i], nodes.power[i]);
    if (walls_) u *= walls_->factor(nodes.depth[i] * inverse_width_);
    dxdt[i] = (nodes.slope[i] > 0 ? -u : u) * inverse_L;
  }
}

// Interior node i sits between cells i and i+1: height interpolated linearly between the cell centres, slope the
// centred difference of the cell averages; the front node takes the front cell's profile. Then the film velocity's
// first two passes (models/film_velocity_kernel.hpp): yielded depths, and all powers at once. (Divisions are
// multiplications by one inverse: these loops are most of a solve.)
void SpreadingSystem::node_states(const Eigen::VectorXd& w, const Eigen::VectorXd& h, NodeStates& nodes) const {
  const Eigen::Index n = w.size();
  Eigen::VectorXd &slope = nodes.slope, &depth = nodes.depth, &yielded = nodes.yielded, &power = nodes.power;
  slope.resize(n);
  depth.resize(n);
  yielded.resize(n);
  power.resize(n);
  for (Eigen::Index i = 0; i + 1 < n; ++i) {
    const double wl = w[i], wr = w[i + 1], inverse_sum = 1.0 / (wl + wr);
    depth[i] = (h[i] * wr + h[i + 1] * wl) * inverse_sum;
    slope[i] = 2.0 * (h[i + 1] - h[i]) * inverse_sum;
  }
  depth[n - 1] = front_height_factor_ * h[n - 1];
  slope[n - 1] = -2.0 * front_alpha_ * depth[n - 1] / w[n - 1];
  for (Eigen::Index i = 0; i < n; ++i) {
    const double G = p_.rho_g * std::abs(slope[i]);
    yielded[i] = film_.yielded_depth(G, depth[i]);
    power[i] = film_.power_argument(G, yielded[i]);
  }
  film_.powers(power.data(), power.data(), std::size_t(n));
}

namespace {

// One method-of-lines solve on `cells` cells (no extrapolation); the arguments are checked by solve_spreading.
SpreadingSolution solve_on_grid(const SpreadingProblem& problem, const std::vector<double>& times,
                                const SpreadingOptions& options, int cells, std::atomic<std::size_t>& steps_spent) {
  SpreadingSolution out;
  if (times.empty()) return out;
  SpreadingSystem system(problem, cells, options.grading);
  Eigen::VectorXd x = system.initial_nodes();

  // First step: a small fraction of the time the front cell needs to move its own width.
  Eigen::VectorXd v0;
  system(x, v0, 0.0);
  const double last_width = x[x.size() - 1] - x[x.size() - 2];
  double dt = v0.cwiseAbs().maxCoeff() > 0 ? 1e-3 * last_width / v0.cwiseAbs().maxCoeff() : 1.0;

  if (!v0.allFinite()) {
    out.status = SolveStatus::NonFiniteState;
    out.message = "thin-film solve: the initial rate is not finite (the material's flux overflows at release)";
    out.final_nodes = x * problem.initial_extent;
    return out;
  }

  std::vector<double> obs_times;
  obs_times.reserve(times.size() + 1);
  obs_times.push_back(0.0);
  obs_times.insert(obs_times.end(), times.begin(), times.end());
  out.fronts.reserve(times.size());
  std::size_t seen = 0;
  Eigen::VectorXd node_rates;
  auto observer = [&](const Eigen::VectorXd& state, double t) {
    if (!state.allFinite()) throw NonFiniteStateReached{t};
    if (seen++ == 0) return;
    out.fronts.push_back(state[state.size() - 1] * problem.initial_extent);
    if (options.rates) {
      system(state, node_rates, t);
      out.rates.push_back(node_rates[node_rates.size() - 1] * problem.initial_extent);
    }
  };
  SolveStepBudget budget(options.max_steps, steps_spent);
  // One integration with either stepper; `current` gives the stepper's latest state and time (for the report of a
  // failed step-size adjustment: a non-finite rate there is a non-finite state, not a small step).
  auto integrate = [&](auto& stepper, auto current) {
    try {
      out.steps = boost::numeric::odeint::integrate_times(std::ref(stepper), std::cref(system), x, obs_times.begin(),
                                                          obs_times.end(), dt, observer, std::ref(budget));
    } catch (const StepLimitReached&) {
      out.status = SolveStatus::StepLimit;
      out.steps = budget.steps();
      out.message = "thin-film solve stopped: SpreadingOptions::max_steps = " + std::to_string(options.max_steps) +
                    " time steps per solve reached at t = " + std::to_string(current().second) + " s";
    } catch (const boost::numeric::odeint::step_adjustment_error& e) {
      out.steps = budget.steps();
      const auto [state, t] = current();
      Eigen::VectorXd rate;
      system(state, rate, t);
      if (!state.allFinite() || !rate.allFinite()) {
        out.status = SolveStatus::NonFiniteState;
        out.message = "thin-film solve: the rate became non-finite at t = " + std::to_string(t) + " s";
      } else {
        out.status = SolveStatus::StepSizeUnderflow;
        out.message = std::string("thin-film solve stopped: no acceptable time step: ") + e.what();
      }
    } catch (const NonFiniteStateReached& e) {
      out.status = SolveStatus::NonFiniteState;
      out.steps = budget.steps();
      out.message = "thin-film solve: the state became non-finite by t = " + std::to_string(e.time) + " s";
    }
  };
  if (options.stepper == TimeStepper::Rodas) {
    AdaptiveDenseStepper<TridiagonalRodas> stepper(
        TridiagonalRodas{}, StepSizeController(options.abs_tol, options.rel_tol, TridiagonalRodas::error_order));
    integrate(stepper, [&] {
      return std::pair<Eigen::VectorXd, double>(stepper.current_state(), stepper.current_time());
    });
    out.rhs_calls = stepper.method().rhs_calls();
  } else {
    TridiagonalRosenbrock2 stepper(options.abs_tol, options.rel_tol, options.jacobian_reuse);
    // The controlled stepper advances x itself; the time reached is the last requested one it passed.
    integrate(stepper,
              [&] { return std::pair<Eigen::VectorXd, double>(x, seen > 0 ? obs_times[seen - 1] : 0.0); });
    out.rhs_calls = stepper.rhs_calls();
  }
  out.final_nodes = x * problem.initial_extent;
  return out;
}

// The message of a step limit reached on the coarser grid: the bound is the options' (both grids together).
std::string step_limit_message(std::size_t max_steps, int coarse_cells) {
  std::string m = "thin-film solve stopped: SpreadingOptions::max_steps = ";
  m += std::to_string(max_steps);
  m += " time steps per solve reached on the coarser grid of the extrapolation (";
  m += std::to_string(coarse_cells);
  m += " cells; the bound covers both grids)";
  return m;
}

}  // namespace

SpreadingSolution solve_spreading(const SpreadingProblem& problem, const std::vector<double>& times,
                                  const SpreadingOptions& options) {
  validate(problem.material);
  if (!(problem.initial_extent > 0) || !(problem.initial_height > 0) || !(problem.rho_g > 0))
    throw std::invalid_argument("spreading problem: initial_extent, initial_height and rho_g must be > 0");
  if (options.cells < 8) throw std::invalid_argument("spreading options: cells must be >= 8");
  if (options.extrapolate && options.cells < 16)
    throw std::invalid_argument("spreading options: cells must be >= 16 with extrapolate (the second grid has cells / 2)");
  if (options.extrapolate && !(options.grid_order > 0 && options.grid_order < 10))
    throw std::invalid_argument("spreading options: grid_order must be in (0, 10)");
  if (!(options.rel_tol > 0) || !(options.abs_tol > 0)) throw std::invalid_argument("spreading options: tolerances must be > 0");
  for (std::size_t i = 0; i < times.size(); ++i)
    if (!(times[i] >= 0) || (i > 0 && times[i] < times[i - 1]))
      throw std::invalid_argument("spreading times must be finite, >= 0 and non-decreasing");

  std::atomic<std::size_t> steps_spent{0};
  if (!options.extrapolate) return solve_on_grid(problem, times, options, options.cells, steps_spent);
  // The two grids are independent solves: they run at the same time on the shared pool (oneTBB; a caller that is
  // itself one of many parallel tasks, a Jacobian column or a profile side, loses nothing by it).
  const int coarse_cells = options.cells / 2;
  SpreadingSolution fine, coarse;
  tbb::parallel_invoke([&] { fine = solve_on_grid(problem, times, options, options.cells, steps_spent); },
                       [&] { coarse = solve_on_grid(problem, times, options, coarse_cells, steps_spent); });
  fine.steps += coarse.steps;
  fine.rhs_calls += coarse.rhs_calls;
  if (!fine.ok()) return fine;
  if (!coarse.ok()) {
    fine.status = coarse.status;
    fine.message = coarse.status == SolveStatus::StepLimit
                       ? step_limit_message(options.max_steps, coarse_cells)
                       : coarse.message + " (on the coarser grid of the extrapolation, " +
                             std::to_string(coarse_cells) + " cells)";
    fine.fronts.clear();
    fine.rates.clear();
    return fine;
  }
  // The leading error term C N^-p cancels between the two grids.
  const double denominator = std::pow(double(options.cells) / coarse_cells, options.grid_order) - 1.0;
  for (std::size_t i = 0; i < fine.fronts.size(); ++i)
    fine.fronts[i] += (fine.fronts[i] - coarse.fronts[i]) / denominator;
  // The speeds of the extrapolated fronts: the same combination (it is linear).
  for (std::size_t i = 0; i < fine.rates.size() && i < coarse.rates.size(); ++i)
    fine.rates[i] += (fine.rates[i] - coarse.rates[i]) / denominator;
  return fine;
}

}  // namespace spreadfit
