// Temperature shift of viscosity-like parameters by the Arrhenius law (common practice for foods and cosmetics
// above their melting range, e.g. Steffe, Rheological Methods in Food Process Engineering, 1996 — from memory):
//   K(T) = A exp(E_a / (R T))  =>  K(T_ref) = K(T) exp((E_a / R) (1/T_ref - 1/T)).
// The same form is used for a yield stress when an activation energy is given for it.
#pragma once

namespace spreadfit {

/// Molar gas constant [J/(mol K)] (CODATA 2018, exact).
inline constexpr double molar_gas_constant = 8.314462618;

/// Factor that takes a value measured at T [K] to T_ref [K] for activation energy E_a [J/mol] (1 when E_a = 0).
double arrhenius_factor(double activation_energy, double temperature, double reference_temperature);

}  // namespace spreadfit
