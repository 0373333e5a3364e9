#include "models/closed_forms.hpp"

#include <boost/math/special_functions/beta.hpp>
#include <cmath>
#include <numbers>

namespace spreadfit::closed_form {

using std::numbers::pi;

double planar_front_constant(double n) {
  const double J = boost::math::beta(1.0 / (n + 1.0), 1.0 + 1.0 / (n + 2.0)) / (n + 1.0);
  return (n + 1.0) / (n + 2.0) * std::pow((2 * n + 3.0) / (2 * n + 1.0), n) / std::pow(J, n + 2.0);
}

double axisymmetric_front_constant(double n) {
  const double L = boost::math::beta(2.0 / (n + 1.0), 1.0 + 1.0 / (n + 2.0)) / (n + 1.0);
  return (n + 1.0) / (n + 2.0) * std::pow((3 * n + 5.0) / (2 * n + 1.0), n) / std::pow(2 * pi * L, n + 2.0);
}

double planar_front(double rho_g, double K, double n, double A, double t) {
  return std::pow(planar_front_constant(n) * rho_g / K * std::pow(A, n + 2) * std::pow(t, n), 1.0 / (2 * n + 3));
}

double axisymmetric_front(double rho_g, double K, double n, double V, double t) {
  return std::pow(axisymmetric_front_constant(n) * rho_g / K * std::pow(V, n + 2) * std::pow(t, n),
                  1.0 / (3 * n + 5));
}

double planar_front_time(double rho_g, double K, double n, double A, double x) {
  return std::pow(std::pow(x, 2 * n + 3) / (planar_front_constant(n) * rho_g / K * std::pow(A, n + 2)), 1.0 / n);
}

double axisymmetric_front_time(double rho_g, double K, double n, double V, double r) {
  return std::pow(std::pow(r, 3 * n + 5) / (axisymmetric_front_constant(n) * rho_g / K * std::pow(V, n + 2)),
                  1.0 / n);
}

double planar_arrest_length(double rho_g, double tau_y, double A) {
  return std::cbrt(9.0 * rho_g * A * A / (8.0 * tau_y));
}

double planar_yield_stress_from_length(double rho_g, double A, double L) { return 9.0 * rho_g * A * A / (8.0 * L * L * L); }

double axisymmetric_arrest_radius(double rho_g, double tau_y, double V) {
  return std::pow(225.0 * rho_g * V * V / (128.0 * pi * pi * tau_y), 0.2);
}

double axisymmetric_yield_stress_from_radius(double rho_g, double V, double R) {
  return 225.0 * rho_g * V * V / (128.0 * pi * pi * std::pow(R, 5));
}

double stefan_gap(double mu, double F, double V, double h0, double t) {
  const double inv_h4 = 1.0 / std::pow(h0, 4) + 8.0 * pi * F * t / (3.0 * mu * V * V);
  return std::pow(inv_h4, -0.25);
}

double scott_gap(double K, double n, double F, double V, double h0, double t) {
  // With R^2 = V/(pi h): F = c h^-(2n+1) h^-((n+3)/2) (-dh/dt)^n, c = 2 pi K (V/pi)^((n+3)/2) / (n+3) ((2n+1)/n)^n.
  // So -dh/dt = (F/c)^(1/n) h^m with m = (5n+5)/(2n); integrating, h^(1-m) - h0^(1-m) = (m-1) (F/c)^(1/n) t.
  const double c = 2 * pi * K * std::pow(V / pi, (n + 3) / 2) / (n + 3) * std::pow((2 * n + 1) / n, n);
  const double m = (5 * n + 5) / (2 * n);
  const double rhs = std::pow(h0, 1 - m) + (m - 1) * std::pow(F / c, 1 / n) * t;
  return std::pow(rhs, 1.0 / (1 - m));
}

double squeeze_arrest_gap(double tau_y, double F, double V) {
  // F = 2 pi tau_y R^3 / (3 h) with R^3 = (V/pi)^(3/2) h^(-3/2)  =>  h^(5/2) = 2 pi tau_y (V/pi)^(3/2) / (3 F).
  return std::pow(2 * pi * tau_y * std::pow(V / pi, 1.5) / (3 * F), 0.4);
}

double squeeze_yield_stress_from_gap(double F, double V, double h) {
  // The inverse of squeeze_arrest_gap: tau_y = 3 F h / (2 pi R^3) with R^3 = (V/(pi h))^(3/2), so
  // tau_y = 3 F h^(5/2) / (2 pi (V/pi)^(3/2)).
  return 3.0 * F * std::pow(h, 2.5) / (2.0 * pi * std::pow(V / pi, 1.5));
}

double pashias_dimensionless_slump(double tau) {
  if (tau >= 0.5) return 0.0;
  if (tau <= 0) return 1.0;
  return 1.0 - 2.0 * tau * (1.0 - std::log(2.0 * tau));
}

}  // namespace spreadfit::closed_form
