// The depth-averaged film velocity u = q/h of a Herschel-Bulkley layer and its derivatives (models/rheology.hpp,
// film_flux and film_velocity_with_derivatives: Liu & Mei 1989; Balmforth et al. 2006, HB form), with the constants
// that depend on the material alone (1/K, 1/n, n/(n+1), n/(2n+1), 1 + 1/n) worked out once. The thin-film right-hand side
// calls it once per node per evaluation, so it is inline; rheology.cpp's film_velocity and
// film_velocity_with_derivatives are this kernel, so there is one formula.
#pragma once

#include <cmath>

#include "models/rheology.hpp"

namespace spreadfit {

class FilmVelocityKernel {
 public:
  // rheology.cpp's film_flux written with the material's constants worked out once; divisions by them are
  // multiplications by their inverses (equal to rounding, about 1e-16 relative).
  explicit FilmVelocityKernel(const Material& m)
      : tau_(m.yield_stress),
        K_(m.consistency),
        n_(m.flow_index),
        inverse_K_(1.0 / m.consistency),
        inverse_n_(1.0 / m.flow_index),
        c_(n_ / (n_ + 1.0)),
        a_(n_ / (2.0 * n_ + 1.0)),
        one_plus_inv_n_(1.0 + 1.0 / n_),
        unit_exponent_(n_ == 1.0),
        newtonian_(tau_ == 0.0 && n_ == 1.0) {}

  /// u = q/h [m/s] at stress gradient G [Pa/m] and depth h [m]; 0 where the layer does not yield.
  double velocity(double G, double h) const {
    if (!(G > 0) || !(h > 0)) return 0.0;
    const double Y = h - tau_ / G;
    if (Y <= 0) return 0.0;
    if (unit_exponent_) return 0.5 * (G * inverse_K_) * Y * Y * (h - Y / 3.0) / h;
    // (G/K)^(1/n) Y^(1+1/n) = Y (G Y / K)^(1/n): one power instead of two, and as exp(log(x)/n), which agrees with
    // std::pow to ~1e-15 here and costs about a quarter less. Divisions by material constants are multiplications
    // by their inverses (a division costs several multiplications).
    return c_ * Y * std::exp(std::log(G * Y * inverse_K_) * inverse_n_) * (h - a_ * Y) / h;
  }

  /// u with du/dG and du/dh (the chain rule of film_velocity_with_derivatives in rheology.hpp).
  FilmVelocity with_derivatives(double G, double h) const {
    FilmVelocity out;
    if (!(h > 0)) return out;
    if (!(G > 0)) {
      // u = (G/K)^(1/n) h^(1/n+1) n/(2n+1) without a yield stress: linear in G only for n = 1.
      if (newtonian_) out.du_dG = h * h / (3.0 * K_);
      return out;
    }
    const double Y = h - tau_ / G;
    if (Y <= 0) return out;
    const double P = unit_exponent_ ? G * Y * inverse_K_ : std::exp(std::log(G * Y * inverse_K_) * inverse_n_);
    const double rest = h - a_ * Y;
    const double q = c_ * Y * P * rest;
    const double dq_dY = c_ * P * (one_plus_inv_n_ * rest - a_ * Y);
    const double dq_dh = dq_dY + c_ * Y * P;
    const double inverse_G = 1.0 / G, inverse_h = 1.0 / h;
    const double dq_dG = (dq_dY * tau_ * inverse_G + q * inverse_n_) * inverse_G;
    out.u = q * inverse_h;
    out.du_dh = (dq_dh - out.u) * inverse_h;
    out.du_dG = dq_dG * inverse_h;
    return out;
  }

 private:
  double tau_, K_, n_, inverse_K_, inverse_n_, c_, a_, one_plus_inv_n_;
  bool unit_exponent_, newtonian_;
};

}  // namespace spreadfit
