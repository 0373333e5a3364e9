// The forward model of a bench test: material + rig -> predicted readings at requested times.
// Dispatches to the thin-film spreading model (channel, plate), the squeeze-flow ODE and the static slump model.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "models/rheology.hpp"
#include "models/rig.hpp"
#include "models/solve_status.hpp"
#include "models/thin_film.hpp"

namespace spreadfit {

/// Numerical settings of the forward solvers. Defaults give 0.09% mean, 0.8% worst error against a converged
/// solution over a population of channel and plate cases (SpreadingOptions::extrapolate).
struct ForwardOptions {
  int cells = 20;                  ///< Lagrangian cells of the thin-film models (>= 8; >= 16 with extrapolate)
  bool extrapolate = true;         ///< thin-film: Richardson extrapolation from cells and cells / 2 (SpreadingOptions)
  double rel_tol = 1e-4;           ///< relative local error tolerance of the thin-film time stepper
  std::size_t max_steps = 200000;  ///< bound on time steps per solve (SpreadingOptions, SqueezeOptions::max_steps)
  int jacobian_reuse = 4;          ///< Ros2 stepper only: accepted steps one Jacobian serves (SpreadingOptions)
  TimeStepper stepper = TimeStepper::Rodas;  ///< thin-film time stepper (SpreadingOptions)
  bool rates = false;  ///< also each reading's rate of change in time (ForwardResult::rates; SpreadingOptions::rates)
};

struct ForwardResult {
  std::vector<double> readings;       ///< one per requested time, in the rig's reading [m]
  /// d reading / dt [m/s] at each requested time when ForwardOptions::rates is set (else empty): the front's or
  /// the gap's speed in the model at the reported state (0 for a slump, which does not evolve). With the
  /// consistency scaling below it gives two Jacobian columns of a fit without solving again.
  std::vector<double> rates;
  SolveStatus status = SolveStatus::Ok;
  std::string message;                ///< why a solve failed, naming the bound (empty when Ok)
  std::vector<std::string> notes;     ///< plain-words remarks on model validity (e.g. slump regime)
  std::size_t steps = 0;              ///< time steps taken
  bool ok() const { return status == SolveStatus::Ok; }
};

/// The consistency as a time scale. Every law's shear rate at a stress above the yield stress is
/// ((tau - tau_y) / K)^(1/n), so multiplying K by c divides every velocity of these inertia-free, gravity- or
/// load-driven flows by c^(1/n) at the same state (film flux, models/rheology.hpp, and its side-wall factor, a
/// function of depth only; the squeeze rate, models/squeeze_flow.hpp): the solution at K c is the one at K, run
/// c^(1/n) times slower. Hence, for a reading R(t) and its rate dR/dt,
///     dR / d ln K = -(t / n) dR/dt,
/// exact for the equations (the solvers' readings follow it to their discretisation error). For a viscosity
/// (n = 1) the same.
double reading_derivative_log_consistency(double time, double rate, double flow_index);

/// Readings at the given times [s] (t = 0 is the release; times must be non-decreasing and >= 0).
/// Throws std::invalid_argument for an invalid material or rig, or a reading the rig does not have.
ForwardResult predict_readings(const TestSetup& setup, const Material& material, const std::vector<double>& times,
                               const ForwardOptions& options = {});

std::string_view reading_name(Reading reading);

}  // namespace spreadfit

namespace spreadfit {
/// The same readings from the one-state low-order model (models/low_order.hpp) for channel and plate rigs: a
/// cheap surrogate for global searches. Squeeze and slump rigs fall back to the full model (already cheap).
/// Non-finite values mark a failed solve.
std::vector<double> predict_readings_low_order(const TestSetup& setup, const Material& material,
                                               const std::vector<double>& times);
}  // namespace spreadfit
