#include "models/side_wall.hpp"

#include <cmath>
#include <numbers>
#include <vector>
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

namespace {
// The factor sits in the innermost loop of every channel solve (one call per node per right-hand side), so it is
// tabulated once on depth/width in [0, table_end] and read by cubic Hermite interpolation (C1, so the predicted
// reading stays smooth in the parameters); interpolation error < 1e-8 (checked in the tests).
constexpr int table_size = 4097;
constexpr double table_end = 4.0;
struct Table {
  double step = table_end / (table_size - 1);
  std::vector<double> f, df;
  Table() : f(table_size), df(table_size) {
    for (int i = 0; i < table_size; ++i) {
      const double x = i * step, e = 1e-6;
      f[i] = side_wall_flux_factor_exact(x);
      df[i] = i == 0 ? (side_wall_flux_factor_exact(e) - f[0]) / e
                     : (side_wall_flux_factor_exact(x + e) - side_wall_flux_factor_exact(x - e)) / (2 * e);
    }
  }
};

const Table& table() {
  static const Table t;
  return t;
}
}  // namespace

double side_wall_flux_factor(double h_over_w) {
  if (!(h_over_w > 0)) return 1.0;
  if (h_over_w >= table_end) return side_wall_flux_factor_exact(h_over_w);
  const Table& tab = table();
  const double u = h_over_w / tab.step;
  const int i = std::min(int(u), table_size - 2);
  const double t = u - i, h = tab.step;
  const double t2 = t * t, t3 = t2 * t;
  return (2 * t3 - 3 * t2 + 1) * tab.f[i] + (t3 - 2 * t2 + t) * h * tab.df[i] + (-2 * t3 + 3 * t2) * tab.f[i + 1] +
         (t3 - t2) * h * tab.df[i + 1];
}

SideWallFactor side_wall_flux_factor_with_slope(double h_over_w) {
  SideWallFactor out;
  if (!(h_over_w > 0)) return out;
  if (h_over_w >= table_end) {
    const double e = 1e-6 * h_over_w;
    out.f = side_wall_flux_factor_exact(h_over_w);
    out.df = (side_wall_flux_factor_exact(h_over_w + e) - side_wall_flux_factor_exact(h_over_w - e)) / (2 * e);
    return out;
  }
  const Table& tab = table();
  const double u = h_over_w / tab.step;
  const int i = std::min(int(u), table_size - 2);
  const double t = u - i, h = tab.step;
  const double t2 = t * t, t3 = t2 * t;
  out.f = (2 * t3 - 3 * t2 + 1) * tab.f[i] + (t3 - 2 * t2 + t) * h * tab.df[i] + (-2 * t3 + 3 * t2) * tab.f[i + 1] +
          (t3 - t2) * h * tab.df[i + 1];
  // d/d(depth/width) = (d/dt) / step.
  out.df = ((6 * t2 - 6 * t) * tab.f[i] + (3 * t2 - 4 * t + 1) * h * tab.df[i] + (-6 * t2 + 6 * t) * tab.f[i + 1] +
            (3 * t2 - 2 * t) * h * tab.df[i + 1]) /
           h;
  return out;
}

}  // namespace spreadfit
