#include "models/low_order.hpp"

#include <array>
#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <limits>
#include <numbers>
#include <stdexcept>

#include "models/closed_forms.hpp"
#include "models/side_wall.hpp"

namespace spreadfit {

LowOrderSolution solve_low_order(const SpreadingProblem& p, const std::vector<double>& times) {
  validate(p.material);
  if (!(p.initial_extent > 0) || !(p.initial_height > 0) || !(p.rho_g > 0))
    throw std::invalid_argument("low-order model: initial_extent, initial_height and rho_g must be > 0");
  const bool planar = p.geometry == Geometry::Planar;
  const double L0 = p.initial_extent;
  const double size = planar ? L0 * p.initial_height : std::numbers::pi * L0 * L0 * p.initial_height;
  const Material& m = p.material;
  const double n = m.flow_index;
  LowOrderSolution out;
  out.arrest_extent = std::numeric_limits<double>::infinity();
  if (m.yield_stress > 0)
    out.arrest_extent = planar ? closed_form::planar_arrest_length(p.rho_g, m.yield_stress, size)
                               : closed_form::axisymmetric_arrest_radius(p.rho_g, m.yield_stress, size);
  const double k = planar ? 3.0 : 5.0;
  const double exponent = planar ? 2 * n + 3 : 3 * n + 5;
  const double L = out.arrest_extent;

  using State = std::array<double, 1>;
  // Similarity time at front x: t(x) = (x^e / (P rho g A^(n+2) / K))^(1/n), e = 2n+3 or 3n+5; constants hoisted
  // out of the right-hand side (the Beta functions in P are not cheap).
  const double P = planar ? closed_form::planar_front_constant(n) : closed_form::axisymmetric_front_constant(n);
  const double c = P * p.rho_g / m.consistency * std::pow(size, n + 2);
  auto rhs = [&](const State& y, State& dydt, double) {
    const double x = y[0] * L0;  // integrate in units of L0
    const double t_sim = std::pow(std::pow(x, exponent) / c, 1.0 / n);
    double u = n / exponent * y[0] / t_sim;
    // Side walls slow the whole layer by the duct factor at its mean depth (planar channel only).
    if (planar && p.channel_width > 0) u *= side_wall_flux_factor(size / x / p.channel_width);
    if (std::isfinite(L)) {
      const double ratio = x / L;
      u = ratio >= 1.0 ? 0.0 : u * std::pow(1.0 - std::pow(ratio, k), 1.0 + 1.0 / n);
    }
    dydt[0] = u;
  };
  out.fronts.reserve(times.size());
  if (times.empty()) return out;
  if (L <= L0) {  // the block is already within its plastic-limit extent: no flow in this model
    out.fronts.assign(times.size(), L0);
    return out;
  }
  std::vector<double> obs{0.0};
  obs.insert(obs.end(), times.begin(), times.end());
  std::size_t seen = 0;
  namespace ode = boost::numeric::odeint;
  // 1e-7 relative: far below the model's own distance from the full model (about 1%), and cheap enough for the
  // thousands of calls of a global search.
  auto stepper = ode::make_controlled(1e-9, 1e-7, ode::runge_kutta_dopri5<State>());
  State y{1.0};
  ode::integrate_times(stepper, rhs, y, obs.begin(), obs.end(), 1e-6, [&](const State& s, double) {
    if (seen++ > 0) out.fronts.push_back(std::min(s[0] * L0, L));
  });
  return out;
}

}  // namespace spreadfit
