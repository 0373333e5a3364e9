// Cylinder slump: a cylinder of sample (radius r, height H0) is demoulded and slumps under its own weight until
// the stresses fall to the yield stress. Static, final-state models (no time dependence, no lubrication):
//
//   slump regime (Pashias, Boger, Summers & Glenister 1996, J. Rheol. 40), for H0 about equal to the diameter:
//     s / H0 = 1 - 2 tau' (1 - ln(2 tau')),  tau' = tau_y / (rho g H0),  0 < tau' < 0.5; no slump from tau' = 0.5.
//   spread regime (Roussel & Coussot 2005, J. Rheol. 49), when the sample ends as a thin, wide layer:
//     final radius R = (225 rho g V^2 / (128 pi^2 tau_y))^(1/5), V = pi r^2 H0, plastic profile
//     h(x) = sqrt(2 tau_y (R - x) / (rho g)), centre height h(0) = sqrt(2 tau_y R / (rho g)), slump = H0 - h(0).
//
// Regime choice (ours; see slump.cpp): the sample stops at the first state in which it carries itself, so the
// final height is the larger of the two predictions. Slump regime where Pashias' final height is the larger,
// spread regime where the plastic pancake's centre height is, no flow where either reaches H0. The slump is then
// continuous and non-increasing in the yield stress across the switch (a kink, no jump).
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "models/rheology.hpp"
#include "models/rig.hpp"

namespace spreadfit {

enum class SlumpRegime {
  NoFlow,    ///< the yield stress carries the cylinder: no slump
  Slump,     ///< Pashias et al. (1996)
  Spread,    ///< Roussel & Coussot (2005)
  Unbounded  ///< no yield stress: the sample spreads without bound, slump = H0
};

/// Interface names: no-flow, slump, spread, unbounded.
std::string_view slump_regime_name(SlumpRegime regime);

/// Assumptions behind the validity warnings.
struct SlumpOptions {
  /// Surface tension [N/m] used only to judge when capillarity, which the models ignore, matters. 0.072 N/m is
  /// clean water near room temperature (from memory); sauces and creams with surfactants are lower, so the
  /// capillary length below is an upper estimate.
  double surface_tension = 0.072;
  /// Warn when the final layer is thinner than this many capillary lengths sqrt(surface_tension / (rho g)).
  double capillary_lengths = 3.0;
  /// Warn when H0 / D is outside [1/aspect_band, aspect_band] in the slump and no-flow regimes, which rest on
  /// Pashias et al. (1996), whose cylinders were about as high as wide.
  double aspect_band = 1.5;
  /// Warn in the spread regime when the final radius is under this many centre heights (not thin and wide).
  double thin_layer_ratio = 3.0;
};

struct SlumpPrediction {
  double slump = 0;  ///< H0 minus the final centre height [m], in [0, H0]
  SlumpRegime regime = SlumpRegime::NoFlow;
  std::vector<std::string> warnings;      ///< plain-words remarks on model validity
  double final_height = 0;                ///< final centre height [m]
  double final_radius = 0;                ///< final radius [m] in the spread regime (0: not predicted)
  double dimensionless_yield_stress = 0;  ///< tau' = tau_y / (rho g H0)
};

/// Slump of a cylinder of the material. density [kg/m^3] > 0, gravity [m/s^2] > 0.
/// Throws std::invalid_argument naming the field for an invalid rig (radius, height > 0, finite), material,
/// density, gravity or options.
SlumpPrediction predict_slump(const SlumpRig& rig, const Material& m, double density, double gravity,
                              const SlumpOptions& options = {});

}  // namespace spreadfit
