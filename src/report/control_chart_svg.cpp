#include "src/report/control_chart_svg.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <functional>

#include "src/report/fit_outcome.hpp"
#include "src/report/svg_document.hpp"
#include "src/version.hpp"

namespace spreadfit::report {

namespace {

using svg::Document;
using svg::LinearScale;
using svg::Shape;

constexpr double page_width = 900;
constexpr double page_margin = 20;
constexpr double plot_right = page_width - 96;  // room for the limit labels
constexpr double panel_height = 300;
constexpr double label_font = 11;
constexpr double label_slant = 40;         // degrees
constexpr std::size_t longest_label = 24;  // characters shown of a batch id

using svg::frame;
using svg::ink;
using svg::muted;
constexpr const char* line_colour = "#7a8594";
constexpr const char* normal_colour = "#1f4e9c";
constexpr const char* beyond_colour = "#c62828";
constexpr const char* run_colour = "#e08a00";
constexpr const char* centre_colour = "#2d3b4e";
constexpr const char* spec_colour = "#6b3fa0";
constexpr const char* left_out_colour = "#6b7280";
constexpr const char* amber_text = "#8a5300";

// The value axis: linear (round ticks, widened to them) or logarithmic (1-2-5 ticks inside a padded range).
struct ValueAxis {
  std::function<double(double)> pixel;
  std::vector<double> ticks;
  std::vector<std::string> labels;
  double lo = 0, hi = 1;
};

ValueAxis value_axis(bool log, double lo, double hi, double bottom, double top) {
  ValueAxis a;
  if (log) {
    const double pad = std::pow(hi / lo, 0.06);
    const svg::LogScale s(lo / pad, hi * pad, bottom, top, 5);
    a.pixel = [s](double v) { return s(v); };
    a.ticks = s.ticks();
    for (double t : a.ticks) a.labels.push_back(s.tick_label(t));
    a.lo = s.lo(), a.hi = s.hi();
  } else {
    const double pad = 0.06 * (hi - lo);
    const LinearScale s(lo - pad, hi + pad, bottom, top, 6);
    a.pixel = [s](double v) { return s(v); };
    a.ticks = s.ticks();
    for (double t : a.ticks) a.labels.push_back(s.tick_label(t));
    a.lo = s.lo(), a.hi = s.hi();
  }
  return a;
}

void draw_value_axis(Document& doc, const ValueAxis& a, double left, double right, const std::string& name) {
  double widest = 0;
  for (std::size_t k = 0; k < a.ticks.size(); ++k) {
    const double py = a.pixel(a.ticks[k]);
    doc.add("line",
            {{"x1", left}, {"y1", py}, {"x2", right}, {"y2", py}, {"stroke", "#e3e6ea"}, {"stroke-width", 1.0}});
    doc.add_text("text",
                 {{"class", "value-tick"},
                  {"x", left - 7},
                  {"y", py + 4},
                  {"font-size", 11.0},
                  {"text-anchor", "end"},
                  {"fill", "#3b4048"}},
                 a.labels[k]);
    widest = std::max(widest, svg::text_width(a.labels[k], 11.0));
  }
  const double middle = 0.5 * (a.pixel(a.lo) + a.pixel(a.hi));
  const double x = left - widest - 20;
  doc.add_text("text",
               {{"x", x},
                {"y", middle},
                {"font-size", 12.0},
                {"text-anchor", "middle"},
                {"fill", ink},
                {"transform", "rotate(-90 " + svg::number(x) + " " + svg::number(middle) + ")"}},
               name);
}

// A batch id short enough for the axis: its last characters after an ellipsis (ids differ at the end).
std::string axis_label(const std::string& id) {
  std::size_t characters = 0, cut = id.size();
  for (std::size_t i = id.size(); i-- > 0;) {
    if ((static_cast<unsigned char>(id[i]) & 0xC0) == 0x80) continue;  // UTF-8 continuation byte
    if (++characters == longest_label) {
      cut = i;
      break;
    }
  }
  if (characters < longest_label || cut == 0) return id;
  return "\u2026" + id.substr(cut + 1 == id.size() ? cut : cut + 1);
}

// A batch's marker; `legend` gives the legend's sample of it (class "legend-mark" instead of "point ...").
void point_marker(Document& doc, double x, double y, bool beyond, bool run, const std::string& tooltip,
                  bool legend = false) {
  const auto cls = [&](const char* c) { return legend ? std::string("legend-mark") : std::string(c); };
  if (beyond) {
    svg::marker(doc, Shape::Diamond, x, y, 5.0,
                {{"class", cls(run ? "point beyond-limits in-run" : "point beyond-limits")},
                 {"fill", beyond_colour},
                 {"stroke", run ? run_colour : "#ffffff"},
                 {"stroke-width", run ? 2.2 : 1.0}},
                tooltip);
  } else if (run) {
    svg::marker(doc, Shape::Square, x, y, 4.4,
                {{"class", cls("point in-run")}, {"fill", run_colour}, {"stroke", "#ffffff"}, {"stroke-width", 1.0}},
                tooltip);
  } else {
    svg::marker(doc, Shape::Circle, x, y, 3.6,
                {{"class", cls("point")}, {"fill", normal_colour}, {"stroke", "#ffffff"}, {"stroke-width", 1.0}},
                tooltip);
  }
}

// A batch left out of the chart: a hollow grey triangle (class "left-out"), unlike every charted mark.
void left_out_marker(Document& doc, double x, double y, const std::string& tooltip, bool legend = false) {
  svg::marker(doc, Shape::Triangle, x, y, 4.6,
              {{"class", legend ? "legend-mark" : "left-out"},
               {"fill", "#ffffff"},
               {"stroke", left_out_colour},
               {"stroke-width", 1.8}},
              tooltip);
}

// The words and units the chart writes: the parameter in plain words, its unit, the heading.
struct ChartNames {
  std::string unit_symbol;  // the unit as SVG text
  std::string unit;         // " unit", or empty for a dimensionless value
  std::string parameter;    // yield_stress -> yield stress
  std::string heading;
};

ChartNames chart_names(const qc::ControlChart& chart, const std::string& title) {
  ChartNames names;
  names.unit_symbol = svg::unit_text(chart.unit);
  names.unit = chart.unit.empty() || chart.unit == "-" ? std::string() : " " + names.unit_symbol;
  names.parameter = chart.parameter.empty() ? std::string("value") : chart.parameter;
  std::replace(names.parameter.begin(), names.parameter.end(), '_', ' ');
  names.heading = title.empty() ? "Control chart of " + names.parameter : title;
  return names;
}

// How many charted values are shown, beyond a limit, in a run, or neither.
struct ChartCounts {
  std::size_t shown = 0, beyond = 0, in_run = 0, plain = 0;
};

bool flag(const std::vector<bool>& flags, std::size_t i) { return i < flags.size() && flags[i]; }

ChartCounts chart_counts(const qc::ControlChart& chart) {
  const std::size_t n = chart.values.size();
  ChartCounts c;
  std::size_t &shown = c.shown, &beyond = c.beyond, &in_run = c.in_run, &plain = c.plain;
  for (std::size_t i = 0; i < n; ++i) {
    if (!std::isfinite(chart.values[i])) continue;
    ++shown;
    beyond += flag(chart.beyond_limits, i);
    in_run += flag(chart.in_run, i);
    plain += !flag(chart.beyond_limits, i) && !flag(chart.in_run, i);
  }
  return c;
}

// --- header: title, the chart's summary in words, the left-out batches --------------------------------------------
double chart_header(Document& doc, const qc::ControlChart& chart, const ChartNames& names, const ChartCounts& counts) {
  const std::size_t n = chart.values.size(), batches = chart.batches();
  const std::string& heading = names.heading;
  const std::string& unit_symbol = names.unit_symbol;
  const std::string& unit = names.unit;
  const std::string& parameter = names.parameter;
  const std::size_t shown = counts.shown;
  const double text_width = page_width - 2 * page_margin;
  double y = 34;
  for (const auto& line : svg::wrap(heading, text_width, 19)) {
    doc.add_text(
        "text",
        {{"class", "title"}, {"x", page_margin}, {"y", y}, {"font-size", 19.0}, {"font-weight", "bold"}, {"fill", ink}},
        line);
    y += 26;
  }
  const std::string limits_rule =
      chart.log_scale
          ? fmt::format(
                "geometric mean \u00d7/\u00f7 exp(2.66 \u00d7 mean moving range of the logarithms, "
                "{:.3g})",
                chart.mean_moving_range)
          : fmt::format("mean \u00b1 2.66 \u00d7 mean moving range {:.3g}{}", chart.mean_moving_range, unit);
  std::string summary = fmt::format(
      "Individuals chart of {}{}, {} batches in time order, {} charted. Centre line {:.4g}{}; control limits {:.4g} "
      "to {:.4g}{} ({}).",
      parameter, chart.unit.empty() ? "" : " [" + unit_symbol + "]", batches, n, chart.centre, unit, chart.lower,
      chart.upper, unit, limits_rule);
  if (chart.spec_low || chart.spec_high)
    summary += fmt::format(" Spec limits {} to {}{}.", chart.spec_low ? fmt::format("{:.4g}", *chart.spec_low) : "-",
                           chart.spec_high ? fmt::format("{:.4g}", *chart.spec_high) : "-", unit);
  if (!chart.scale_reason.empty()) {
    std::string why = chart.scale_reason;
    why[0] = char(std::toupper(static_cast<unsigned char>(why[0])));
    summary += " " + why + ".";
  }
  if (shown < n) summary += fmt::format(" {} value{} not a number, not drawn.", n - shown, n - shown == 1 ? "" : "s");
  for (const auto& line : svg::wrap(summary, text_width, 13)) {
    doc.add_text("text", {{"class", "summary"}, {"x", page_margin}, {"y", y}, {"font-size", 13.0}, {"fill", ink}},
                 line);
    y += 19;
  }
  for (const qc::LeftOutBatch& b : chart.left_out) {
    const std::string note = fmt::format("Not charted, not in the limits: {} ({}).", b.label, b.reason);
    for (const auto& line : svg::wrap(note, text_width, 12)) {
      doc.add_text(
          "text", {{"class", "left-out-note"}, {"x", page_margin}, {"y", y}, {"font-size", 12.0}, {"fill", amber_text}},
          line);
      y += 17;
    }
  }
  return y;
}

// --- legend ---------------------------------------------------------------------------------------------------
double chart_legend(Document& doc, const qc::ControlChart& chart, const ChartCounts& counts, double y) {
  const std::size_t beyond = counts.beyond, in_run = counts.in_run, plain = counts.plain;
  {
    struct Entry {
      int kind;  // 0 normal, 1 beyond, 2 run, 3 centre line, 4 limits, 5 spec, 6 left out
      std::string text;
    };
    std::vector<Entry> entries = {
        {0, fmt::format("within the limits, no run ({})", plain)},
        {1, fmt::format("beyond a control limit ({})", beyond)},
        {2, fmt::format("in a run of {} or more on one side of the centre line ({})", chart.run_length, in_run)},
        {3, "centre line"},
        {4, "control limits"},
    };
    if (chart.spec_low || chart.spec_high) entries.push_back({5, "spec limits"});
    if (!chart.left_out.empty())
      entries.push_back({6, fmt::format("not charted, at the foot ({})", chart.left_out.size())});
    double x = page_margin;
    y += 4;
    for (const Entry& e : entries) {
      const double w = 26 + svg::text_width(e.text, 12) + 22;
      if (x > page_margin && x + w > page_width - page_margin) x = page_margin, y += 20;
      const double cy = y + 10;
      if (e.kind <= 2) {
        point_marker(doc, x + 9, cy, e.kind == 1, e.kind == 2, "", true);
      } else if (e.kind == 6) {
        left_out_marker(doc, x + 9, cy, "", true);
      } else {
        doc.add("line", {{"x1", x},
                         {"y1", cy},
                         {"x2", x + 20},
                         {"y2", cy},
                         {"stroke", e.kind == 3   ? centre_colour
                                    : e.kind == 5 ? spec_colour
                                                  : beyond_colour},
                         {"stroke-width", 1.6},
                         {"stroke-dasharray", e.kind == 3   ? "none"
                                              : e.kind == 5 ? "2 3"
                                                            : "6 4"}});
      }
      doc.add_text("text", {{"x", x + 26}, {"y", cy + 4}, {"font-size", 12.0}, {"fill", ink}}, e.text);
      x += w;
    }
    y += 34;
  }
  return y;
}

// --- chart: batch labels, value axis, shading, levels, the values and their markers, the left-out batches ---------

// A charted value's id, or its place when the chart has no label for it.
std::string batch_label(const qc::ControlChart& chart, std::size_t i) {
  return i < chart.labels.size() ? chart.labels[i] : fmt::format("#{}", i + 1);
}

// Whether a value can be drawn: finite, and positive on a log scale.
bool visible(const qc::ControlChart& chart, double v) { return std::isfinite(v) && (!chart.log_scale || v > 0); }

// Every batch's id in time order, the charted and the left-out ones in their places.
std::vector<std::string> all_batch_labels(const qc::ControlChart& chart) {
  const std::size_t n = chart.values.size(), batches = chart.batches();
  std::vector<std::string> all_labels(batches);
  for (std::size_t i = 0; i < n; ++i)
    if (chart.position(i) < batches) all_labels[chart.position(i)] = batch_label(chart, i);
  for (const qc::LeftOutBatch& b : chart.left_out)
    if (b.position < batches) all_labels[b.position] = b.label;
  return all_labels;
}

// The panel's place and scales: the left edge leaves room for the widest slanted batch id, the value axis spans
// the values, the centre line and the control and spec limits, and every batch gets an equal column.
struct PanelLayout {
  double plot_left = 88, top = 0, bottom = 0;
  double slant = 0;         // [rad] of the batch ids
  double widest_label = 0;  // [px] the longest batch id as written on the axis
  double spacing = 0;       // [px] one batch's column
  ValueAxis value;
  double x_at(std::size_t place) const { return plot_left + (double(place) + 0.5) * spacing; }
};

PanelLayout panel_layout(const qc::ControlChart& chart, const std::vector<std::string>& all_labels, double y) {
  PanelLayout l;
  for (const auto& label : all_labels)
    l.widest_label = std::max(l.widest_label, svg::text_width(axis_label(label), label_font));
  l.slant = label_slant * 3.14159265358979 / 180;
  l.plot_left = std::max(88.0, std::cos(l.slant) * l.widest_label + 14);
  l.top = y, l.bottom = y + panel_height;
  double lo = INFINITY, hi = -INFINITY;
  const auto include = [&](double v) {
    if (std::isfinite(v) && (!chart.log_scale || v > 0)) lo = std::min(lo, v), hi = std::max(hi, v);
  };
  for (double v : {chart.centre, chart.lower, chart.upper}) include(v);
  for (double v : chart.values) include(v);
  if (chart.spec_low) include(*chart.spec_low);
  if (chart.spec_high) include(*chart.spec_high);
  if (!std::isfinite(lo)) lo = chart.log_scale ? 1 : 0, hi = chart.log_scale ? 10 : 1;
  l.value = value_axis(chart.log_scale, lo, hi, l.bottom, l.top);
  l.spacing = (plot_right - l.plot_left) / double(std::max<std::size_t>(chart.batches(), 1));
  return l;
}

// Shading beyond the control limits, then the value axis with its grid and name.
void draw_shading_and_axis(Document& doc, const qc::ControlChart& chart, const ChartNames& names,
                           const PanelLayout& l) {
  const ValueAxis& value = l.value;
  if (visible(chart, chart.upper) && value.pixel(chart.upper) > l.top)
    doc.add("rect", {{"x", l.plot_left},
                     {"y", l.top},
                     {"width", plot_right - l.plot_left},
                     {"height", value.pixel(chart.upper) - l.top},
                     {"fill", "#fbeceb"}});
  if (visible(chart, chart.lower) && value.pixel(chart.lower) < l.bottom)
    doc.add("rect", {{"x", l.plot_left},
                     {"y", value.pixel(chart.lower)},
                     {"width", plot_right - l.plot_left},
                     {"height", l.bottom - value.pixel(chart.lower)},
                     {"fill", "#fbeceb"}});
  draw_value_axis(doc, value, l.plot_left, plot_right,
                  (chart.unit.empty() ? names.parameter : names.parameter + " [" + names.unit_symbol + "]") +
                      (chart.log_scale ? ", log scale" : ""));
}

// Centre line, control limits and spec limits, labelled at the right (labels pushed apart when close).
void draw_levels(Document& doc, const qc::ControlChart& chart, const PanelLayout& l) {
  struct Level {
    double v;
    std::string name;
    const char* colour;
    const char* dash;
  };
  std::vector<Level> levels = {{chart.upper, "UCL", beyond_colour, "6 4"},
                               {chart.centre, "CL", centre_colour, "none"},
                               {chart.lower, "LCL", beyond_colour, "6 4"}};
  if (chart.spec_high) levels.push_back({*chart.spec_high, "USL", spec_colour, "2 3"});
  if (chart.spec_low) levels.push_back({*chart.spec_low, "LSL", spec_colour, "2 3"});
  std::vector<std::pair<double, std::size_t>> label_rows;
  for (std::size_t k = 0; k < levels.size(); ++k) {
    const Level& level = levels[k];
    if (!visible(chart, level.v)) continue;
    const double py = l.value.pixel(level.v);
    doc.add("line", {{"class", "level " + level.name},
                     {"x1", l.plot_left},
                     {"y1", py},
                     {"x2", plot_right},
                     {"y2", py},
                     {"stroke", level.colour},
                     {"stroke-width", 1.6},
                     {"stroke-dasharray", level.dash}});
    label_rows.emplace_back(py, k);
  }
  std::sort(label_rows.begin(), label_rows.end());
  double last_y = -INFINITY;
  for (auto& [py, k] : label_rows) {
    const double ly = std::max(py + 4, last_y + 13);
    last_y = ly;
    doc.add_text("text",
                 {{"class", "level-label"},
                  {"x", plot_right + 6},
                  {"y", ly},
                  {"font-size", 11.0},
                  {"fill", levels[k].colour},
                  {"font-weight", "bold"}},
                 fmt::format("{} {:.4g}", levels[k].name, levels[k].v));
  }
}

// Values joined in batch order (a gap where a value is missing or left out), then the markers over the line,
// each with a tooltip naming the batch, its value and its flags.
void draw_values(Document& doc, const qc::ControlChart& chart, const ChartNames& names, const PanelLayout& l) {
  const std::size_t n = chart.values.size();
  auto x_of = [&](std::size_t i) { return l.x_at(chart.position(i)); };
  std::vector<std::pair<double, double>> run_of_points;
  auto flush = [&] {
    if (run_of_points.size() >= 2)
      doc.add("polyline", {{"class", "series"},
                           {"points", svg::points(run_of_points)},
                           {"fill", "none"},
                           {"stroke", line_colour},
                           {"stroke-width", 1.3},
                           {"stroke-linejoin", "round"}});
    run_of_points.clear();
  };
  for (std::size_t i = 0; i < n; ++i) {
    if (i > 0 && chart.position(i) != chart.position(i - 1) + 1) flush();
    if (visible(chart, chart.values[i]))
      run_of_points.emplace_back(x_of(i), l.value.pixel(chart.values[i]));
    else
      flush();
  }
  flush();
  for (std::size_t i = 0; i < n; ++i) {
    if (!visible(chart, chart.values[i])) continue;
    const bool b = flag(chart.beyond_limits, i), r = flag(chart.in_run, i);
    std::string tip = fmt::format("{}: {:.4g}{}", batch_label(chart, i), chart.values[i], names.unit);
    if (b) tip += fmt::format(", beyond the {} control limit", chart.values[i] > chart.centre ? "upper" : "lower");
    if (r) tip += fmt::format(", in a run of {} or more on one side of the centre line", chart.run_length);
    point_marker(doc, x_of(i), l.value.pixel(chart.values[i]), b, r, tip);
  }
}

// Left-out batches: a hollow mark on the chart's bottom edge at their place, with the reason; then the frame.
void draw_left_out_and_frame(Document& doc, const qc::ControlChart& chart, const PanelLayout& l) {
  for (const qc::LeftOutBatch& b : chart.left_out)
    left_out_marker(doc, l.x_at(b.position), l.bottom - 8,
                    fmt::format("{}: not charted ({}); not in the limits", b.label, b.reason));
  doc.add("rect", {{"x", l.plot_left},
                   {"y", l.top},
                   {"width", plot_right - l.plot_left},
                   {"height", panel_height},
                   {"fill", "none"},
                   {"stroke", frame},
                   {"stroke-width", 1.0}});
}

// Batch ids along the bottom, slanted; every k-th when they would crowd (22 px apart at least); then the axis
// name. Returns the y below it.
double draw_batch_axis(Document& doc, const std::vector<std::string>& all_labels, const PanelLayout& l) {
  const std::size_t batches = all_labels.size();
  const std::size_t every = std::max<std::size_t>(1, std::size_t(std::ceil(22.0 / l.spacing)));
  for (std::size_t i = 0; i < batches; ++i) {
    const double x = l.x_at(i);
    doc.add("line",
            {{"x1", x}, {"y1", l.bottom}, {"x2", x}, {"y2", l.bottom + (i % every == 0 ? 5 : 3)}, {"stroke", frame}});
    if (i % every != 0) continue;
    const double ly = l.bottom + 15;
    doc.add_text("text",
                 {{"class", "batch"},
                  {"x", x + 3},
                  {"y", ly},
                  {"font-size", label_font},
                  {"fill", "#3b4048"},
                  {"text-anchor", "end"},
                  {"transform",
                   fmt::format("rotate(-{} {} {})", svg::number(label_slant), svg::number(x + 3), svg::number(ly))}},
                 axis_label(all_labels[i]));
  }
  double y = l.bottom + 15 + std::sin(l.slant) * l.widest_label + 12;
  doc.add_text("text",
               {{"x", 0.5 * (l.plot_left + plot_right)},
                {"y", y + 8},
                {"font-size", 12.0},
                {"fill", ink},
                {"text-anchor", "middle"}},
               every == 1 ? "batch, in time order" : fmt::format("batch, in time order (one id in {} shown)", every));
  return y + 24;
}

double chart_panel(Document& doc, const qc::ControlChart& chart, const ChartNames& names, double y) {
  const std::vector<std::string> all_labels = all_batch_labels(chart);
  const PanelLayout layout = panel_layout(chart, all_labels, y);
  draw_shading_and_axis(doc, chart, names, layout);
  draw_levels(doc, chart, layout);
  draw_values(doc, chart, names, layout);
  draw_left_out_and_frame(doc, chart, layout);
  return draw_batch_axis(doc, all_labels, layout);
}

}  // namespace

std::string control_chart_svg(const qc::ControlChart& chart, const std::string& title) {
  const ChartNames names = chart_names(chart, title);
  const ChartCounts counts = chart_counts(chart);
  Document doc(page_width, names.heading);
  doc.add("rect", {{"x", 0.0}, {"y", 0.0}, {"width", "100%"}, {"height", "100%"}, {"fill", "#ffffff"}});
  double y = chart_header(doc, chart, names, counts);
  y = chart_legend(doc, chart, counts, y);
  y = chart_panel(doc, chart, names, y);
  return svg::finish_with_caution(doc, bench_caution, y, page_width, page_margin, muted);
}

}  // namespace spreadfit::report
