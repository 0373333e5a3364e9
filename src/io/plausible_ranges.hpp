// Plausible ranges of the quantities a bench test is described with, so that a unit slip or a typing slip is
// caught at the input instead of passing through the fit as a number.
//
// Each quantity has two ranges, both in SI units:
//   possible   [refuse_below, refuse_above]: outside it the value cannot describe a bench test of a sauce or
//              cream (a 1e-30 m channel, a 100 m^3 sample, a reading taken a month after the release); refused,
//              exit 2 (io::InputError from the reader).
//   usual      [warn_below, warn_above]: outside it the value is possible but unusual; the reader keeps it and
//              adds a warning that names the file, line and field ("check the unit").
// The limits are wide on purpose: they bound bench rigs, not products. Unless a source is named beside a limit
// it is common practice, no source.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace spreadfit::io {

struct PlausibleRange {
  std::string_view what;  ///< "channel width", as messages name it
  std::string_view unit;  ///< SI unit symbol the limits are in
  double refuse_below;    ///< values below are impossible (a value equal to it is allowed)
  double warn_below;      ///< values below are unusual
  double warn_above;      ///< values above are unusual
  double refuse_above;    ///< values above are impossible
};

namespace plausible {
// Rig sizes [m]. Bench channels, rings and cylinders are a few cm to tens of cm.
inline constexpr PlausibleRange channel_width{"channel width", "m", 1e-3, 1e-2, 0.5, 2.0};
inline constexpr PlausibleRange reservoir_length{"reservoir length", "m", 1e-3, 1e-2, 0.5, 2.0};
inline constexpr PlausibleRange ring_radius{"ring radius", "m", 1e-3, 5e-3, 0.2, 1.0};
inline constexpr PlausibleRange cylinder_radius{"cylinder radius", "m", 1e-3, 5e-3, 0.2, 1.0};
inline constexpr PlausibleRange cylinder_height{"cylinder height", "m", 1e-3, 1e-2, 0.5, 2.0};
inline constexpr PlausibleRange fill_height{"fill height", "m", 1e-4, 2e-3, 0.2, 1.0};
inline constexpr PlausibleRange initial_gap{"initial gap", "m", 1e-5, 5e-4, 0.1, 0.5};
// Sample volume [m^3]: 1 uL to 100 L possible, 0.1 mL to 5 L usual.
inline constexpr PlausibleRange sample_volume{"sample volume", "m3", 1e-9, 1e-7, 5e-3, 0.1};
// Squeeze load [N]: 0.1 mN (10 mg) to 100 kN possible; 10 mN (1 g) to 500 N (about 50 kg) usual.
inline constexpr PlausibleRange squeeze_force{"squeeze load", "N", 1e-4, 1e-2, 500.0, 1e5};
// Reading resolution [m]: 0.1 um to 5 cm possible; 1 um (an image of a few um per pixel) to 5 mm usual.
inline constexpr PlausibleRange resolution{"reading resolution", "m", 1e-7, 1e-6, 5e-3, 5e-2};
// A spread reading [m]: at most 10 m possible, above 1 m unusual (a bench rig is under a metre across).
inline constexpr PlausibleRange spread_reading{"reading", "m", 0.0, 0.0, 1.0, 10.0};
// Reading times [s] since the clock's zero: at most one day possible; above one hour unusual (gravity spread
// tests are read over seconds to minutes; the longest plate tests run some tens of minutes).
inline constexpr PlausibleRange reading_time{"reading time", "s", 0.0, 0.0, 3600.0, 86400.0};
// Arrhenius activation energy of viscosity or yield stress [J/mol]. Fluid foods lie at about 5 to 70 kJ/mol
// (Steffe, Rheological Methods in Food Process Engineering, 2nd ed. 1996, ch. 1, tables of E_a; from memory);
// water's viscosity about 16 kJ/mol near 20 degC (from memory). Above 150 kJ/mol is unusual, above 500 kJ/mol the
// factor over 10 K exceeds 1e3 and no fluid food does that.
inline constexpr PlausibleRange activation_energy{"activation energy", "J/mol", 0.0, 0.0, 1.5e5, 5e5};
// Material parameters (simulate, plan, translate). Water is 1e-3 Pa.s, honey about 10 Pa.s, pastes 1e3-1e4 Pa.s
// (from memory); 1e-5 Pa.s is a gas.
inline constexpr PlausibleRange viscosity{"viscosity", "Pa.s", 1e-5, 1e-3, 1e5, 1e7};
inline constexpr PlausibleRange consistency{"consistency", "Pa.s^n", 1e-5, 1e-3, 1e5, 1e7};
// Yield stresses of sauces, creams and pastes are 0 to a few hundred Pa, stiff pastes a few kPa (from memory).
inline constexpr PlausibleRange yield_stress{"yield stress", "Pa", 0.0, 0.0, 5e3, 1e5};
// Flow index: shear-thinning foods 0.1-1, a few dilatant suspensions up to about 1.5 (from memory); the law takes
// (0, 2] (models/rheology.hpp validate).
inline constexpr PlausibleRange flow_index{"flow index", "-", 0.02, 0.1, 1.5, 2.0};
}  // namespace plausible

/// Checks `si_value` against `range`. Throws UnitError when it is outside the possible range:
///   '1e-30 m' is impossible for a channel width (expected 0.001 m to 2 m)
/// Returns a warning when it is outside the usual range, nullopt when it is inside:
///   '3 m' is unusual for a channel width (usually 0.01 m to 0.5 m): check the unit
/// `as_written` is echoed (shortened when long).
std::optional<std::string> check_plausible(double si_value, const PlausibleRange& range, std::string_view as_written);

}  // namespace spreadfit::io
