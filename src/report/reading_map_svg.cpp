#include "src/report/reading_map_svg.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "src/report/contour.hpp"
#include "src/report/fit_outcome.hpp"
#include "src/report/svg_document.hpp"

namespace spreadfit::report {

namespace {

using svg::Document;

constexpr double page_width = 900;
constexpr double page_margin = 20;
constexpr double plot_right = page_width - 32;
constexpr double plot_height = 440;
constexpr double tick_font = 11;
constexpr double label_font = 10.5;
constexpr double min_label_run = 60;  // px of line a contour label needs

using svg::frame;
using svg::ink;
using svg::muted;
constexpr const char* contour_colour = "#3d5a80";
constexpr const char* limit_colour = "#0b2e59";
constexpr const char* shade_colour = "#c6dbef";
constexpr const char* box_colour = "#a84300";
constexpr const char* grid_colour = "#e3e6ea";
constexpr const char* clip_id = "reading-map-plot";
constexpr const char* hatch_id = "reading-map-failed";

// One axis: contours are computed in its coordinate (log10 of the value on a logarithmic axis), which maps
// linearly onto pixels.
struct Axis {
  bool log = false;
  double lo = 0, hi = 1;  // data range = grid range
  double pixel_lo = 0, pixel_hi = 1;
  std::vector<double> ticks;
  std::vector<std::string> labels;

  double coordinate(double v) const { return log ? std::log10(v) : v; }
  double pixel(double u) const {
    const double c_lo = coordinate(lo), c_hi = coordinate(hi);
    return pixel_lo + (u - c_lo) / (c_hi - c_lo) * (pixel_hi - pixel_lo);
  }
  // Pixel of a parameter limit: outside the plot (clipped) when it lies beyond the range or has no logarithm.
  double limit_pixel(double v) const {
    const double outside_lo = pixel_lo - (pixel_hi - pixel_lo) * 0.05,
                 outside_hi = pixel_hi + (pixel_hi - pixel_lo) * 0.05;
    if (log && !(v > 0)) return outside_lo;
    const double p = pixel(coordinate(v));
    return std::clamp(p, std::min(outside_lo, outside_hi), std::max(outside_lo, outside_hi));
  }
};

Axis make_axis(const std::vector<double>& grid, bool log, double pixel_lo, double pixel_hi) {
  Axis a;
  a.log = log;
  a.lo = grid.front();
  a.hi = grid.back();
  a.pixel_lo = pixel_lo;
  a.pixel_hi = pixel_hi;
  if (log) {
    const svg::LogScale s(a.lo, a.hi, pixel_lo, pixel_hi, 6);
    for (double t : s.ticks()) a.ticks.push_back(t), a.labels.push_back(s.tick_label(t));
  } else {
    const svg::LinearScale s(a.lo, a.hi, pixel_lo, pixel_hi, 6);
    const double slack = 1e-9 * (a.hi - a.lo);
    for (double t : s.ticks())
      if (t >= a.lo - slack && t <= a.hi + slack) a.ticks.push_back(t), a.labels.push_back(s.tick_label(t));
  }
  return a;
}

void check_grid_axis(const std::vector<double>& v, bool log, const char* name) {
  if (v.size() < 2) throw std::invalid_argument(fmt::format("reading map: {} needs at least 2 grid values", name));
  for (std::size_t k = 0; k < v.size(); ++k) {
    if (!std::isfinite(v[k])) throw std::invalid_argument(fmt::format("reading map: {} values must be finite", name));
    if (log && !(v[k] > 0))
      throw std::invalid_argument(fmt::format("reading map: {} values must be positive on a logarithmic axis", name));
    if (k > 0 && !(v[k] > v[k - 1]))
      throw std::invalid_argument(fmt::format("reading map: {} values must be strictly ascending", name));
  }
}

void check_limits(const std::optional<std::pair<double, double>>& limits, const char* name) {
  if (!limits) return;
  if (!std::isfinite(limits->first) || !std::isfinite(limits->second))
    throw std::invalid_argument(fmt::format("reading map: {} must be finite", name));
  if (limits->first > limits->second)
    throw std::invalid_argument(fmt::format("reading map: {} low must not exceed high", name));
}

void check_map(const ReadingMap& map) {
  check_grid_axis(map.x, map.x_log, "x");
  check_grid_axis(map.y, map.y_log, "y");
  if (map.reading.size() != map.y.size())
    throw std::invalid_argument("reading map: reading must have one row per y value");
  for (const auto& row : map.reading)
    if (row.size() != map.x.size())
      throw std::invalid_argument("reading map: every row of reading must have one value per x value");
  check_limits(map.reading_limits, "reading_limits");
  check_limits(map.x_limits, "x_limits");
  check_limits(map.y_limits, "y_limits");
}

// A reading [m] in the display unit with the fewest decimals (up to 3) that show it to 1e-6.
std::string plain(double metres, double scale) {
  const double v = metres * scale;
  for (int d = 0; d < 3; ++d) {
    const double shifted = v * std::pow(10.0, d);
    if (std::abs(shifted - std::round(shifted)) <= 1e-6 * std::max(1.0, std::abs(shifted))) return svg::number(v, d);
  }
  return fmt::format("{:.3g}", v);
}

// Polylines in pixels as one path, a subpath each ("M x y L x y ..."); `close` ends each with Z.
std::string path_of(const std::vector<std::vector<std::pair<double, double>>>& lines, bool close) {
  std::string d;
  for (const auto& line : lines) {
    for (std::size_t p = 0; p < line.size(); ++p) {
      d += p == 0 ? (d.empty() ? "M" : " M") : " L";
      d += svg::number(line[p].first) + " " + svg::number(line[p].second);
    }
    if (close) d += " Z";
  }
  return d;
}

struct Placed {
  double x, y, half_width;
};

// One label along a chain where it has `min_label_run` px of line, upright, clear of the frame and of labels
// placed before; tries the middle of the chain, then a quarter from either end.
// Distance [px] from (x, y) to the nearest segment of `lines`.
double distance_to(const std::vector<std::vector<std::pair<double, double>>>& lines, double x, double y) {
  double best = INFINITY;
  for (const auto& line : lines)
    for (std::size_t k = 1; k < line.size(); ++k) {
      const double ax = line[k - 1].first, ay = line[k - 1].second, dx = line[k].first - ax, dy = line[k].second - ay;
      const double length2 = dx * dx + dy * dy;
      const double t = length2 > 0 ? std::clamp(((x - ax) * dx + (y - ay) * dy) / length2, 0.0, 1.0) : 0.0;
      best = std::min(best, std::hypot(x - (ax + t * dx), y - (ay + t * dy)));
    }
  return best;
}

void label_chain(Document& doc, const std::vector<std::pair<double, double>>& line, const std::string& text,
                 const char* cls, const char* colour, const char* weight, double left, double top, double right,
                 double bottom, std::vector<Placed>& placed,
                 const std::vector<std::vector<std::pair<double, double>>>& keep_clear = {}) {
  std::vector<double> run(line.size(), 0.0);
  for (std::size_t k = 1; k < line.size(); ++k)
    run[k] = run[k - 1] + std::hypot(line[k].first - line[k - 1].first, line[k].second - line[k - 1].second);
  if (line.size() < 2 || run.back() < min_label_run) return;
  const double half = 0.5 * svg::text_width(text, label_font) + 3;
  for (double fraction : {0.5, 0.25, 0.75, 0.375, 0.625, 0.125, 0.875}) {
    const double at = fraction * run.back();
    const std::size_t k = std::size_t(std::upper_bound(run.begin(), run.end(), at) - run.begin());
    const std::size_t b = std::clamp<std::size_t>(k, 1, line.size() - 1), a = b - 1;
    const double piece = run[b] - run[a], t = piece > 0 ? (at - run[a]) / piece : 0;
    const double x = line[a].first + t * (line[b].first - line[a].first);
    const double y = line[a].second + t * (line[b].second - line[a].second);
    if (x - half < left || x + half > right || y - half < top || y + half > bottom) continue;
    const bool crowded = std::any_of(placed.begin(), placed.end(), [&](const Placed& p) {
      return std::hypot(p.x - x, p.y - y) < p.half_width + half + 4;
    });
    if (crowded) continue;
    if (distance_to(keep_clear, x, y) < half + 4) continue;  // not on top of a limit line
    double angle = std::atan2(line[b].second - line[a].second, line[b].first - line[a].first) * 180 / 3.14159265358979;
    if (angle > 90) angle -= 180;
    if (angle < -90) angle += 180;
    doc.add_text(
        "text",
        {{"class", cls},
         {"x", x},
         {"y", y + 0.35 * label_font},
         {"font-size", label_font},
         {"font-weight", weight},
         {"fill", colour},
         {"text-anchor", "middle"},
         {"stroke", "#ffffff"},
         {"stroke-width", 3.0},
         {"stroke-linejoin", "round"},
         {"paint-order", "stroke"},
         {"transform", fmt::format("rotate({} {} {})", svg::number(angle, 1), svg::number(x), svg::number(y))}},
        text);
    placed.push_back({x, y, half});
    return;
  }
}

// Two readings equal to rounding (a round contour level on a limit).
bool near(double a, double b) { return std::abs(a - b) <= 1e-9 * std::max(std::abs(a), std::abs(b)); }

// --- layout: the reading's range and unit, the failed points, the contour and limit levels ----------------------
struct MapLevels {
  std::size_t nx = 0, ny = 0;
  std::string name;  // the reading's name
  double lo = 0, hi = 0;
  bool any_finite = false;
  double scale = 1000;  // display units per metre
  std::string unit;
  std::size_t failed_points = 0;
  std::vector<double> levels;        // round contour levels
  std::vector<double> limit_levels;  // the limits inside the range (drawn bold)
};

MapLevels map_levels(const ReadingMap& map) {
  MapLevels L;
  L.nx = map.x.size(), L.ny = map.y.size();
  L.name = map.reading_name.empty() ? std::string("reading") : map.reading_name;
  std::tie(L.lo, L.hi) = contour::finite_range(map.reading);
  const double lo = L.lo, hi = L.hi;
  const bool any_finite = L.any_finite = std::isfinite(lo);
  L.scale = any_finite && std::max(std::abs(lo), std::abs(hi)) >= 0.03 ? 100 : 1000;
  L.unit = L.scale == 100 ? "cm" : "mm";
  std::size_t& failed_points = L.failed_points;
  for (const auto& row : map.reading)
    for (double v : row) failed_points += !std::isfinite(v);

  // Round levels, less any that coincides with a limit (the bold line is drawn there instead).
  std::vector<double>& levels = L.levels = contour::round_levels(lo, hi, 7);
  std::vector<double>& limit_levels = L.limit_levels;
  if (map.reading_limits) {
    for (double v : {map.reading_limits->first, map.reading_limits->second})
      if (any_finite && v > lo && v < hi && (limit_levels.empty() || !near(limit_levels.back(), v)))
        limit_levels.push_back(v);
    std::erase_if(levels, [&](double l) {
      return std::any_of(limit_levels.begin(), limit_levels.end(), [&](double m) { return near(l, m); });
    });
  }

  return L;
}

// --- header: title, notes, summary of the range, failed points ----------------------------------------------------
double map_header(Document& doc, const ReadingMap& map, const MapLevels& L, const std::string& heading) {
  const std::size_t nx = L.nx, ny = L.ny;
  const std::string& name = L.name;
  const double lo = L.lo, hi = L.hi, scale = L.scale;
  const bool any_finite = L.any_finite;
  const std::string& unit = L.unit;
  const std::size_t failed_points = L.failed_points;
  const std::vector<double>& levels = L.levels;
  const std::vector<double>& limit_levels = L.limit_levels;
  const double text_width = page_width - 2 * page_margin;
  double y = svg::text_lines(doc, svg::wrap(heading, text_width, 19), page_margin, 34, 19, ink, "bold", "title");
  y += 2;
  for (const auto& note : map.notes)
    y = svg::text_lines(doc, svg::wrap(note, text_width, 13), page_margin, y, 13, ink, "normal", "note");
  std::string summary = fmt::format("{} over a {} \u00d7 {} grid of {} and {}", name, nx, ny, map.x_name, map.y_name);
  if (any_finite)
    summary += fmt::format(": {} to {} {}.", plain(lo, scale), plain(hi, scale), unit);
  else
    summary += ": the model failed at every grid point, so there is nothing to draw.";
  if (any_finite && levels.empty() && limit_levels.empty())
    summary += " The reading varies too little over the grid for contour lines.";
  y = svg::text_lines(doc, svg::wrap(summary, text_width, 12), page_margin, y, 12, muted, "normal", "summary");
  if (failed_points > 0 && any_finite)
    y = svg::text_lines(
        doc,
        svg::wrap(fmt::format("The model failed at {} of {} grid points: cells touching them are hatched and "
                              "carry no contour lines.",
                              failed_points, nx * ny),
                  text_width, 12),
        page_margin, y, 12, muted, "normal", "failed-note");

  return y;
}

struct MapLegendEntry {
  enum Kind { Contour, Limit, Shade, Box, Failed } kind;
  std::string text;
};

std::vector<MapLegendEntry> map_legend_entries(const ReadingMap& map, const MapLevels& L) {
  using Entry = MapLegendEntry;
  const std::string& name = L.name;
  const double scale = L.scale;
  const std::string& unit = L.unit;
  const std::size_t failed_points = L.failed_points;
  const std::vector<double>& levels = L.levels;
  const std::vector<double>& limit_levels = L.limit_levels;
  std::vector<Entry> entries;
  if (!levels.empty()) {
    const double step = levels.size() > 1 ? levels[1] - levels[0] : 0;
    entries.push_back({Entry::Contour, step > 0 ? fmt::format("{} contours every {} {}", name, plain(step, scale), unit)
                                                : fmt::format("{} contour [{}]", name, unit)});
  }
  if (map.reading_limits) {
    const auto [low, high] = *map.reading_limits;
    std::string text = fmt::format("{} limits {} and {} {} (bold)", name, plain(low, scale), plain(high, scale), unit);
    if (limit_levels.size() < (near(low, high) ? 1u : 2u)) text += "; a limit outside the grid's range has no line";
    entries.push_back({Entry::Limit, text});
    entries.push_back({Entry::Shade, fmt::format("{} within its limits", name)});
  }
  if (map.x_limits || map.y_limits) {
    std::string text = "parameter limits:";
    if (map.x_limits)
      text += fmt::format(" {} {:.4g} to {:.4g}", map.x_name, map.x_limits->first, map.x_limits->second);
    if (map.x_limits && map.y_limits) text += ";";
    if (map.y_limits)
      text += fmt::format(" {} {:.4g} to {:.4g}", map.y_name, map.y_limits->first, map.y_limits->second);
    entries.push_back({Entry::Box, text});
  }
  if (failed_points > 0)
    entries.push_back({Entry::Failed, fmt::format("model failed ({} grid points)", failed_points)});

  return entries;
}

// The hatching of cells with a failed grid point, defined once for the legend and the plot.
void hatch_pattern(Document& doc) {
  doc.open("defs", {});
  doc.open("pattern", {{"id", hatch_id},
                       {"patternUnits", "userSpaceOnUse"},
                       {"width", 7.0},
                       {"height", 7.0},
                       {"patternTransform", "rotate(45)"}});
  doc.add("rect", {{"width", 7.0}, {"height", 7.0}, {"fill", "#eeeff1"}});
  doc.add("line", {{"x1", 0.0}, {"y1", 0.0}, {"x2", 0.0}, {"y2", 7.0}, {"stroke", "#8b9199"}, {"stroke-width", 2.5}});
  doc.close();
  doc.close();

}

// --- legend -----------------------------------------------------------------------------------------------------
double map_legend(Document& doc, const std::vector<MapLegendEntry>& entries, double y) {
  using Entry = MapLegendEntry;
  {
    double x = page_margin;
    for (const Entry& e : entries) {
      const double w = 30 + svg::text_width(e.text, 12) + 20;
      if (x > page_margin && x + w > page_width - page_margin) x = page_margin, y += 22;
      const double cy = y + 10;
      switch (e.kind) {
        case Entry::Contour:
        case Entry::Limit:
          doc.add("line", {{"class", "legend"},
                           {"x1", x},
                           {"y1", cy},
                           {"x2", x + 24},
                           {"y2", cy},
                           {"stroke", e.kind == Entry::Limit ? limit_colour : contour_colour},
                           {"stroke-width", e.kind == Entry::Limit ? 2.8 : 1.2}});
          break;
        case Entry::Shade:
        case Entry::Box:
        case Entry::Failed: {
          svg::Attributes a = {{"class", "legend"}, {"x", x}, {"y", cy - 7}, {"width", 24.0}, {"height", 14.0}};
          if (e.kind == Entry::Shade) a.push_back({"fill", shade_colour});
          if (e.kind == Entry::Failed) a.push_back({"fill", fmt::format("url(#{})", hatch_id)});
          if (e.kind == Entry::Box)
            a.insert(a.end(),
                     {{"fill", "none"}, {"stroke", box_colour}, {"stroke-width", 2.0}, {"stroke-dasharray", "5 3"}});
          doc.add("rect", a);
          break;
        }
      }
      doc.add_text("text", {{"x", x + 30}, {"y", cy + 4}, {"font-size", 12.0}, {"fill", ink}}, e.text);
      x += w;
    }
    if (!entries.empty()) y += 34;
  }

  return y;
}

// --- plot frame: room for the y tick labels, the two axes, the grid in axis coordinates ----------------------------
struct MapFrame {
  double widest = 0;  // widest y tick label [px]
  double plot_left = 0, top = 0, bottom = 0;
  Axis ax, ay;
  std::vector<double> u, v;  // grid in axis coordinates
  std::pair<double, double> px(const contour::Point& p) const { return {ax.pixel(p.x), ay.pixel(p.y)}; }
};

MapFrame map_frame(const ReadingMap& map, std::size_t nx, std::size_t ny, double y) {
  double widest = 0;
  const Axis probe = make_axis(map.y, map.y_log, 0, 1);
  for (const auto& l : probe.labels) widest = std::max(widest, svg::text_width(l, tick_font));
  const double plot_left = std::max(80.0, page_margin + 20 + widest + 12);
  const double top = y, bottom = y + plot_height;
  const Axis ax = make_axis(map.x, map.x_log, plot_left, plot_right);
  const Axis ay = make_axis(map.y, map.y_log, bottom, top);
  std::vector<double> u(nx), v(ny);  // grid in axis coordinates
  for (std::size_t i = 0; i < nx; ++i) u[i] = ax.coordinate(map.x[i]);
  for (std::size_t j = 0; j < ny; ++j) v[j] = ay.coordinate(map.y[j]);

  return MapFrame{widest, plot_left, top, bottom, ax, ay, u, v};
}

// Inside the clipped plot: the in-limits shading, the hatching of failed cells, the grid lines. Leaves the clipped
// group open for the contour lines.
void map_shading_and_grid(Document& doc, const ReadingMap& map, const MapLevels& L, const MapFrame& F) {
  const double plot_left = F.plot_left, top = F.top, bottom = F.bottom;
  const Axis& ax = F.ax;
  const Axis& ay = F.ay;
  const std::size_t nx = L.nx, ny = L.ny;
  const bool any_finite = L.any_finite;
  const std::size_t failed_points = L.failed_points;
  const std::vector<double>& u = F.u;
  const std::vector<double>& v = F.v;
  const auto px = [&](const contour::Point& p) { return F.px(p); };
  doc.open("clipPath", {{"id", clip_id}});
  doc.add("rect", {{"x", plot_left}, {"y", top}, {"width", plot_right - plot_left}, {"height", plot_height}});
  doc.close();
  doc.open("g", {{"clip-path", fmt::format("url(#{})", clip_id)}});

  if (map.reading_limits && any_finite) {
    std::vector<std::vector<std::pair<double, double>>> pieces;
    for (const contour::Polygon& p :
         contour::band(u, v, map.reading, map.reading_limits->first, map.reading_limits->second)) {
      pieces.emplace_back();
      for (const contour::Point& q : p) pieces.back().push_back(px(q));
    }
    // One path: the pieces share edges, and one path is filled without seams between them.
    const std::string d = path_of(pieces, true);
    if (!d.empty()) doc.add("path", {{"class", "in-limits"}, {"d", d}, {"fill", shade_colour}, {"stroke", "none"}});
  }
  if (failed_points > 0) {
    std::string d;
    for (std::size_t j = 0; j + 1 < ny; ++j)
      for (std::size_t i = 0; i + 1 < nx; ++i) {
        const auto& r = map.reading;
        if (std::isfinite(r[j][i]) && std::isfinite(r[j][i + 1]) && std::isfinite(r[j + 1][i]) &&
            std::isfinite(r[j + 1][i + 1]))
          continue;
        d += fmt::format("{}M{} {}H{}V{}H{}Z", d.empty() ? "" : " ", svg::number(ax.pixel(u[i])),
                         svg::number(ay.pixel(v[j])), svg::number(ax.pixel(u[i + 1])), svg::number(ay.pixel(v[j + 1])),
                         svg::number(ax.pixel(u[i])));
      }
    if (!d.empty())
      doc.add("path", {{"class", "failed"}, {"d", d}, {"fill", fmt::format("url(#{})", hatch_id)}, {"stroke", "none"}});
  }
  for (std::size_t k = 0; k < ax.ticks.size(); ++k) {
    const double p = ax.pixel(ax.coordinate(ax.ticks[k]));
    doc.add("line",
            {{"x1", p}, {"y1", top}, {"x2", p}, {"y2", bottom}, {"stroke", grid_colour}, {"stroke-width", 1.0}});
  }
  for (std::size_t k = 0; k < ay.ticks.size(); ++k) {
    const double p = ay.pixel(ay.coordinate(ay.ticks[k]));
    doc.add(
        "line",
        {{"x1", plot_left}, {"y1", p}, {"x2", plot_right}, {"y2", p}, {"stroke", grid_colour}, {"stroke-width", 1.0}});
  }

}

// Contour chains in pixels, per level, and whether the level is a limit.
struct Drawn {
  double level;
  bool limit;
  std::vector<std::vector<std::pair<double, double>>> lines;
};

// The contour and limit lines and the parameter box, then the clipped group closed.
std::vector<Drawn> map_contours(Document& doc, const ReadingMap& map, const MapLevels& L, const MapFrame& F) {
  const double plot_left = F.plot_left, top = F.top, bottom = F.bottom;
  const Axis& ax = F.ax;
  const Axis& ay = F.ay;
  const std::vector<double>& levels = L.levels;
  const std::vector<double>& limit_levels = L.limit_levels;
  const std::vector<double>& u = F.u;
  const std::vector<double>& v = F.v;
  const auto px = [&](const contour::Point& p) { return F.px(p); };
  // Limits are traced last, so that their labels (placed from the last level back) have the first choice of place.
  std::vector<Drawn> drawn;
  const auto trace = [&](double level, bool limit) {
    Drawn dr{level, limit, {}};
    for (const contour::Polyline& line : contour::chain(contour::segments(u, v, map.reading, level))) {
      std::vector<std::pair<double, double>> pixels;
      for (const auto& p : line.points) pixels.push_back(px(p));
      if (line.closed) pixels.push_back(pixels.front());  // drawn round to the start, and measured so for labels
      dr.lines.push_back(std::move(pixels));
    }
    if (!dr.lines.empty())
      doc.add("path", {{"class", limit ? "limit-contour" : "contour"},
                       {"d", path_of(dr.lines, false)},
                       {"fill", "none"},
                       {"stroke", limit ? limit_colour : contour_colour},
                       {"stroke-width", limit ? 2.8 : 1.2},
                       {"stroke-linejoin", "round"}});
    drawn.push_back(std::move(dr));
  };
  for (double level : levels) trace(level, false);
  for (double level : limit_levels) trace(level, true);

  if (map.x_limits || map.y_limits) {
    const double x0 = map.x_limits ? ax.limit_pixel(map.x_limits->first) : plot_left - 10;
    const double x1 = map.x_limits ? ax.limit_pixel(map.x_limits->second) : plot_right + 10;
    const double y0 = map.y_limits ? ay.limit_pixel(map.y_limits->second) : top - 10;
    const double y1 = map.y_limits ? ay.limit_pixel(map.y_limits->first) : bottom + 10;
    doc.add("rect", {{"class", "param-box"},
                     {"x", std::min(x0, x1)},
                     {"y", std::min(y0, y1)},
                     {"width", std::abs(x1 - x0)},
                     {"height", std::abs(y1 - y0)},
                     {"fill", "none"},
                     {"stroke", box_colour},
                     {"stroke-width", 2.0},
                     {"stroke-dasharray", "8 5"}});
  }
  doc.close();  // the clipped group

  return drawn;
}

// Level labels along the lines: limits first, contour labels kept clear of the limit lines.
void map_contour_labels(Document& doc, const std::vector<Drawn>& drawn, double scale, const MapFrame& F) {
  const double plot_left = F.plot_left, top = F.top, bottom = F.bottom;
  std::vector<Placed> placed;
  std::vector<std::vector<std::pair<double, double>>> limit_lines;  // contour labels keep clear of these
  for (const Drawn& dr : drawn)
    if (dr.limit) limit_lines.insert(limit_lines.end(), dr.lines.begin(), dr.lines.end());
  static const std::vector<std::vector<std::pair<double, double>>> none;
  for (auto it = drawn.rbegin(); it != drawn.rend(); ++it)  // limits were traced last: label them first
    for (const auto& line : it->lines)
      label_chain(doc, line, plain(it->level, scale), it->limit ? "limit-label" : "contour-label",
                  it->limit ? limit_colour : contour_colour, it->limit ? "bold" : "normal", plot_left, top, plot_right,
                  bottom, placed, it->limit ? none : limit_lines);

}

// --- axes: the frame, ticks, tick labels and axis names -----------------------------------------------------------
void map_axes(Document& doc, const ReadingMap& map, const MapFrame& F) {
  const double plot_left = F.plot_left, top = F.top, bottom = F.bottom;
  const Axis& ax = F.ax;
  const Axis& ay = F.ay;
  const double widest = F.widest;
  doc.add("rect", {{"x", plot_left},
                   {"y", top},
                   {"width", plot_right - plot_left},
                   {"height", plot_height},
                   {"fill", "none"},
                   {"stroke", frame},
                   {"stroke-width", 1.0}});
  for (std::size_t k = 0; k < ax.ticks.size(); ++k) {
    const double p = ax.pixel(ax.coordinate(ax.ticks[k]));
    doc.add("line", {{"x1", p}, {"y1", bottom}, {"x2", p}, {"y2", bottom + 4}, {"stroke", frame}});
    doc.add_text("text",
                 {{"class", "x-tick"},
                  {"x", p},
                  {"y", bottom + 17},
                  {"font-size", tick_font},
                  {"fill", "#3b4048"},
                  {"text-anchor", "middle"}},
                 ax.labels[k]);
  }
  for (std::size_t k = 0; k < ay.ticks.size(); ++k) {
    const double p = ay.pixel(ay.coordinate(ay.ticks[k]));
    doc.add("line", {{"x1", plot_left - 4}, {"y1", p}, {"x2", plot_left}, {"y2", p}, {"stroke", frame}});
    doc.add_text("text",
                 {{"class", "y-tick"},
                  {"x", plot_left - 7},
                  {"y", p + 4},
                  {"font-size", tick_font},
                  {"fill", "#3b4048"},
                  {"text-anchor", "end"}},
                 ay.labels[k]);
  }
  const double middle = 0.5 * (top + bottom), name_x = plot_left - widest - 20;
  doc.add_text("text",
               {{"class", "y-name"},
                {"x", name_x},
                {"y", middle},
                {"font-size", 12.0},
                {"text-anchor", "middle"},
                {"fill", ink},
                {"transform", fmt::format("rotate(-90 {} {})", svg::number(name_x), svg::number(middle))}},
               map.y_name);
  doc.add_text("text",
               {{"class", "x-name"},
                {"x", 0.5 * (plot_left + plot_right)},
                {"y", bottom + 38},
                {"font-size", 12.0},
                {"text-anchor", "middle"},
                {"fill", ink}},
               map.x_name);

}

}  // namespace

std::string reading_map_svg(const ReadingMap& map) {
  check_map(map);
  const MapLevels L = map_levels(map);
  const std::string heading = map.title.empty() ? "Reading map" : map.title;
  Document doc(page_width, heading);
  doc.add("rect", {{"x", 0.0}, {"y", 0.0}, {"width", "100%"}, {"height", "100%"}, {"fill", "#ffffff"}});
  double y = map_header(doc, map, L, heading);
  const double legend_top = y + 4;
  const std::vector<MapLegendEntry> entries = map_legend_entries(map, L);
  hatch_pattern(doc);
  y = map_legend(doc, entries, legend_top);
  const MapFrame F = map_frame(map, L.nx, L.ny, y);
  map_shading_and_grid(doc, map, L, F);
  const std::vector<Drawn> drawn = map_contours(doc, map, L, F);
  map_contour_labels(doc, drawn, L.scale, F);
  map_axes(doc, map, F);
  return svg::finish_with_caution(doc, bench_caution, F.bottom + 56, page_width, page_margin, muted);
}

}  // namespace spreadfit::report
