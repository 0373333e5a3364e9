// Constitutive laws for gravity-driven bench tests and the thin-film flux they imply.
//
// Herschel-Bulkley (1926): tau = tau_y + K * gammadot^n above the yield stress, rigid below.
// The other laws are special cases, kept as names because the trade reports them that way:
//   Newtonian   tau_y = 0, n = 1, K = viscosity [Pa s]
//   power law   tau_y = 0                    (Ostwald-de Waele; K [Pa s^n], n [-])
//   Bingham     n = 1, K = plastic viscosity [Pa s]
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace spreadfit {

enum class Law { Newtonian, PowerLaw, Bingham, HerschelBulkley };

/// Parameters of a Herschel-Bulkley material in SI units. Every law is expressed in this one struct.
struct Material {
  double yield_stress = 0.0;  ///< tau_y [Pa], >= 0
  double consistency = 1.0;   ///< K [Pa s^n] (the viscosity when n = 1), > 0
  double flow_index = 1.0;    ///< n [-], in (0, 2]
};

/// Standard gravity [m/s^2] (CGPM 1901 conventional value).
inline constexpr double standard_gravity = 9.80665;

/// Interface names of the laws: newtonian, power-law, bingham, herschel-bulkley.
std::string_view law_name(Law law);
std::optional<Law> law_from_name(std::string_view name);
/// All laws, simplest first (the order model selection prefers on ties).
const std::vector<Law>& all_laws();

/// Names of the parameters a law has, in the interface's vocabulary
/// (viscosity, yield_stress, consistency, flow_index).
std::vector<std::string> law_parameter_names(Law law);
/// True when the law has the parameter (by interface name).
bool law_has_parameter(Law law, std::string_view name);

/// Throws std::invalid_argument naming the field and the violated range.
void validate(const Material& m);

/// Film flux per unit width [m^2/s] of a layer of depth h [m] on a no-slip base under a driving stress gradient
/// G = rho g |h_x| [Pa/m] (Liu & Mei 1989; Balmforth et al. 2006, HB form):
///   Y = h - tau_y / G (height of the sheared layer; the plug rides above it),
///   q = 0 if Y <= 0, else q = n/(n+1) (G/K)^(1/n) Y^(1+1/n) (h - n Y/(2n+1)).
/// Continuous, and continuously differentiable, at the yield point Y = 0. Returns q >= 0; the caller gives the sign.
double film_flux(const Material& m, double stress_gradient, double h);

/// Depth-averaged velocity q/h [m/s] of the same layer (0 where it does not yield).
double film_velocity(const Material& m, double stress_gradient, double h);

/// The depth-averaged velocity and its two partial derivatives, for an analytic Jacobian of the thin-film system.
struct FilmVelocity {
  double u = 0.0;      ///< q/h [m/s]
  double du_dG = 0.0;  ///< d u / d G at fixed h [m^2/(Pa s)]
  double du_dh = 0.0;  ///< d u / d h at fixed G [1/s]
};

/// u = q/h with its derivatives, from the flux above by the chain rule through Y = h - tau_y/G:
///   dq/dY = n/(n+1) P [(1 + 1/n)(h - aY) - aY],  P = (G Y/K)^(1/n),  a = n/(2n+1),
///   dq/dh = dq/dY + n/(n+1) Y P,   dq/dG = dq/dY tau_y/G^2 + q/(n G).
/// All three are 0 where the layer does not yield (the flux is C1 there). At G = 0 the derivative in G is its limit:
/// h^2/(3K) for a Newtonian layer, 0 for n < 1 or a yield stress, and 0 (in place of +infinity) for n > 1.
FilmVelocity film_velocity_with_derivatives(const Material& m, double stress_gradient, double h);

}  // namespace spreadfit
