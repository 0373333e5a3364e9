// Contours of a function sampled on a rectilinear grid, by marching squares (the 2-D form of Lorensen & Cline
// 1987, "Marching cubes", Computer Graphics 21(4)): each grid cell whose four corner values straddle the level gets
// one or two straight segments between points on its edges, each point found by linear interpolation of the two
// values at the ends of its edge. For a field that is linear along the cell edges (a plane, a bilinear function)
// every point lies exactly on the true contour; for a smooth field the error is O(h^2) in the grid spacing h.
//
// Grid convention used by every function here: x ascending (size nx >= 2), y ascending (size ny >= 2), and
// z[j][i] the value at (x[i], y[j]); non-finite values (NaN where a model failed) are allowed, and every cell with
// a non-finite corner is skipped. Points come out in the coordinates x and y are given in: to interpolate along a
// logarithmic axis, pass the logarithms of the grid values.
//
// Corner classification: a corner is "above" a level when its value is >= the level. Saddle cells (two diagonally
// opposite corners above, the other two below) are resolved by the cell-centre average m = (z0+z1+z2+z3)/4: when
// m >= level the two above corners are joined through the centre, so the segments cut off the two below corners;
// otherwise they cut off the two above corners. (The centre average is one of the classic rules; Nielson & Hamann
// 1991, IEEE Visualization '91, compare it with the asymptotic decider, from memory.) The same rule decides the
// filled bands, so shading and contour lines agree cell by cell.
#pragma once

#include <utility>
#include <vector>

namespace spreadfit::report::contour {

struct Point {
  double x = 0, y = 0;
  friend bool operator==(const Point&, const Point&) = default;
};

/// A straight piece of a contour inside one grid cell.
struct Segment {
  Point a, b;
};

/// Segments of the contour z = level, in no particular order or orientation. Every point on a grid edge is
/// computed from that edge's two ends in one fixed order, so the two cells sharing an edge produce bit-identical
/// points (chain() relies on it). Segments of zero length (a contour touching a corner) are left out. Throws
/// std::invalid_argument when the grid breaks the convention above (sizes, ascending coordinates) or the level is
/// not finite.
std::vector<Segment> segments(const std::vector<double>& x, const std::vector<double>& y,
                              const std::vector<std::vector<double>>& z, double level);

/// A chain of segments: consecutive points are joined; a closed chain also joins the last point to the first
/// (which is not repeated).
struct Polyline {
  std::vector<Point> points;
  bool closed = false;
};

/// Joins segments that share end points (exact equality, as segments() produces) into as few polylines as a
/// greedy walk finds: open chains start at an end used by one segment only, then the remaining segments form
/// closed loops. Where more than two segments meet (a contour through a grid corner) the walk takes any unused
/// one. Every segment is used exactly once.
std::vector<Polyline> chain(const std::vector<Segment>& pieces);

/// A polygon, vertices in order (not repeated at the end).
using Polygon = std::vector<Point>;

/// The region low <= z <= high as convex polygons, at most four a grid cell, following the same edge points and
/// saddle rule as segments(): the polygons' edges inside the cells are exactly the level-low and level-high
/// contour segments. Cells with a non-finite corner are skipped. Throws std::invalid_argument for a bad grid, or
/// when the limits are not finite or low > high.
std::vector<Polygon> band(const std::vector<double>& x, const std::vector<double>& y,
                          const std::vector<std::vector<double>>& z, double low, double high);

/// Area of a simple polygon (shoelace formula), positive when its vertices run anticlockwise.
double signed_area(const Polygon& polygon);

/// Smallest and largest finite value of z; {NaN, NaN} when none is finite.
std::pair<double, double> finite_range(const std::vector<std::vector<double>>& z);

/// Round contour levels: all multiples of one step (1, 2 or 5 times a power of ten) strictly between lo and hi,
/// the step chosen to give the count nearest to `target` (ties to the coarser step). Empty when lo and hi are not
/// finite or lo >= hi. `target` is clamped to 2..20.
std::vector<double> round_levels(double lo, double hi, int target = 7);

}  // namespace spreadfit::report::contour
