// Published closed-form results for the bench tests: used to verify the numerical models and to give the fit
// its starting point. Each function names its source; SI units throughout.
#pragma once

namespace spreadfit::closed_form {

// --- Gravity currents of constant volume, thin-film limit, no yield stress -----------------------------------
// Power-law fluid (Gratton, Minotti & Mahajan 1999; Di Federico, Malavasi & Cintoli 2006); n = 1 is Huppert (1982).
//   planar:        x_N^(2n+3) = P_p(n) (rho g / K) A^(n+2) t^n,  A = volume per unit width on one side of the wall
//   axisymmetric:  r_N^(3n+5) = P_a(n) (rho g / K) V^(n+2) t^n
// with P_p = [(n+1)/(n+2)] ((2n+3)/(2n+1))^n / J^(n+2),  J = B(1/(n+1), 1 + 1/(n+2)) / (n+1)
//      P_a = [(n+1)/(n+2)] ((3n+5)/(2n+1))^n / (2 pi L)^(n+2),  L = B(2/(n+1), 1 + 1/(n+2)) / (n+1).
double planar_front_constant(double n);        ///< P_p(n)
double axisymmetric_front_constant(double n);  ///< P_a(n)

/// Front of a planar power-law current [m] at time t after release from a point (similarity solution).
double planar_front(double rho_g, double consistency, double n, double area, double t);
/// Radius of an axisymmetric power-law current [m] at time t after release from a point.
double axisymmetric_front(double rho_g, double consistency, double n, double volume, double t);
/// Inverse of planar_front: the time at which the similarity front reaches x.
double planar_front_time(double rho_g, double consistency, double n, double area, double x);
/// Inverse of axisymmetric_front.
double axisymmetric_front_time(double rho_g, double consistency, double n, double volume, double r);

// --- Yield-stress arrest, plastic limit of the thin-film equation (whole sample yielded) ----------------------
// h h_x = -tau_y / (rho g) where yielded, so h = sqrt(2 tau_y (x_f - x) / (rho g)).
/// Planar: tau_y = 9 rho g A^2 / (8 L^3)  =>  L = (9 rho g A^2 / (8 tau_y))^(1/3).
double planar_arrest_length(double rho_g, double yield_stress, double area);
double planar_yield_stress_from_length(double rho_g, double area, double length);
/// Axisymmetric (Roussel & Coussot 2005, J. Rheol. 49): tau_y = 225 rho g V^2 / (128 pi^2 R^5).
double axisymmetric_arrest_radius(double rho_g, double yield_stress, double volume);
double axisymmetric_yield_stress_from_radius(double rho_g, double volume, double radius);

// --- Squeeze flow between parallel plates under a dead load F, constant volume V (Engmann, Servais & Burbidge
// 2005, J. Non-Newt. Fluid Mech. 132). h is the full gap, R = sqrt(V / (pi h)) the disc radius.
/// Stefan's law at constant volume: 1/h^4 - 1/h0^4 = 8 pi F t / (3 mu V^2).
double stefan_gap(double viscosity, double force, double volume, double h0, double t);
/// Scott (1931) power law: F = [2 pi K R^(n+3)/(n+3)] ((2n+1)/n)^n (-dh/dt)^n / h^(2n+1), integrated at constant
/// volume from gap h0 at t = 0.
double scott_gap(double consistency, double n, double force, double volume, double h0, double t);
/// Perfectly plastic limit F = 2 pi tau_y R^3 / (3 h): the gap at which the load is carried by the yield stress.
double squeeze_arrest_gap(double yield_stress, double force, double volume);
/// Its inverse: the yield stress that holds the load at gap h, tau_y = 3 F h^(5/2) / (2 pi (V/pi)^(3/2)).
double squeeze_yield_stress_from_gap(double force, double volume, double gap);

// --- Cylinder slump, slump regime (Pashias, Boger, Summers & Glenister 1996, J. Rheol. 40) ---------------------
/// s / H0 = 1 - 2 tau' (1 - ln(2 tau')), tau' = tau_y / (rho g H0); valid for 0 < tau' < 0.5, zero slump from 0.5.
double pashias_dimensionless_slump(double dimensionless_yield_stress);

}  // namespace spreadfit::closed_form
