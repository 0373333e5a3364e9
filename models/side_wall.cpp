#include "models/side_wall.hpp"

#include <cmath>
#include <numbers>

namespace spreadfit {

namespace {
// Bracket of the duct series for aspect ratio a = short side / long side <= 1: 1 - (192 a/pi^5) sum tanh(k pi/(2a))/k^5.
double duct_bracket(double a) {
  using std::numbers::pi;
  double sum = 0.0;
  for (int k = 1; k <= 41; k += 2) sum += std::tanh(k * pi / (2.0 * a)) / std::pow(k, 5);
  return 1.0 - 192.0 * a / std::pow(pi, 5) * sum;
}
}  // namespace

double side_wall_flux_factor(double h_over_w) {
  if (!(h_over_w > 0)) return 1.0;
  const double b_over_w = 2.0 * h_over_w;
  if (b_over_w <= 1.0) return duct_bracket(b_over_w);
  // Tall duct: swap the roles of the sides, Q = (W^3 b G/12 mu) bracket(W/b); divide by the planar b^3 W G/12 mu.
  const double a = 1.0 / b_over_w;
  return a * a * duct_bracket(a);
}

}  // namespace spreadfit
