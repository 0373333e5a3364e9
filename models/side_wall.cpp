#include "models/side_wall.hpp"

#include <cmath>
#include <numbers>
#include <algorithm>

namespace spreadfit {

namespace {
// Bracket of the duct series for aspect ratio a = short side / long side <= 1: 1 - (192 a/pi^5) sum tanh(k pi/(2a))/k^5
// over odd k. Written as the full sum of 1/k^5 over odd k, (31/32) zeta(5), minus the few terms where tanh is not
// yet 1 to double precision (1 - tanh x = 2/(e^(2x) + 1), negligible once x > 20): this sits in the innermost loop.
double duct_bracket(double a) {
  using std::numbers::pi;
  constexpr double odd_zeta5 = 1.0045237627808830;  // (31/32) zeta(5)
  double sum = odd_zeta5;
  for (int k = 1;; k += 2) {
    const double x = k * pi / (2.0 * a);
    if (x > 20.0) break;
    sum -= 2.0 / (std::exp(2.0 * x) + 1.0) / (double(k) * k * k * k * k);
  }
  constexpr double c = 192.0 / (pi * pi * pi * pi * pi);
  return 1.0 - c * a * sum;
}
}  // namespace

double side_wall_flux_factor_exact(double h_over_w) {
  if (!(h_over_w > 0)) return 1.0;
  const double b_over_w = 2.0 * h_over_w;
  if (b_over_w <= 1.0) return duct_bracket(b_over_w);
  // Tall duct: swap the roles of the sides, Q = (W^3 b G/12 mu) bracket(W/b); divide by the planar b^3 W G/12 mu.
  const double a = 1.0 / b_over_w;
  return a * a * duct_bracket(a);
}

}  // namespace spreadfit

namespace spreadfit {

// The factor sits in the innermost loop of every channel solve (one call per node per right-hand side), so it is
// tabulated once on depth/width in [0, SideWallTable::end] and read by cubic Hermite interpolation (C1, so the
// predicted reading stays smooth in the parameters); interpolation error < 1e-8 (checked in the tests). The node
// derivatives are central differences of the series.
SideWallTable::SideWallTable() {
  for (int i = 0; i < size; ++i) {
    const double x = i * step, e = 1e-6;
    const double f = side_wall_flux_factor_exact(x);
    const double df = i == 0 ? (side_wall_flux_factor_exact(e) - f) / e
                             : (side_wall_flux_factor_exact(x + e) - side_wall_flux_factor_exact(x - e)) / (2 * e);
    node_[i] = {f, step * df};
  }
}

SideWallFactor SideWallTable::factor_with_slope(double r) const {
  SideWallFactor out;
  if (!(r > 0)) return out;
  if (r >= end) {
    const double e = 1e-6 * r;
    out.f = side_wall_flux_factor_exact(r);
    out.df = (side_wall_flux_factor_exact(r + e) - side_wall_flux_factor_exact(r - e)) / (2 * e);
    return out;
  }
  const Node* k = at(r);
  const double t = r * inv_step - double(k - node_);
  const double t2 = t * t, t3 = t2 * t;
  out.f = (2 * t3 - 3 * t2 + 1) * k[0].f + (t3 - 2 * t2 + t) * k[0].hdf + (-2 * t3 + 3 * t2) * k[1].f +
          (t3 - t2) * k[1].hdf;
  // d/d(depth/width) = (d/dt) / step.
  out.df = ((6 * t2 - 6 * t) * k[0].f + (3 * t2 - 4 * t + 1) * k[0].hdf + (-6 * t2 + 6 * t) * k[1].f +
            (3 * t2 - 2 * t) * k[1].hdf) *
           inv_step;
  return out;
}

const SideWallTable& side_wall_table() {
  static const SideWallTable t;
  return t;
}

double side_wall_flux_factor(double h_over_w) { return side_wall_table().factor(h_over_w); }

SideWallFactor side_wall_flux_factor_with_slope(double h_over_w) {
  return side_wall_table().factor_with_slope(h_over_w);
}

}  // namespace spreadfit
