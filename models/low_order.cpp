#include "models/low_order.hpp"

#include <algorithm>
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

  // Similarity time at front x: t(x) = (x^e / (P rho g A^(n+2) / K))^(1/n), e = 2n+3 or 3n+5, so the front
  // speed is U(x) = (n/e) x / t(x); the constants are hoisted (the Beta functions in P are not cheap).
  const double P = planar ? closed_form::planar_front_constant(n) : closed_form::axisymmetric_front_constant(n);
  const double log_c = std::log(P * p.rho_g / m.consistency) + (n + 2) * std::log(size);
  const bool walls = planar && p.channel_width > 0;
  auto speed = [&](double x) {
    double u = n / exponent * x * std::exp((log_c - exponent * std::log(x)) / n);
    // Side walls slow the whole layer by the duct factor at its mean depth (planar channel only).
    if (walls) u *= side_wall_flux_factor(size / x / p.channel_width);
    if (std::isfinite(L)) {
      const double ratio = x / L;
      u = ratio >= 1.0 ? 0.0 : u * std::pow(1.0 - std::pow(ratio, k), 1.0 + 1.0 / n);
    }
    return u;
  };
  out.fronts.reserve(times.size());
  if (times.empty()) return out;
  if (L <= L0) {  // the block is already within its plastic-limit extent: no flow in this model
    out.fronts.assign(times.size(), L0);
    return out;
  }
  if (!std::isfinite(L) && !walls) {
    // Separable in closed form: d(x^(e/n))/dt = c^(1/n), so x = (L0^(e/n) + c^(1/n) t)^(n/e).
    const double q = exponent / n;
    for (double t : times) out.fronts.push_back(std::pow(std::pow(L0, q) + std::exp(log_c / n) * t, 1.0 / q));
    return out;
  }
  // Otherwise the arrival time t(x) = integral dx / (U S) is tabulated on a variable in which the integrand grows
  // about exponentially (x = L0 e^s without a yield stress; x = L - (L - L0) e^-s with one, so that s -> infinity
  // is the arrest), integrated exactly for piecewise-exponential samples, and inverted the same way. A
  // quadrature, not an ODE: about 10x cheaper than dopri5 over the observation times, which matters in the global
  // search (thousands of calls); accuracy ~1e-4, far below the model's own distance from the full model.
  const bool yield = std::isfinite(L);
  auto front = [&](double s) { return yield ? L - (L - L0) * std::exp(-s) : L0 * std::exp(s); };
  auto integrand = [&](double s) {  // dt/ds
    const double x = front(s);
    return (yield ? L - x : x) / speed(x);
  };
  const double t_last = *std::max_element(times.begin(), times.end());
  const double rate = yield ? 1.0 + 1.0 / n : exponent / n;  // growth of ln(dt/ds) per unit s, roughly
  const double h = std::min(0.05, 0.2 / rate);
  std::vector<double> grid{0.0}, arrival{0.0}, slope{integrand(0.0)};
  while (arrival.back() < t_last && grid.back() < 60.0) {
    const double s1 = grid.back() + h;
    const double g0 = slope.back(), g1 = integrand(s1);
    if (!std::isfinite(g1) || !(g1 > 0)) break;  // arrested to rounding
    const double segment = std::abs(g1 - g0) > 1e-12 * g0 ? h * (g1 - g0) / std::log(g1 / g0) : h * g0;
    grid.push_back(s1);
    arrival.push_back(arrival.back() + segment);
    slope.push_back(g1);
  }
  std::size_t i = 0;
  for (double t : times) {
    if (t <= 0) {
      out.fronts.push_back(L0);
      continue;
    }
    // Segment holding t (times are non-decreasing in practice; search from the start if not).
    if (i > 0 && arrival[i] > t) i = 0;
    while (i + 1 < arrival.size() && arrival[i + 1] <= t) ++i;
    if (i + 1 >= arrival.size()) {  // beyond the table: arrested, or the table ran to its end
      out.fronts.push_back(front(grid.back()));
      continue;
    }
    const double g0 = slope[i], g1 = slope[i + 1];
    const double beta = std::log(g1 / g0) / h;
    const double dt = t - arrival[i];
    const double ds = std::abs(beta) > 1e-12 ? std::log1p(beta * dt / g0) / beta : dt / g0;
    out.fronts.push_back(front(grid[i] + ds));
  }
  return out;
}

}  // namespace spreadfit
