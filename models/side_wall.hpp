// Side-wall drag in a channel: a layer whose depth is not small against the channel width is slowed by the
// walls. Laminar flow in a rectangular duct (the free surface is a symmetry plane, so an open channel of depth h
// is half of a closed duct of height b = 2h): Q = (b^3 W G / 12 mu) [1 - (192 b / (pi^5 W)) sum_{k odd}
// tanh(k pi W / (2 b)) / k^5] (e.g. White, Viscous Fluid Flow, duct flow series, from memory). The planar film
// flux per unit width is G h^3 / (3 mu), so the wall factor is the bracket. Values: 0.873 at h/W = 0.1 and
// 0.747 at h/W = 0.2 (about 0.87 and 0.75, DEVELOPERS.md "Gravity spreading").
// For non-Newtonian materials the same factor is applied as an approximation: exact for Newtonian flow only.
#pragma once

#include <algorithm>

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

/// The tabulated factor the two fast functions above read, for callers in an inner loop (the thin-film right-hand
/// side: one call per node per evaluation): fetch it once with side_wall_table() and call its inline members, which
/// give what side_wall_flux_factor and side_wall_flux_factor_with_slope give (the same cubic Hermite interpolant,
/// C1, so predicted readings stay smooth in the parameters; interpolation error < 1e-8, checked in the tests).
class SideWallTable {
 public:
  static constexpr int size = 4097;      ///< nodes on depth/width in [0, end]
  static constexpr double end = 4.0;     ///< beyond it the series is summed directly
  static constexpr double step = end / (size - 1);

  SideWallTable();
  /// Factor at depth/width r.
  double factor(double r) const {
    if (!(r > 0)) return 1.0;
    if (r >= end) return side_wall_flux_factor_exact(r);
    const Node* k = at(r);
    const double t = r * inv_step - double(k - node_);
    // Cubic Hermite basis on [0, 1], f and step * f' at both ends.
    const double t2 = t * t, t3 = t2 * t;
    return (2 * t3 - 3 * t2 + 1) * k[0].f + (t3 - 2 * t2 + t) * k[0].hdf + (-2 * t3 + 3 * t2) * k[1].f +
           (t3 - t2) * k[1].hdf;
  }
  /// Factor and its derivative in depth/width at r.
  SideWallFactor factor_with_slope(double r) const;

 private:
  struct Node {
    double f;    // factor at the node
    double hdf;  // step times its derivative there
  };
  static constexpr double inv_step = (size - 1) / end;
  const Node* at(double r) const { return node_ + std::min(int(r * inv_step), size - 2); }
  Node node_[size];
};
const SideWallTable& side_wall_table();

}  // namespace spreadfit
