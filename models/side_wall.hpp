// Side-wall drag in a channel: a layer whose depth is not small against the channel width is slowed by the
// walls. Laminar flow in a rectangular duct (the free surface is a symmetry plane, so an open channel of depth h
// is half of a closed duct of height b = 2h): Q = (b^3 W G / 12 mu) [1 - (192 b / (pi^5 W)) sum_{k odd}
// tanh(k pi W / (2 b)) / k^5] (e.g. White, Viscous Fluid Flow, duct flow series, from memory). The planar film
// flux per unit width is G h^3 / (3 mu), so the wall factor is the bracket. Values: 0.873 at h/W = 0.1 and
// 0.747 at h/W = 0.2 (about 0.87 and 0.75, DEVELOPERS.md "Gravity spreading").
// For non-Newtonian materials the same factor is applied as an approximation: exact for Newtonian flow only.
#pragma once

namespace spreadfit {

/// Flux factor f in (0, 1] of an open rectangular channel of width W at depth h (f -> 1 as h/W -> 0).
double side_wall_flux_factor(double depth_over_width);
/// The factor and its derivative in depth/width (from the same C1 interpolant), for analytic Jacobians.
struct SideWallFactor {
  double f = 1.0;
  double df = 0.0;  ///< d f / d (depth/width)
};
SideWallFactor side_wall_flux_factor_with_slope(double depth_over_width);
/// The same from the series itself (the fast version reads a table built from this).
double side_wall_flux_factor_exact(double depth_over_width);

}  // namespace spreadfit
