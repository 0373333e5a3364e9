// Gravity spreading of a thin layer of a Herschel-Bulkley material on a horizontal no-slip base, released from a
// block (planar, against a wall at x = 0) or a cylinder (axisymmetric): the lubrication equation
//     h_t + (1/r^s) (r^s q)_r = 0,   q = film_flux(material, rho g |h_r|, h) down the slope   (s = 0 or 1),
// solved by a Lagrangian (mass-fraction) method of lines: node x_i moves with the depth-averaged velocity
// q/h, so the volume between neighbouring nodes never changes (volume is conserved to rounding), the front is the
// last node, and the predicted front is a smooth function of the material parameters (no cell-to-cell jumps of
// a fixed grid; see the smoothness test). Cells are graded towards the front, where the profile is singular.
//
// Front node: near a front advancing into a dry bed the profile of a power-law film is the travelling-wave
// h = c d^alpha, d the distance behind the front, alpha = 1/(n+2) (Gratton, Minotti & Mahajan 1999: the
// similarity profiles (1 - xi^(n+1))^(1/(n+2))), along which q/h is constant. The last cell's volume fixes c, and
// the front moves with the velocity of that local profile at the cell's midpoint; with a yield stress the same
// evaluation goes to zero when the front cell no longer yields.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "models/film_velocity_kernel.hpp"
#include "models/rheology.hpp"
#include "models/side_wall.hpp"
#include "models/solve_status.hpp"

namespace spreadfit {

enum class Geometry { Planar, Axisymmetric };

struct SpreadingProblem {
  Geometry geometry = Geometry::Planar;
  double initial_extent = 0.05;  ///< L0 (planar, block length from the wall) or R0 (axisymmetric) [m]
  double initial_height = 0.01;  ///< H0 [m], uniform at release
  double rho_g = 1000.0 * standard_gravity;  ///< density times gravity [Pa/m]
  Material material;
  double channel_width = 0.0;  ///< > 0 applies the side-wall flux factor of that width (planar only) [m]
};

/// Time integrators of the method of lines.
enum class TimeStepper {
  Rodas,  ///< RODAS 4(3), analytic tridiagonal Jacobian every step, continuous output (tridiagonal_rodas.hpp)
  Ros2,   ///< ROS2, finite-difference Jacobian kept for jacobian_reuse steps, steps end on every requested time
};

struct SpreadingOptions {
  TimeStepper stepper = TimeStepper::Rodas;
  /// Lagrangian cells (>= 8; with extrapolate, >= 16: the second solve runs on cells / 2).
  int cells = 20;
  /// Richardson extrapolation in the cell count: solve on N = cells and on N/2 cells and report
  ///     f = f_N + (f_N - f_{N/2}) / ((N / (N/2))^p - 1),   p = grid_order,
  /// which removes the leading grid error term (Richardson 1911; e.g. Roache, Verification and Validation in
  /// Computational Science and Engineering, 1998, ch. 5). Both solves are smooth in the parameters, so the
  /// extrapolated readings are too. Measured over 48 channel and plate cases (tests/models/test_thin_film.cpp,
  /// scripts/bench): 10 + 20 cells extrapolated are 0.09% from a 320-cell solution on average (worst 0.8%), where 40
  /// cells alone are 0.30% (worst 1.2%), at about half the cost. The two solves run at the same time on the
  /// process's shared thread pool (oneTBB), sharing max_steps; the result does not depend on the threads.
  bool extrapolate = true;
  /// Order of the leading grid error term: the scheme's observed order between 10 and 20 cells (1.6 in the
  /// bench's grid convergence; 1.7 between 20 and 40), where the front cell's profile dominates the error.
  double grid_order = 1.6;
  double grading = 3.0;            ///< initial node x_i = L0 (1 - (1 - i/N)^grading): > 1 refines the front
  double rel_tol = 1e-4;           ///< stepper tolerance (relative)
  double abs_tol = 1e-8;           ///< stepper tolerance, in units of the initial extent
  /// Bound on time steps per solve, over all requested times (RODAS: accepted steps; Ros2: tries, accepted or
  /// rejected); reaching it ends the solve with SolveStatus::StepLimit.
  std::size_t max_steps = 200000;
  int jacobian_reuse = 4;          ///< Ros2 only: accepted steps one finite-difference Jacobian serves
                                   ///< (4 changes readings by < 5e-5 relative against 1, 1.6x faster)
  /// Also the front's speed at each requested time (SpreadingSolution::rates): the front node's rate of the
  /// method of lines at the reported state, one right-hand side a time (about 3% of a solve).
  bool rates = false;
};

struct SpreadingSolution {
  std::vector<double> fronts;   ///< front position (from x = 0 or the axis) [m] at each requested time
  std::vector<double> rates;    ///< d front / dt [m/s] at each requested time (SpreadingOptions::rates; else empty)
  SolveStatus status = SolveStatus::Ok;
  std::string message;          ///< which bound was hit or what failed, with its value (empty when Ok)
  std::size_t steps = 0;        ///< time steps taken (on failure: up to where the solve stopped)
  std::size_t rhs_calls = 0;
  Eigen::VectorXd final_nodes;  ///< node positions at the last time [m], node 0 (at 0) excluded
  bool ok() const { return status == SolveStatus::Ok; }
};

/// The method-of-lines system in odeint's form: sys(x, dxdt, t), x the node positions divided by L0.
class SpreadingSystem {
 public:
  SpreadingSystem(const SpreadingProblem& problem, int cells, double grading);
  void operator()(const Eigen::VectorXd& x, Eigen::VectorXd& dxdt, double t) const;
  /// dxdt = f(x) and its tridiagonal Jacobian, analytic (chain rule through film_velocity_with_derivatives and the
  /// side-wall factor's slope): lower[i] = df_i/dx_{i-1}, diag[i] = df_i/dx_i, upper[i] = df_i/dx_{i+1}.
  void tridiagonal_jacobian(const Eigen::VectorXd& x, double t, Eigen::VectorXd& dxdt, Eigen::VectorXd& lower,
                            Eigen::VectorXd& diag, Eigen::VectorXd& upper) const;
  const Eigen::VectorXd& initial_nodes() const { return initial_; }
  /// Cell-average heights [m] for nodes x (scaled by L0).
  Eigen::VectorXd heights(const Eigen::VectorXd& x) const;
  /// Total volume (planar: per unit width [m^2]; axisymmetric [m^3]) for nodes x.
  double volume(const Eigen::VectorXd& x) const;

 private:
  double cell_area(double left, double right) const;  // integral of r^s dr over the cell [m^(s+1)], 2 pi omitted
  // d cell_area / d right (scaled node), i.e. L or right L^2; minus the same at `left` for the left node.
  double area_slope(double node) const;
  struct NodeVelocity {
    double v, dv_dslope, dv_ddepth;  // [m/s], [m^2/s], [1/s]
  };
  NodeVelocity node_velocity(double slope, double depth, double yielded_depth, double power) const;
  // Per node: slope and depth of the film, and the film kernel's yielded depth and power (film_velocity_kernel.hpp).
  struct NodeStates {
    Eigen::VectorXd slope, depth, yielded, power;
  };
  // The node states from the cells' widths w and heights h, shared by the right-hand side and its Jacobian.
  void node_states(const Eigen::VectorXd& w, const Eigen::VectorXd& h, NodeStates& nodes) const;
  SpreadingProblem p_;
  FilmVelocityKernel film_;           // the material's film velocity, constants worked out once
  const SideWallTable* walls_;        // the side-wall factor's table, null without side walls
  double inverse_width_;              // 1 / channel width [1/m] (0 without side walls): multiplied, not divided
  Eigen::VectorXd initial_;  // scaled node positions at release
  Eigen::VectorXd mass_;     // cell volume / (2 pi)^s, constant in time
  double front_alpha_;
  double front_height_factor_;
};

/// Front positions at the given times [s] (non-decreasing, >= 0; t = 0 is the release), extrapolated in the cell
/// count unless options.extrapolate is false (final_nodes are then the finer grid's).
/// Throws std::invalid_argument for an invalid problem or options.
SpreadingSolution solve_spreading(const SpreadingProblem& problem, const std::vector<double>& times,
                                  const SpreadingOptions& options = {});

}  // namespace spreadfit
