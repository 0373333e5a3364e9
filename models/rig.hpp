// Geometry of the bench tests spreadfit models. All lengths in m, volumes in m^3, forces in N.
#pragma once

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

}  // namespace spreadfit
