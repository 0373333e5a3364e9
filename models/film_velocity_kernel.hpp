// The depth-averaged film velocity u = q/h of a Herschel-Bulkley layer and its derivatives (models/rheology.hpp,
// film_flux and film_velocity_with_derivatives: Liu & Mei 1989; Balmforth et al. 2006, HB form), with the constants
// that depend on the material alone (1/K, 1/n, n/(n+1), n/(2n+1), 1 + 1/n) worked out once. The thin-film right-hand side
// calls it once per node per evaluation, so it is inline; rheology.cpp's film_velocity and
// film_velocity_with_derivatives are this kernel, so there is one formula.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>

#include "models/batch_power.hpp"
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
    const double Y = yielded_depth(G, h);
    return velocity(h, Y, power(power_argument(G, Y)));
  }

  /// u with du/dG and du/dh (the chain rule of film_velocity_with_derivatives in rheology.hpp).
  FilmVelocity with_derivatives(double G, double h) const {
    const double Y = yielded_depth(G, h);
    return with_derivatives(G, h, Y, power(power_argument(G, Y)));
  }

  // The same in three passes, for many nodes at once (the thin-film right-hand side): Y and the power's argument
  // per node, then all the powers P = (G Y / K)^(1/n) together (`powers`: vectorised, models/batch_power.hpp), then
  // the velocities from P. One formula either way: the scalar forms above are these passes for one node.

  /// Y = h - tau_y/G, the depth of the yielded layer [m]; <= 0 where it does not flow (also for G <= 0 or h <= 0).
  double yielded_depth(double G, double h) const {
    if (!(G > 0) || !(h > 0)) return 0.0;
    return h - tau_ / G;
  }
  /// The number whose 1/n-th power the velocity needs, G Y / K where the layer yields; 1 elsewhere (any positive
  /// number: the velocity there is 0 whatever the power).
  double power_argument(double G, double Y) const { return Y > 0 ? G * Y * inverse_K_ : 1.0; }
  /// P[i] = argument[i]^(1/n) (argument and P may be the same array).
  void powers(const double* argument, double* P, std::size_t count) const {
    if (unit_exponent_) {
      if (P != argument) std::copy(argument, argument + count, P);
      return;
    }
    positive_powers(argument, inverse_n_, P, count);
  }
  /// u from the yielded depth and P: n/(n+1) Y P (h - aY) / h, the film flux of rheology.hpp over h.
  double velocity(double h, double Y, double P) const { return Y > 0 ? c_ * Y * P * (h - a_ * Y) / h : 0.0; }
  /// u, du/dG and du/dh from G, h, the yielded depth and P.
  FilmVelocity with_derivatives(double G, double h, double Y, double P) const {
    FilmVelocity out;
    if (!(h > 0)) return out;
    if (!(G > 0)) {
      // u = (G/K)^(1/n) h^(1/n+1) n/(2n+1) without a yield stress: linear in G only for n = 1.
      if (newtonian_) out.du_dG = h * h / (3.0 * K_);
      return out;
    }
    if (Y <= 0) return out;
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
  // x^(1/n) for one node, as exp(log(x)/n): agrees with std::pow to ~1e-15 here and costs about a quarter less.
  double power(double x) const { return unit_exponent_ ? x : std::exp(std::log(x) * inverse_n_); }

  double tau_, K_, n_, inverse_K_, inverse_n_, c_, a_, one_plus_inv_n_;
  bool unit_exponent_, newtonian_;
};

}  // namespace spreadfit
