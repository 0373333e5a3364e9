#include "src/report/contour.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>
#include <string>

namespace spreadfit::report::contour {

namespace {

void check_axis(const std::vector<double>& v, const char* name) {
  if (v.size() < 2) throw std::invalid_argument(std::string("contour: ") + name + " needs at least 2 grid values");
  for (std::size_t k = 0; k < v.size(); ++k) {
    if (!std::isfinite(v[k])) throw std::invalid_argument(std::string("contour: ") + name + " values must be finite");
    if (k > 0 && !(v[k] > v[k - 1]))
      throw std::invalid_argument(std::string("contour: ") + name + " values must be strictly ascending");
  }
}

void check_grid(const std::vector<double>& x, const std::vector<double>& y, const std::vector<std::vector<double>>& z) {
  check_axis(x, "x");
  check_axis(y, "y");
  if (z.size() != y.size()) throw std::invalid_argument("contour: z must have one row per y value");
  for (const auto& row : z)
    if (row.size() != x.size()) throw std::invalid_argument("contour: every row of z must have one value per x value");
}

// The level crossing on the edge from a (value za) to b (value zb), where exactly one of the two is >= level.
// Callers always pass the end with the lower grid index as `a`, so both cells sharing the edge get the same bits;
// the ends themselves are returned exactly when the crossing falls on them.
Point crossing(Point a, double za, Point b, double zb, double level) {
  const double t = (level - za) / (zb - za);
  if (!(t > 0)) return a;
  if (!(t < 1)) return b;
  return {a.x + t * (b.x - a.x), a.y + t * (b.y - a.y)};
}

// One grid cell seen against one level. Corners anticlockwise from (x[i], y[j]): c0 (i,j), c1 (i+1,j),
// c2 (i+1,j+1), c3 (i,j+1); edge k joins corner k and corner k+1 (mod 4).
struct Cell {
  std::array<Point, 4> corner;
  std::array<double, 4> value;
  std::array<bool, 4> above{};      // value >= level
  std::array<bool, 4> crossed{};    // the edge's ends are on opposite sides
  std::array<Point, 4> edge_point;  // the crossing, where crossed
  bool centre_above = false;        // saddle rule: cell-centre average >= level
  int crossings = 0;

  Cell(const std::array<Point, 4>& c, const std::array<double, 4>& v, double level) : corner(c), value(v) {
    for (int k = 0; k < 4; ++k) above[k] = value[k] >= level;
    // Canonical direction: from the lower grid index (c0->c1, c1->c2, c3->c2, c0->c3).
    constexpr int from[4] = {0, 1, 3, 0}, to[4] = {1, 2, 2, 3};
    for (int k = 0; k < 4; ++k) {
      crossed[k] = above[k] != above[(k + 1) % 4];
      if (crossed[k]) {
        edge_point[k] = crossing(corner[from[k]], value[from[k]], corner[to[k]], value[to[k]], level);
        ++crossings;
      }
    }
    centre_above = 0.25 * (value[0] + value[1] + value[2] + value[3]) >= level;
  }
  bool saddle() const { return crossings == 4; }
  // In a saddle, corner k is cut off by its own segment unless it lies on the centre's side.
  bool isolated(int k) const { return above[k] != centre_above; }
};

bool finite_cell(const std::vector<std::vector<double>>& z, std::size_t i, std::size_t j) {
  return std::isfinite(z[j][i]) && std::isfinite(z[j][i + 1]) && std::isfinite(z[j + 1][i + 1]) &&
         std::isfinite(z[j + 1][i]);
}

Cell make_cell(const std::vector<double>& x, const std::vector<double>& y, const std::vector<std::vector<double>>& z,
               std::size_t i, std::size_t j, double level) {
  return Cell({Point{x[i], y[j]}, Point{x[i + 1], y[j]}, Point{x[i + 1], y[j + 1]}, Point{x[i], y[j + 1]}},
              {z[j][i], z[j][i + 1], z[j + 1][i + 1], z[j + 1][i]}, level);
}

double cross(Point o, Point a, Point b) { return (a.x - o.x) * (b.y - o.y) - (a.y - o.y) * (b.x - o.x); }

// Drops repeated consecutive vertices (a crossing on a corner) and polygons without area.
void add_polygon(std::vector<Polygon>& out, Polygon p, double cell_area) {
  Polygon q;
  for (const Point& v : p)
    if (q.empty() || !(v == q.back())) q.push_back(v);
  while (q.size() > 1 && q.front() == q.back()) q.pop_back();
  if (q.size() >= 3 && std::abs(signed_area(q)) > 1e-12 * cell_area) out.push_back(std::move(q));
}

// The part of the cell on one side of the level (`upper`: value >= level), as convex polygons anticlockwise: the
// walk round the cell keeps the corners on that side and the edge crossings. In a saddle whose corners on that
// side are cut off (not joined through the centre) it is two corner triangles instead.
std::vector<Polygon> side(const Cell& c, bool upper, double cell_area) {
  std::vector<Polygon> out;
  if (c.saddle() && c.centre_above != upper) {
    for (int k = 0; k < 4; ++k)
      if (c.above[k] == upper) add_polygon(out, {c.edge_point[(k + 3) % 4], c.corner[k], c.edge_point[k]}, cell_area);
    return out;
  }
  Polygon p;
  for (int k = 0; k < 4; ++k) {
    if (c.above[k] == upper) p.push_back(c.corner[k]);
    if (c.crossed[k]) p.push_back(c.edge_point[k]);
  }
  add_polygon(out, std::move(p), cell_area);
  return out;
}

// Sutherland-Hodgman: convex `subject` clipped to the convex anticlockwise `window` (Sutherland & Hodgman 1974,
// Comm. ACM 17(1)).
Polygon clip(const Polygon& subject, const Polygon& window) {
  Polygon out = subject;
  for (std::size_t e = 0; e < window.size() && !out.empty(); ++e) {
    const Point q0 = window[e], q1 = window[(e + 1) % window.size()];
    Polygon in = std::move(out);
    out.clear();
    for (std::size_t k = 0; k < in.size(); ++k) {
      const Point p = in[k], r = in[(k + 1) % in.size()];
      const double dp = cross(q0, q1, p), dr = cross(q0, q1, r);
      if (dp >= 0) out.push_back(p);
      if ((dp >= 0) != (dr >= 0)) {
        const double t = dp / (dp - dr);
        out.push_back({p.x + t * (r.x - p.x), p.y + t * (r.y - p.y)});
      }
    }
  }
  return out;
}

}  // namespace

std::vector<Segment> segments(const std::vector<double>& x, const std::vector<double>& y,
                              const std::vector<std::vector<double>>& z, double level) {
  check_grid(x, y, z);
  if (!std::isfinite(level)) throw std::invalid_argument("contour: the level must be finite");
  std::vector<Segment> out;
  auto add = [&](Point a, Point b) {
    if (!(a == b)) out.push_back({a, b});
  };
  for (std::size_t j = 0; j + 1 < y.size(); ++j) {
    for (std::size_t i = 0; i + 1 < x.size(); ++i) {
      if (!finite_cell(z, i, j)) continue;
      const Cell c = make_cell(x, y, z, i, j, level);
      if (c.crossings == 2) {
        int first = -1, second = -1;
        for (int k = 0; k < 4; ++k)
          if (c.crossed[k]) (first < 0 ? first : second) = k;
        add(c.edge_point[first], c.edge_point[second]);
      } else if (c.saddle()) {
        // Each isolated corner k is cut off by the segment between its two edges, k-1 and k.
        for (int k = 0; k < 4; ++k)
          if (c.isolated(k)) add(c.edge_point[(k + 3) % 4], c.edge_point[k]);
      }
    }
  }
  return out;
}

std::vector<Polyline> chain(const std::vector<Segment>& pieces) {
  using Key = std::pair<double, double>;
  auto key = [](Point p) { return Key{p.x, p.y}; };
  std::map<Key, std::vector<std::size_t>> at;  // segments by end point
  for (std::size_t s = 0; s < pieces.size(); ++s) {
    at[key(pieces[s].a)].push_back(s);
    at[key(pieces[s].b)].push_back(s);
  }
  std::vector<bool> used(pieces.size(), false);
  std::vector<Polyline> out;
  // Extends `line` from its last point until no unused segment meets it; each step uses one segment, so the loop
  // ends after at most pieces.size() steps in all.
  auto walk = [&](Polyline& line) {
    for (std::size_t step = 0; step < pieces.size(); ++step) {
      const Point end = line.points.back();
      const auto& list = at[key(end)];
      auto next = std::find_if(list.begin(), list.end(), [&](std::size_t s) { return !used[s]; });
      if (next == list.end()) return;
      used[*next] = true;
      const Segment& s = pieces[*next];
      line.points.push_back(s.a == end ? s.b : s.a);
    }
  };
  for (const auto& [point, list] : at) {  // open chains first, from their ends
    if (list.size() != 1 || used[list.front()]) continue;
    Polyline line;
    line.points.push_back({point.first, point.second});
    walk(line);
    out.push_back(std::move(line));
  }
  for (std::size_t s = 0; s < pieces.size(); ++s) {  // what is left forms loops
    if (used[s]) continue;
    Polyline line;
    line.points.push_back(pieces[s].a);
    walk(line);
    if (line.points.size() > 3 && line.points.back() == line.points.front()) {
      line.points.pop_back();
      line.closed = true;
    }
    out.push_back(std::move(line));
  }
  return out;
}

std::vector<Polygon> band(const std::vector<double>& x, const std::vector<double>& y,
                          const std::vector<std::vector<double>>& z, double low, double high) {
  check_grid(x, y, z);
  if (!std::isfinite(low) || !std::isfinite(high)) throw std::invalid_argument("contour: band limits must be finite");
  if (low > high) throw std::invalid_argument("contour: the band's low limit must not exceed its high limit");
  std::vector<Polygon> out;
  for (std::size_t j = 0; j + 1 < y.size(); ++j) {
    for (std::size_t i = 0; i + 1 < x.size(); ++i) {
      if (!finite_cell(z, i, j)) continue;
      const Cell lower = make_cell(x, y, z, i, j, low), upper = make_cell(x, y, z, i, j, high);
      const bool none_above_low = std::none_of(lower.above.begin(), lower.above.end(), [](bool b) { return b; });
      const bool all_above_high = std::all_of(upper.above.begin(), upper.above.end(), [](bool b) { return b; });
      if (none_above_low || all_above_high) continue;
      const double cell_area = (x[i + 1] - x[i]) * (y[j + 1] - y[j]);
      // Above `low` and below `high`: each side is at most two convex pieces, so their intersection is at most
      // four convex pieces.
      const std::vector<Polygon> a = side(lower, true, cell_area), b = side(upper, false, cell_area);
      for (const Polygon& p : a)
        for (const Polygon& q : b) add_polygon(out, clip(p, q), cell_area);
    }
  }
  return out;
}

double signed_area(const Polygon& polygon) {
  double twice = 0;
  for (std::size_t k = 0; k < polygon.size(); ++k) {
    const Point p = polygon[k], q = polygon[(k + 1) % polygon.size()];
    twice += p.x * q.y - q.x * p.y;
  }
  return 0.5 * twice;
}

std::pair<double, double> finite_range(const std::vector<std::vector<double>>& z) {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (const auto& row : z)
    for (double v : row)
      if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  if (lo > hi) return {std::nan(""), std::nan("")};
  return {lo, hi};
}

std::vector<double> round_levels(double lo, double hi, int target) {
  if (!std::isfinite(lo) || !std::isfinite(hi) || !(lo < hi)) return {};
  target = std::clamp(target, 2, 20);
  const double decade = std::pow(10.0, std::floor(std::log10((hi - lo) / target)));
  double best_step = 0;
  long best_first = 0, best_count = -1;
  // Steps 1, 2, 5 x 10^k from a decade below the raw step to a decade above; coarser ones come later and win ties.
  for (double scale : {0.1, 1.0, 10.0}) {
    for (double mantissa : {1.0, 2.0, 5.0}) {
      const double step = mantissa * scale * decade;
      const long first = long(std::floor(lo / step)) + 1, last = long(std::ceil(hi / step)) - 1;
      const long count = std::max(0L, last - first + 1);
      if (best_count < 0 || std::abs(count - target) <= std::abs(best_count - target))
        best_step = step, best_first = first, best_count = count;
    }
  }
  std::vector<double> levels;
  for (long k = 0; k < best_count; ++k) {
    const double v = double(best_first + k) * best_step;
    if (v > lo && v < hi) levels.push_back(std::abs(v) < 1e-9 * best_step ? 0.0 : v);
  }
  return levels;
}

}  // namespace spreadfit::report::contour
