// Parallel-plate squeeze flow under a dead load: a disc of sample of constant volume V between two no-slip plates,
// the upper one pressed by a constant force F. The gap h(t) follows a one-state ODE (lubrication limit: the disc
// is wide compared with the gap).
//
// Model (DEVELOPERS.md, "Gravity spreading"; Engmann, Servais & Burbidge 2005, J. Non-Newt. Fluid Mech. 132, review):
//   disc radius R = sqrt(V / (pi h)); the radial flux per unit circumference at radius r is r (-dh/dt) / 2;
//   a slit of full gap h under the pressure gradient G carries 2 film_flux(m, G, h/2) per unit width
//   (the film flux of models/rheology.hpp on the half gap, doubled: the mid-plane is a plane of symmetry);
//   the load is F = integral_0^R pi r^2 G(r) dr (the pressure integrated by parts, p(R) = 0).
// Limits checked in the tests: Stefan's law (Newtonian), Scott (1931) (power law), and the perfectly plastic
// limit F = 2 pi tau_y R^3 / (3 h), at which a yield-stress sample stops.
//
// Yield stress, scaled form (derived in squeeze_flow.cpp): with G = (2 tau_y / h) g (g >= 1 where the slit
// flows; g = 1 is the yield point at the wall), the dimensionless slit flux is
//   phi(g) = 2n/(n+1) g^(1/n) (1 - 1/g)^(1+1/n) (1 - n (1 - 1/g) / (2n+1)),
// and F h / (2 pi R^3 tau_y) = Psi(g_w) = g_w/3 - (1 / (3 phi(g_w)^3)) integral_1^{g_w} phi(g)^3 dg,
// g_w = g at the rim. Psi(1) = 1/3 is the plastic limit. The lubrication solution approaches it only
// asymptotically: h - h_arrest decays like t^(-n), so "arrested" is judged with a tolerance (SqueezeOptions).
// Near the centre g -> 1 (the unyielded-core paradox of lubrication theory for yield-stress fluids); the load
// is unaffected at leading order in h/R.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "models/rheology.hpp"
#include "models/rig.hpp"
#include "models/solve_status.hpp"

namespace spreadfit {

/// Numerical settings of solve_squeeze.
struct SqueezeOptions {
  /// Local error tolerance of the time stepper on the log of the gap excess (so relative on the gap), > 0.
  double rel_tol = 1e-9;
  /// Bound on accepted time steps per solve (>= 1); reaching it ends the solve with SolveStatus::StepLimit.
  std::size_t max_steps = 100000;
  /// A yield-stress sample counts as arrested when (h - arrest_gap) <= arrest_tolerance * arrest_gap at the last
  /// time (in (0, 1)). 1e-3 is 1 um on a 1 mm gap, below a bench gauge's resolution.
  double arrest_tolerance = 1e-3;
};

/// Gap history of a squeeze test.
struct SqueezeSolution {
  std::vector<double> gaps;  ///< full gap h [m] at each requested time (empty unless Ok)
  SolveStatus status = SolveStatus::Ok;
  std::string message;    ///< which bound was hit / what failed (empty when Ok and nothing to say)
  bool arrested = false;  ///< the load is carried by the yield stress before the last time
  double arrest_gap = 0;  ///< plastic-limit gap [m] (0 when no yield stress)
  std::size_t steps = 0;  ///< accepted time steps
  bool ok() const { return status == SolveStatus::Ok; }
};

/// Gap of a squeeze test at the given times [s].
/// times: non-decreasing, >= 0; t = 0 is when the load is applied at gap rig.initial_gap (0 selects (4V/pi)^(1/3),
/// a disc as high as it is wide). Throws std::invalid_argument naming the field for an invalid rig (volume > 0,
/// force > 0, initial_gap >= 0, all finite), material, options or times.
SqueezeSolution solve_squeeze(const SqueezeRig& rig, const Material& m, const std::vector<double>& times,
                              const SqueezeOptions& options = {});

/// -dh/dt [m/s] at gap h [m] for the rig's load (0 at or below the arrest gap). Throws std::invalid_argument like
/// solve_squeeze, and for gap <= 0.
double squeeze_rate(const SqueezeRig& rig, const Material& m, double gap);

/// Gap [m] at which the load is applied: rig.initial_gap, or (4V/pi)^(1/3) when it is 0.
double squeeze_initial_gap(const SqueezeRig& rig);

/// Disc radius R = sqrt(V / (pi h)) [m] at gap h [m].
double squeeze_disc_radius(double volume, double gap);

namespace squeeze_detail {
/// Dimensionless slit flux phi(g) of a Herschel-Bulkley material of flow index n at scaled pressure gradient
/// g = G h / (2 tau_y) (0 for g <= 1).
double slit_flux(double n, double g);
/// Psi(g_w) = F h / (2 pi R^3 tau_y) at rim gradient g_w >= 1 (Psi(1) = 1/3; increasing; ~ g_w/(n+3) for large g_w).
double load_function(double n, double g_w);
}  // namespace squeeze_detail

}  // namespace spreadfit
