#include "models/slump.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <numbers>
#include <stdexcept>

#include "models/closed_forms.hpp"
#include "models/input_check.hpp"

// Why the larger final height decides the regime.
// Both relations describe a yielded sample brought to rest by its yield stress, each under its own simplification:
// Pashias et al. (1996) let each horizontal slice yield in uniaxial compression under the weight above it (no
// shear against the base), which suits a column about as high as wide; Roussel & Coussot (2005) balance the
// hydrostatic pressure gradient against the yield stress sheared along the base (h h_x = -tau_y/(rho g)), which
// suits a thin layer. Flow stops as soon as the shape can carry itself, i.e. at the first, higher, of the two rest
// states. For a cylinder with H0 = D (V = pi H0^3 / 4) the two cross at tau' = 0.0564 (R/h(0) = 3.2 there): above
// it Pashias' column is the higher and the pancake would not be thin, below it the pancake is the higher while
// Pashias' relation keeps slumping towards zero height, which a layer sheared against the base cannot reach.
// (At H0 = 2D the crossing is at tau' = 0.024, at H0 = 3D at 0.015; for H0 = D/2 the pancake is always the higher.)
// Taking the maximum makes the slump a continuous, non-increasing function of tau_y, which the fit needs; the tests
// check both properties.

namespace spreadfit {

namespace {

using std::numbers::pi;

std::string fixed(double value, int decimals) {
  std::array<char, 64> buffer{};
  const auto result =
      std::to_chars(buffer.data(), buffer.data() + buffer.size(), value, std::chars_format::fixed, decimals);
  return std::string(buffer.data(), result.ptr);
}

void validate_inputs(const SlumpRig& rig, double density, double gravity, const SlumpOptions& o) {
  if (!std::isfinite(rig.radius) || rig.radius <= 0) reject_input("radius", rig.radius, "a finite value > 0 m");
  if (!std::isfinite(rig.height) || rig.height <= 0) reject_input("height", rig.height, "a finite value > 0 m");
  if (!std::isfinite(density) || density <= 0) reject_input("density", density, "a finite value > 0 kg/m^3");
  if (!std::isfinite(gravity) || gravity <= 0) reject_input("gravity", gravity, "a finite value > 0 m/s^2");
  if (!std::isfinite(o.surface_tension) || o.surface_tension < 0)
    reject_input("surface_tension", o.surface_tension, "a finite value >= 0 N/m");
  if (!std::isfinite(o.capillary_lengths) || o.capillary_lengths < 0)
    reject_input("capillary_lengths", o.capillary_lengths, "a finite value >= 0");
  if (!std::isfinite(o.aspect_band) || o.aspect_band < 1) reject_input("aspect_band", o.aspect_band, "a finite value >= 1");
  if (!std::isfinite(o.thin_layer_ratio) || o.thin_layer_ratio < 0)
    reject_input("thin_layer_ratio", o.thin_layer_ratio, "a finite value >= 0");
}

}  // namespace

std::string_view slump_regime_name(SlumpRegime regime) {
  switch (regime) {
    case SlumpRegime::NoFlow: return "no-flow";
    case SlumpRegime::Slump: return "slump";
    case SlumpRegime::Spread: return "spread";
    case SlumpRegime::Unbounded: return "unbounded";
  }
  return "unknown";
}

SlumpPrediction predict_slump(const SlumpRig& rig, const Material& m, double density, double gravity,
                              const SlumpOptions& options) {
  validate(m);
  validate_inputs(rig, density, gravity, options);
  SlumpPrediction p;
  const double H0 = rig.height;
  const double rho_g = density * gravity;
  const double tau_y = m.yield_stress;
  p.dimensionless_yield_stress = tau_y / (rho_g * H0);

  if (tau_y == 0) {
    // Without a yield stress nothing stops the flow: the layer thins for ever (Huppert 1982 for a Newtonian liquid).
    p.regime = SlumpRegime::Unbounded;
    p.slump = H0;
    p.final_height = 0;
    p.warnings.push_back(
        "the material has no yield stress, so it spreads without bound and the slump is the full cylinder height; "
        "a slump test cannot measure a material without yield stress");
    return p;
  }

  // Pashias et al. (1996): final height H0 (1 - s/H0); H0 itself (no slump) from tau' = 0.5.
  const double pashias_height = H0 * (1 - closed_form::pashias_dimensionless_slump(p.dimensionless_yield_stress));
  // Roussel & Coussot (2005): plastic pancake of the same volume.
  const double volume = pi * rig.radius * rig.radius * H0;
  const double spread_radius = closed_form::axisymmetric_arrest_radius(rho_g, tau_y, volume);
  const double spread_height = std::sqrt(2 * tau_y * spread_radius / rho_g);

  p.final_height = std::min(H0, std::max(pashias_height, spread_height));
  if (p.final_height >= H0) {
    p.regime = SlumpRegime::NoFlow;
  } else if (spread_height > pashias_height) {
    p.regime = SlumpRegime::Spread;
    p.final_radius = spread_radius;
  } else {
    p.regime = SlumpRegime::Slump;
  }
  p.slump = H0 - p.final_height;

  // Validity warnings, in plain words.
  const double aspect = H0 / (2 * rig.radius);
  if (p.regime != SlumpRegime::Spread && (aspect > options.aspect_band || aspect < 1 / options.aspect_band)) {
    p.warnings.push_back("cylinder height " + fixed(aspect, aspect < 0.95 ? 2 : 1) +
                         "x its diameter; the slump relation of Pashias et al. (1996) assumes about 1x");
  }
  if (p.regime == SlumpRegime::Spread && spread_radius < options.thin_layer_ratio * spread_height) {
    p.warnings.push_back("final radius only " + fixed(spread_radius / spread_height, 1) +
                         "x the centre height; the spread relation of Roussel & Coussot (2005) assumes a thin, wide "
                         "layer");
  }
  const double capillary_length = std::sqrt(options.surface_tension / rho_g);
  if (p.regime != SlumpRegime::NoFlow && p.final_height < options.capillary_lengths * capillary_length) {
    p.warnings.push_back("final layer " + fixed(p.final_height * 1e3, 1) + " mm thick, under " +
                         fixed(options.capillary_lengths, 0) + " capillary lengths (" +
                         fixed(capillary_length * 1e3, 1) + " mm for an assumed surface tension of " +
                         fixed(options.surface_tension, 3) +
                         " N/m); surface tension, ignored here, shortens the spread (Roussel, Stefani & Leroy 2005), "
                         "so the yield stress is overestimated");
  }
  return p;
}

}  // namespace spreadfit
