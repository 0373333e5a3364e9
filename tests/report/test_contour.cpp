// Marching squares (src/report/contour.hpp) against closed forms: the straight contour of a plane, the circle of
// z = x^2 + y^2 with its O(h^2) convergence, the hyperbolae of the bilinear saddle z = x y, and the areas of bands
// between two levels (triangles of a plane, an annulus of the paraboloid).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <numbers>
#include <stdexcept>
#include <vector>

#include "src/report/contour.hpp"

using namespace spreadfit;
using report::contour::Point;
using std::numbers::pi;

namespace {

struct Grid {
  std::vector<double> x, y;
  std::vector<std::vector<double>> z;
};

// An uneven but ascending grid on [lo, hi] with `cells` cells: spacing varies by up to +/-30 % from node to node.
std::vector<double> uneven(double lo, double hi, int cells) {
  std::vector<double> v;
  for (int k = 0; k <= cells; ++k) {
    const double s = double(k) / cells;
    v.push_back(lo + (hi - lo) * (s + 0.3 / (2 * pi * cells) * std::sin(2 * pi * s * cells / 3.0)));
  }
  return v;
}

std::vector<double> even(double lo, double hi, int cells) {
  std::vector<double> v;
  for (int k = 0; k <= cells; ++k) v.push_back(lo + (hi - lo) * k / cells);
  return v;
}

Grid sample(std::vector<double> x, std::vector<double> y, const std::function<double(double, double)>& f) {
  Grid g{std::move(x), std::move(y), {}};
  for (double yj : g.y) {
    g.z.emplace_back();
    for (double xi : g.x) g.z.back().push_back(f(xi, yj));
  }
  return g;
}

double length(const std::vector<report::contour::Segment>& s) {
  double total = 0;
  for (const auto& p : s) total += std::hypot(p.b.x - p.a.x, p.b.y - p.a.y);
  return total;
}

double area(const std::vector<report::contour::Polygon>& polygons) {
  double total = 0;
  for (const auto& p : polygons) total += report::contour::signed_area(p);
  return total;
}

// Largest |r - radius| over the segments' ends and middles (the middle is where a chord strays most from its arc).
double radial_error(const std::vector<report::contour::Segment>& segments, double radius) {
  double worst = 0;
  for (const auto& s : segments)
    for (Point p : {s.a, s.b, Point{0.5 * (s.a.x + s.b.x), 0.5 * (s.a.y + s.b.y)}})
      worst = std::max(worst, std::abs(std::hypot(p.x, p.y) - radius));
  return worst;
}

}  // namespace

TEST_CASE("contour: a plane's contour lies exactly on its line, as one straight open chain") {
  // Linear interpolation along an edge is exact for a linear function, so every marching-squares point lies on the
  // line a x + b y = c (Lorensen & Cline 1987, the algorithm's definition; rounding only).
  constexpr double a = 0.7, b = -1.3;
  const Grid g = sample(uneven(-2, 3, 17), uneven(-1, 2.5, 13), [&](double x, double y) { return a * x + b * y; });
  for (double c : {-1.7, -0.25, 0.0, 0.9}) {
    CAPTURE(c);
    const auto segments = report::contour::segments(g.x, g.y, g.z, c);
    REQUIRE(!segments.empty());
    constexpr double tolerance = 1e-13;  // a few rounding errors of values of order 1
    double worst = 0;
    for (const auto& s : segments)
      for (Point p : {s.a, s.b}) worst = std::max(worst, std::abs(a * p.x + b * p.y - c));
    INFO(segments.size() << " segments, worst |a x + b y - c| " << worst);
    CHECK(worst <= tolerance);
    // One open chain whose ends are on the grid's boundary, and as long as the straight line between them.
    const auto chains = report::contour::chain(segments);
    REQUIRE(chains.size() == 1);
    CHECK_FALSE(chains.front().closed);
    CHECK(chains.front().points.size() == segments.size() + 1);
    const Point first = chains.front().points.front(), last = chains.front().points.back();
    auto on_boundary = [&](Point p) {
      return p.x == g.x.front() || p.x == g.x.back() || p.y == g.y.front() || p.y == g.y.back();
    };
    CHECK(on_boundary(first));
    CHECK(on_boundary(last));
    CHECK(length(segments) == doctest::Approx(std::hypot(last.x - first.x, last.y - first.y)).epsilon(1e-12));
  }
}

TEST_CASE("contour: the circle of x^2 + y^2 closes into one loop and converges at second order") {
  // Exact contour: the circle of radius sqrt(c). Linear interpolation along an edge and the straight chord across a
  // cell both err by O(h^2) for a smooth field (interpolation error h^2/8 |f''|), so halving h should quarter the
  // error: observed order log2(e(h)/e(h/2)) near 2.
  constexpr double level = 1.0, radius = 1.0;
  std::vector<double> errors;
  std::vector<int> cells_list = {10, 20, 40, 80, 160};
  for (int cells : cells_list) {
    // An off-centre window so that no grid line is a symmetry line of the circle.
    const Grid g =
        sample(even(-1.37, 1.61, cells), even(-1.52, 1.29, cells), [](double x, double y) { return x * x + y * y; });
    const auto segments = report::contour::segments(g.x, g.y, g.z, level);
    const auto chains = report::contour::chain(segments);
    INFO(cells << " cells a side: " << segments.size() << " segments, " << chains.size() << " chains");
    REQUIRE(chains.size() == 1);
    CHECK(chains.front().closed);
    CHECK(chains.front().points.size() == segments.size());
    errors.push_back(radial_error(segments, radius));
  }
  for (std::size_t k = 1; k < errors.size(); ++k) {
    const double order = std::log2(errors[k - 1] / errors[k]);
    MESSAGE("circle contour, cells " << cells_list[k - 1] << " -> " << cells_list[k] << ": observed order " << order);
    INFO("cells " << cells_list[k - 1] << " -> " << cells_list[k] << ": error " << errors[k - 1] << " -> " << errors[k]
                  << ", observed order " << order);
    // Second order expected; the band allows for the maximum norm jumping with where the grid cuts the circle.
    CHECK(order > 1.8);
    CHECK(order < 2.2);
  }
}

TEST_CASE("contour: a saddle cell is resolved by its centre average, on the hyperbolae of x y") {
  // One cell of the bilinear z = x y on [-1, 1]^2: corners 1, -1, 1, -1 and centre average 0. Along each edge z is
  // linear, so the edge points are exactly where the hyperbola x y = c meets the edges (x = +-1: y = c/x).
  const Grid g = sample({-1, 1}, {-1, 1}, [](double x, double y) { return x * y; });
  auto has = [](const std::vector<report::contour::Segment>& s, Point p, Point q) {
    return std::any_of(s.begin(), s.end(),
                       [&](const auto& seg) { return (seg.a == p && seg.b == q) || (seg.a == q && seg.b == p); });
  };
  SUBCASE("level above the centre average: the two high corners are cut off") {
    const auto s = report::contour::segments(g.x, g.y, g.z, 0.5);
    REQUIRE(s.size() == 2);
    CHECK(has(s, {1, 0.5}, {0.5, 1}));      // around (1, 1)
    CHECK(has(s, {-1, -0.5}, {-0.5, -1}));  // around (-1, -1)
  }
  SUBCASE("level below the centre average: the two low corners are cut off") {
    const auto s = report::contour::segments(g.x, g.y, g.z, -0.5);
    REQUIRE(s.size() == 2);
    CHECK(has(s, {1, -0.5}, {0.5, -1}));  // around (1, -1)
    CHECK(has(s, {-1, 0.5}, {-0.5, 1}));  // around (-1, 1)
  }
  SUBCASE("the band between the two levels is the cell less the four corner triangles the lines cut off") {
    // Each cut-off triangle has legs 0.5 and 0.5: area 0.125 (its two points above).
    CHECK(area(report::contour::band(g.x, g.y, g.z, -0.5, 0.5)) == doctest::Approx(4 - 4 * 0.125).epsilon(1e-14));
    // Above 0.5 only the two high corner triangles; the shading and the lines follow the same saddle rule.
    CHECK(area(report::contour::band(g.x, g.y, g.z, 0.5, 2.0)) == doctest::Approx(2 * 0.125).epsilon(1e-14));
  }
  SUBCASE("neighbouring saddle cells agree: every chain closes or ends on the grid's boundary") {
    // sin(3x) sin(3y) has a saddle at every zero crossing of both factors; a dangling end inside the grid would mean
    // two cells disagreeing about a shared edge.
    const Grid w = sample(even(-2, 2.3, 23), even(-2.1, 2, 21),
                          [](double x, double y) { return std::sin(3 * x) * std::sin(3 * y); });
    for (double level : {-0.3, 0.0, 0.01, 0.45}) {
      const auto chains = report::contour::chain(report::contour::segments(w.x, w.y, w.z, level));
      for (const auto& c : chains) {
        if (c.closed) continue;
        for (Point p : {c.points.front(), c.points.back()}) {
          INFO("level " << level << ": open end at (" << p.x << ", " << p.y << ")");
          CHECK((p.x == w.x.front() || p.x == w.x.back() || p.y == w.y.front() || p.y == w.y.back()));
        }
      }
    }
  }
}

TEST_CASE("contour: cells with a missing value give no segments and no band") {
  const Grid full = sample(even(0, 5, 5), even(0, 5, 5), [](double x, double y) { return x + y; });
  Grid holed = full;
  holed.z[2][3] = std::nan("");  // node (x = 3, y = 2): the four cells around it are skipped
  const double level = 5.5;      // the line x + y = 5.5 crosses those cells
  const auto all = report::contour::segments(full.x, full.y, full.z, level);
  const auto kept = report::contour::segments(holed.x, holed.y, holed.z, level);
  INFO(all.size() << " segments without the hole, " << kept.size() << " with it");
  CHECK(kept.size() < all.size());
  auto strictly_inside_hole = [](Point p) { return p.x > 2 && p.x < 4 && p.y > 1 && p.y < 3; };
  for (const auto& s : kept) {
    CHECK_FALSE(strictly_inside_hole(s.a));
    CHECK_FALSE(strictly_inside_hole(s.b));
  }
  // The band loses exactly the part of the four skipped cells (x + y <= 5.5 below the anti-diagonal).
  const double band_full = area(report::contour::band(full.x, full.y, full.z, 0, level));
  const double band_holed = area(report::contour::band(holed.x, holed.y, holed.z, 0, level));
  // Closed-form geometry: in the block [2,4] x [1,3], x + y <= 5.5 is the block less the triangle with legs 1.5.
  CHECK(band_full - band_holed == doctest::Approx(4 - 0.5 * 1.5 * 1.5).epsilon(1e-12));
  // Nothing finite, nothing drawn.
  Grid empty = full;
  for (auto& row : empty.z) std::fill(row.begin(), row.end(), std::nan(""));
  CHECK(report::contour::segments(empty.x, empty.y, empty.z, level).empty());
  CHECK(report::contour::band(empty.x, empty.y, empty.z, 0, level).empty());
  CHECK(std::isnan(report::contour::finite_range(empty.z).first));
}

TEST_CASE("contour: band areas match the closed-form geometry") {
  SUBCASE("a plane: two triangles of the unit square, exact on an uneven grid") {
    // x + y <= c within the unit square (c <= 1) is a right triangle of area c^2 / 2.
    const Grid g = sample(uneven(0, 1, 9), uneven(0, 1, 7), [](double x, double y) { return x + y; });
    const auto polygons = report::contour::band(g.x, g.y, g.z, 0.3, 0.8);
    for (const auto& p : polygons) CHECK(report::contour::signed_area(p) > 0);  // anticlockwise, no slivers
    CHECK(area(polygons) == doctest::Approx((0.8 * 0.8 - 0.3 * 0.3) / 2).epsilon(1e-13));
  }
  SUBCASE("a paraboloid: the annulus pi (r2^2 - r1^2), within perimeter x contour error") {
    // The band's boundary lies within delta (the largest radial error of its two contours, second order by the
    // test above) of the two circles, so its area is off by at most about (2 pi r1 + 2 pi r2) delta. (The area error
    // itself changes sign with where the grid cuts the circles, so it shows no clean order of its own.)
    const double r1 = 0.5, r2 = 1.0, exact = pi * (r2 * r2 - r1 * r1);
    for (int cells : {20, 40, 80}) {
      const Grid g =
          sample(even(-1.37, 1.61, cells), even(-1.52, 1.29, cells), [](double x, double y) { return x * x + y * y; });
      const double delta = std::max(radial_error(report::contour::segments(g.x, g.y, g.z, r1 * r1), r1),
                                    radial_error(report::contour::segments(g.x, g.y, g.z, r2 * r2), r2));
      const double error = std::abs(area(report::contour::band(g.x, g.y, g.z, r1 * r1, r2 * r2)) - exact);
      INFO(cells << " cells a side: area error " << error << ", contour error " << delta);
      CHECK(error <= 2 * pi * (r1 + r2) * delta * (1 + 1e-6));
      CHECK(error < 1e-3 * exact);
    }
  }
}

TEST_CASE("contour: round levels step by 1, 2 or 5 times a power of ten, strictly inside the range") {
  struct Range {
    double lo, hi;
  };
  // Readings in metres over several scales, a range across zero, and a narrow one.
  for (const Range r : {Range{0.0331, 0.1307}, Range{0.00052, 0.0191}, Range{-0.93, 0.81}, Range{12.5, 12.9},
                        Range{1, 1e4}, Range{0.2, 0.3}}) {
    const auto levels = report::contour::round_levels(r.lo, r.hi, 7);
    INFO("range " << r.lo << " to " << r.hi << ": " << levels.size() << " levels");
    // About 7 levels: 5 to 9 (common practice, no source: enough lines to read a map, few enough to label).
    CHECK(levels.size() >= 5);
    CHECK(levels.size() <= 9);
    REQUIRE(levels.size() >= 2);
    const double step = levels[1] - levels[0];
    const double mantissa = step / std::pow(10.0, std::floor(std::log10(step) + 1e-9));
    CHECK((std::abs(mantissa - 1) < 1e-6 || std::abs(mantissa - 2) < 1e-6 || std::abs(mantissa - 5) < 1e-6));
    for (std::size_t k = 0; k < levels.size(); ++k) {
      CHECK(levels[k] > r.lo);
      CHECK(levels[k] < r.hi);
      CHECK(std::abs(levels[k] / step - std::round(levels[k] / step)) < 1e-6);
      if (k > 0) CHECK(levels[k] - levels[k - 1] == doctest::Approx(step));
    }
  }
  CHECK(report::contour::round_levels(3, 3).empty());
  CHECK(report::contour::round_levels(std::nan(""), 3).empty());
}

TEST_CASE("contour: a grid that breaks the convention is refused") {
  const std::vector<std::vector<double>> z = {{0, 1}, {1, 2}};
  CHECK_THROWS_AS(report::contour::segments({0, 1}, {1, 0}, z, 0.5), std::invalid_argument);        // y descending
  CHECK_THROWS_AS(report::contour::segments({0}, {0, 1}, {{0}, {1}}, 0.5), std::invalid_argument);  // one column
  CHECK_THROWS_AS(report::contour::segments({0, 1, 2}, {0, 1}, z, 0.5), std::invalid_argument);     // rows too short
  CHECK_THROWS_AS(report::contour::segments({0, 1}, {0, 1}, z, std::nan("")), std::invalid_argument);
  CHECK_THROWS_AS(report::contour::band({0, 1}, {0, 1}, z, 1.5, 0.5), std::invalid_argument);  // low > high
}
