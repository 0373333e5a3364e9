// Geometry of the bench tests spreadfit models. All lengths in m, volumes in m^3, forces in N.
#pragma once

#include <array>
#include <optional>
#include <string_view>
#include <variant>

#include "models/rheology.hpp"

namespace spreadfit {

/// Gated channel (trough) of constant width: the sample starts as a block of length reservoir_length behind the
/// gate, against the end wall at x = 0, and flows along the channel when the gate is lifted.
/// The rig's reading is the distance travelled past the gate (front position minus reservoir_length).
struct ChannelRig {
  double width = 0.05;             ///< channel width W [m]
  double reservoir_length = 0.05;  ///< block length L0 behind the gate [m]
  double volume = 1e-4;            ///< sample volume [m^3]; initial height V / (W L0)
  /// Slow the film by the laminar rectangular-duct flux factor (depth not small against the width).
  /// false gives the plain planar thin-film model (per unit width).
  bool side_wall_drag = true;
};

/// Plate (lifted ring): the sample starts as a cylinder of radius ring_radius and spreads axisymmetrically.
/// Reading: radius from the centre (or diameter).
struct PlateRig {
  double ring_radius = 0.03;  ///< R0 [m]
  double volume = 5e-5;       ///< sample volume [m^3]; initial height V / (pi R0^2)
};

/// Parallel-plate squeeze under a dead load: a disc of sample of constant volume between two plates, the upper
/// one pressed by a constant force. Reading: the gap, or the disc's radius or diameter.
struct SqueezeRig {
  double volume = 1e-6;      ///< sample volume [m^3]
  double force = 1.0;        ///< load on the sample [N] (weight of the added mass and the top plate)
  double initial_gap = 0.0;  ///< gap when the load is applied [m]; 0 selects the default (4V/pi)^(1/3)
};

/// Cylinder slump: a cylinder of sample of radius and height H0 is demoulded and slumps under its own weight.
/// Reading: the slump, H0 minus the final height (a static, final-only reading).
struct SlumpRig {
  double radius = 0.05;  ///< cylinder radius [m]
  double height = 0.1;   ///< cylinder height H0 [m]
};

using Rig = std::variant<ChannelRig, PlateRig, SqueezeRig, SlumpRig>;

/// What the rig reads, in the interface's vocabulary: front | radius | diameter | gap | slump.
enum class Reading { Front, Radius, Diameter, Gap, Slump };

/// Everything the forward model needs besides the material.
struct TestSetup {
  Rig rig;
  double density = 1000.0;  ///< sample density [kg/m^3]
  Reading reading = Reading::Front;
  double gravity = standard_gravity;
};

// --- What each rig is, in one place -----------------------------------------------------------------------
// Every per-rig answer below dispatches by std::visit over `overloaded` lambdas, one per rig, with no generic
// branch: a new alternative of Rig is a compile error at each of them (and at every such visit in src/), so the
// compiler lists the sites a new rig must fill (DEVELOPERS.md, "Adding a rig").

/// Visitor made of one lambda per alternative (the std::visit idiom of cppreference's std::visit page).
template <class... Fs>
struct overloaded : Fs... {
  using Fs::operator()...;
};
template <class... Fs>
overloaded(Fs...) -> overloaded<Fs...>;

/// Kind names as in [rig] kind, in the order of the Rig variant: channel, plate, squeeze, slump.
const std::array<std::string_view, std::variant_size_v<Rig>>& rig_kind_names();
/// Kind name of a rig: channel | plate | squeeze | slump.
std::string_view rig_kind_name(const Rig& rig);
/// A rig of that kind with its default sizes; nullopt for a name that is no rig kind.
std::optional<Rig> rig_of_kind(std::string_view kind);
/// The reading a rig gives when none is named: channel front, plate radius, squeeze gap, slump slump.
Reading default_reading(const Rig& rig);
/// Reading kinds a rig accepts (front for a channel; radius or diameter for a plate; gap, radius or diameter for
/// a squeeze; slump for a slump cylinder).
bool rig_accepts_reading(const Rig& rig, Reading reading);
/// Whether the rig's readings form a curve in time (and so a release time can be fitted); a slump is final-only.
bool rig_is_timed(const Rig& rig);
/// The power p of the plastic-limit arrest relation tau_y ~ extent^-p of a spreading layer: 3 for a channel's
/// length, 5 for a plate's radius (models/closed_forms.hpp); nullopt for a rig whose readings do not come to rest
/// as a spread layer (squeeze, slump).
std::optional<double> arrest_extent_exponent(const Rig& rig);
/// The sample volume a rig holds [m^3] (the slump cylinder's from its size, pi R^2 H0).
double fill_volume(const Rig& rig);

}  // namespace spreadfit
