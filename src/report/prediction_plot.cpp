#include "src/report/prediction_plot.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <tuple>
#include <utility>
#include <vector>

#include "src/fit/parameter_names.hpp"
#include "src/fit/prediction_band.hpp"
#include "src/report/fit_outcome.hpp"
#include "src/report/svg_document.hpp"

namespace spreadfit::report {

namespace {

using svg::Document;
using svg::LinearScale;

constexpr double page_width = 900;
constexpr double page_margin = 20;
constexpr double plot_left = 88;
constexpr double plot_right = page_width - 24;
constexpr double panel_height = 320;

using svg::ink;
using svg::muted;
constexpr const char* curve_colour = "#1f4e9c";
constexpr const char* measured_colour = "#b5451b";
constexpr const char* amber = "#8a5300";

bool finite(double v) { return std::isfinite(v); }

std::string length(double metres) {
  return metres >= 0.1 ? fmt::format("{:.4g} cm", metres * 100) : fmt::format("{:.3g} mm", metres * 1000);
}

// The rig in the words of its test description (lengths in cm or mm, volumes in mL).
std::string rig_text(const io::TestDescription& rig) {
  const std::string where = std::filesystem::path(rig.path).filename().string();
  const std::string geometry = std::visit(
      overloaded{[](const ChannelRig& r) {
                   return fmt::format("channel {} wide, reservoir {} long, {:.4g} mL{}", length(r.width),
                                      length(r.reservoir_length), r.volume * 1e6,
                                      r.side_wall_drag ? "" : ", no side-wall drag");
                 },
                 [](const PlateRig& r) {
                   return fmt::format("plate, ring radius {}, {:.4g} mL", length(r.ring_radius), r.volume * 1e6);
                 },
                 [](const SqueezeRig& r) {
                   return fmt::format("squeeze, {:.4g} mL under {:.4g} N", r.volume * 1e6, r.force);
                 },
                 [](const SlumpRig& r) {
                   return fmt::format("slump cylinder, radius {}, height {}", length(r.radius), length(r.height));
                 }},
      rig.setup.rig);
  return fmt::format("Rig: {} ({}); density {:.4g} kg/m\u00b3", geometry, where, rig.setup.density);
}

// Each material parameter with the 2.5-97.5% range of the draws the band is solved from (the fit's likelihood
// draws, src/fit/likelihood_draws.hpp; without them, the log-space normal approximation predict samples instead).
std::string material_text(const fit::FitResult& fit, const std::string& source) {
  std::string text =
      fmt::format("Material: {} from {}", law_name(fit.law), std::filesystem::path(source).filename().string());
  for (std::size_t i = 0; i < fit.names.size(); ++i) {
    const auto k = Eigen::Index(i);
    std::string name = fit.names[i];
    std::replace(name.begin(), name.end(), '_', ' ');
    // fmt, not " " + std::string: GCC 12 warns falsely (-Wrestrict) on that concatenation.
    const std::string unit =
        fit::parameter_unit(fit.names[i]) == "-" ? std::string() : fmt::format(" {}", fit::parameter_unit(fit.names[i]));
    text += fmt::format("{} {} {:.4g}{}", i == 0 ? ": " : "; ", name, std::exp(fit.estimate[k]), unit);
    double low = NAN, high = NAN;
    if (!fit.draws.empty()) {
      std::vector<double> values;
      values.reserve(fit.draws.size());
      for (const Eigen::VectorXd& d : fit.draws) values.push_back(d[k]);
      std::tie(low, high) = fit::central_95_range(std::move(values));
    } else {
      const double se = std::sqrt(fit.covariance(k, k));
      low = fit.estimate[k] - 1.96 * se;
      high = fit.estimate[k] + 1.96 * se;
    }
    if (finite(low) && finite(high))
      text += fmt::format(" (95% of draws: {:.3g} to {:.3g})", std::exp(low), std::exp(high));
    else
      text += " (interval undetermined)";
  }
  return text;
}

// --- the stages of prediction_plot_svg, in page order ---------------------------------------------------------

constexpr double text_column = page_width - 2 * page_margin;  // width of the header's and the footer's text

/// What the page shows, worked out before anything is drawn.
struct PlotData {
  std::string reading;                          ///< the reading's name
  const io::ReadingSeries* measured = nullptr;  ///< readings of the same kind on this rig: the prediction's check
  const fit::PredictionBand* curve = nullptr;   ///< over a dense set of times: the line and the band
  const fit::PredictionBand* at = nullptr;      ///< at the requested times
  bool has_curve = false, has_band = false;
  double last_time = 0;  ///< [s] the end of the time axis
  double scale = 1000;   ///< from metres to `unit`
  std::string unit;      ///< cm from 3 cm on, else mm
  double sigma = 0;      ///< [m] the rig's stated resolution, 0 when none
  int inside = 0, compared = 0;                               ///< measured readings within the band, and compared
  std::vector<double> measured_band_low, measured_band_high;  ///< [m] the band at each measured time
};

/// How many measured readings lie within the band (their resolution allowed), with the band at their times by
/// linear interpolation of the dense band (81 times: fine enough for a count). Readings after the band's end are
/// not compared.
void count_in_band(PlotData& p) {
  const fit::PredictionBand& curve = *p.curve;
  auto interpolate = [&](const std::vector<double>& v, double t) {
    const auto it = std::upper_bound(curve.times.begin(), curve.times.end(), t);
    if (it == curve.times.begin()) return v.front();
    if (it == curve.times.end()) return v.back();
    const std::size_t j = std::size_t(it - curve.times.begin());
    const double f = (t - curve.times[j - 1]) / (curve.times[j] - curve.times[j - 1]);
    return v[j - 1] + f * (v[j] - v[j - 1]);
  };
  for (double t : p.measured->times) {
    p.measured_band_low.push_back(interpolate(curve.lower, t));
    p.measured_band_high.push_back(interpolate(curve.upper, t));
  }
  for (std::size_t i = 0; i < p.measured->times.size(); ++i) {
    if (p.measured->times[i] > curve.times.back()) continue;
    ++p.compared;
    const double v = p.measured->values[i];
    if (v + p.sigma >= p.measured_band_low[i] && v - p.sigma <= p.measured_band_high[i]) ++p.inside;
  }
}

/// The data and layout: the rig's measured readings of the predicted kind, whether there is a line (the best
/// fit solved) and a band (at least 10 draws solved), the time axis's end and the length unit from the largest
/// value drawn, and the measured readings within the band.
PlotData plot_data(const PredictionReport& report) {
  const io::TestDescription& rig = *report.rig;
  PlotData p;
  p.reading = std::string(reading_name(report.reading));
  for (const auto& s : rig.series)
    if (s.kind == report.reading && !s.times.empty()) {
      p.measured = &s;
      break;
    }
  p.curve = &report.curve;
  p.at = &report.at_times;
  const fit::PredictionBand& curve = report.curve;
  const fit::PredictionBand& at = report.at_times;
  p.has_curve = curve.ok && curve.reading.size() == curve.times.size() && !curve.times.empty();
  p.has_band = p.has_curve && curve.samples >= 10;

  double largest = 0;
  auto include_extent = [&](const std::vector<double>& v) {
    for (double x : v)
      if (finite(x)) largest = std::max(largest, std::abs(x));
  };
  if (p.has_curve) include_extent(curve.upper), include_extent(curve.reading), p.last_time = curve.times.back();
  if (at.ok) include_extent(at.upper);
  for (double t : at.times) p.last_time = std::max(p.last_time, t);
  if (p.measured)
    include_extent(p.measured->values), p.last_time = std::max(p.last_time, p.measured->times.back());
  p.scale = largest >= 0.03 ? 100 : 1000;
  p.unit = largest >= 0.03 ? "cm" : "mm";
  p.sigma = rig.resolution.value_or(0.0);
  if (p.measured && p.has_band) count_in_band(p);
  return p;
}

/// Header: the title, the rig, the material and where the band comes from (with the measured readings' count
/// within it). Returns the y below it.
double plot_header(Document& doc, const PredictionReport& report, const PlotData& p) {
  const io::TestDescription& rig = *report.rig;
  double y = svg::text_lines(
      doc,
      svg::wrap(fmt::format("Predicted {} on the {}", p.reading, io::rig_kind_name(rig.setup.rig)), text_column, 19),
      page_margin, 34, 19, ink, "bold");
  y += 2;
  y = svg::text_lines(doc, svg::wrap(rig_text(rig), text_column, 13), page_margin, y, 13, ink);
  y = svg::text_lines(doc, svg::wrap(material_text(*report.material, report.material_source), text_column, 13),
                      page_margin, y, 13, ink);
  std::string band_text =
      p.has_band
          ? fmt::format("Band: 2.5% to 97.5% of the readings of {} parameter draws from the fit's uncertainty.",
                        p.curve->samples)
          : "No band: the fit's uncertainty could not be sampled (see notes); the line is the best fit.";
  if (p.measured) {
    band_text += fmt::format(" Measured on this rig: {} readings ({})", p.measured->times.size(),
                             std::filesystem::path(p.measured->source).filename().string());
    band_text += p.has_band ? fmt::format(", {} of {} within the band{}.", p.inside, p.compared,
                                          p.sigma > 0 ? " allowing the stated resolution" : "")
                            : ".";
  }
  return svg::text_lines(doc, svg::wrap(band_text, text_column, 12), page_margin, y, 12, muted);
}

/// Legend, one row: the line, the band (when drawn), the requested times and the measured readings (when
/// any). Returns the y below it.
double plot_legend(Document& doc, const PlotData& p, double y) {
  y += 6;
  double x = page_margin;
  const double cy = y + 10;
  auto entry = [&](const std::string& text) {
    doc.add_text("text", {{"x", x + 26}, {"y", cy + 4}, {"font-size", 12.0}, {"fill", ink}}, text);
    x += 26 + svg::text_width(text, 12) + 20;
  };
  doc.add("line", {{"x1", x}, {"y1", cy}, {"x2", x + 20}, {"y2", cy}, {"stroke", curve_colour}, {"stroke-width", 2.2}});
  entry("prediction (best fit)");
  if (p.has_band) {
    doc.add(
        "rect",
        {{"x", x}, {"y", cy - 6}, {"width", 20.0}, {"height", 12.0}, {"fill", curve_colour}, {"fill-opacity", 0.18}});
    entry("95% band");
  }
  svg::marker(doc, svg::Shape::Diamond, x + 10, cy, 4.0,
              {{"class", "legend-predicted"}, {"fill", "#ffffff"}, {"stroke", curve_colour}, {"stroke-width", 1.6}});
  entry("requested times");
  if (p.measured) {
    svg::marker(doc, svg::Shape::Circle, x + 10, cy, 3.4,
                {{"class", "legend-measured"}, {"fill", measured_colour}, {"stroke", measured_colour}});
    entry(p.sigma > 0 ? fmt::format("measured on this rig, \u00b1{:.3g} mm", p.sigma * 1e3) : "measured on this rig");
  }
  return y + 34;
}

/// The panel's place and scales.
struct PanelScales {
  double top = 0, bottom = 0;  ///< [px]
  LinearScale time, value;     ///< [s] and the reading in the page's unit, onto pixels
};

/// The panel below `y`: time from 0 to the last time; values over everything drawn (line, band, measured
/// readings with their resolution, requested times) with 4% padding, not below 0 for positive data.
PanelScales panel_scales(const PlotData& p, double y) {
  const fit::PredictionBand& curve = *p.curve;
  const fit::PredictionBand& at = *p.at;
  const double top = y, bottom = y + panel_height;
  double lo = INFINITY, hi = -INFINITY;
  auto include = [&](double v) {
    if (finite(v)) lo = std::min(lo, v * p.scale), hi = std::max(hi, v * p.scale);
  };
  if (p.has_curve)
    for (std::size_t i = 0; i < curve.times.size(); ++i)
      include(curve.reading[i]), include(curve.lower[i]), include(curve.upper[i]);
  if (p.measured)
    for (double v : p.measured->values) include(v - p.sigma), include(v + p.sigma);
  if (at.ok)
    for (std::size_t i = 0; i < at.times.size(); ++i) include(at.reading[i]);
  if (!(lo <= hi)) lo = 0, hi = 1;
  const double pad = 0.04 * (hi - lo);
  return {top, bottom, LinearScale(0, p.last_time > 0 ? p.last_time : 1, plot_left, plot_right, 9),
          LinearScale(lo >= 0 ? std::max(lo - pad, 0.0) : lo - pad, hi + pad, bottom, top, 6)};
}

/// The band (a polygon along its upper edge and back along its lower) and the best fit's line over it.
void draw_band_and_line(Document& doc, const PlotData& p, const PanelScales& s) {
  const fit::PredictionBand& curve = *p.curve;
  const LinearScale &time = s.time, &value = s.value;
  if (p.has_band) {
    std::vector<std::pair<double, double>> outline;
    for (std::size_t i = 0; i < curve.times.size(); ++i)
      if (finite(curve.upper[i])) outline.emplace_back(time(curve.times[i]), value(curve.upper[i] * p.scale));
    for (std::size_t i = curve.times.size(); i-- > 0;)
      if (finite(curve.lower[i])) outline.emplace_back(time(curve.times[i]), value(curve.lower[i] * p.scale));
    doc.add("polygon", {{"class", "band"},
                        {"points", svg::points(outline)},
                        {"fill", curve_colour},
                        {"fill-opacity", 0.16},
                        {"stroke", "none"}});
  }
  if (p.has_curve) {
    std::vector<std::pair<double, double>> line;
    for (std::size_t i = 0; i < curve.times.size(); ++i)
      if (finite(curve.reading[i])) line.emplace_back(time(curve.times[i]), value(curve.reading[i] * p.scale));
    doc.add("polyline", {{"class", "prediction"},
                         {"points", svg::points(line)},
                         {"fill", "none"},
                         {"stroke", curve_colour},
                         {"stroke-width", 2.2},
                         {"stroke-linejoin", "round"}});
  }
}

/// The measured readings within the time axis: an error bar of the resolution (when stated) and a dot whose
/// tooltip gives the reading and the band at its time.
void draw_measured(Document& doc, const PlotData& p, const PanelScales& s) {
  if (!p.measured) return;
  const LinearScale &time = s.time, &value = s.value;
  const double sigma = p.sigma, scale = p.scale;
  for (std::size_t i = 0; i < p.measured->times.size(); ++i) {
    const double t = p.measured->times[i], v = p.measured->values[i];
    if (!finite(v) || t > time.hi()) continue;
    if (sigma > 0)
      doc.add("path", {{"class", "error-bar"},
                       {"d", fmt::format("M{0} {1}V{2}", svg::number(time(t)), svg::number(value((v - sigma) * scale)),
                                         svg::number(value((v + sigma) * scale)))},
                       {"stroke", measured_colour},
                       {"stroke-width", 1.1}});
    std::string tip = fmt::format("measured: t = {:.4g} s, {} {:.4g} {}", t, p.reading, v * scale, p.unit);
    if (!p.measured_band_low.empty())
      tip += fmt::format(" (band {:.4g} to {:.4g} {})", p.measured_band_low[i] * scale,
                         p.measured_band_high[i] * scale, p.unit);
    svg::marker(doc, svg::Shape::Circle, time(t), value(v * scale), 3.2,
                {{"class", "measured"}, {"fill", measured_colour}, {"stroke", measured_colour}}, tip);
  }
}

/// The requested times: a hollow diamond each, its tooltip the prediction and its band (from 10 draws on).
void draw_requested_times(Document& doc, const PlotData& p, const PanelScales& s) {
  const fit::PredictionBand& at = *p.at;
  if (!at.ok) return;
  const double scale = p.scale;
  for (std::size_t i = 0; i < at.times.size(); ++i) {
    if (!finite(at.reading[i])) continue;
    std::string tip =
        fmt::format("predicted: t = {:.4g} s, {} {:.4g} {}", at.times[i], p.reading, at.reading[i] * scale, p.unit);
    if (at.samples >= 10)
      tip += fmt::format(" (95% band {:.4g} to {:.4g} {})", at.lower[i] * scale, at.upper[i] * scale, p.unit);
    svg::marker(doc, svg::Shape::Diamond, s.time(at.times[i]), s.value(at.reading[i] * scale), 4.6,
                {{"class", "predicted"}, {"fill", "#ffffff"}, {"stroke", curve_colour}, {"stroke-width", 1.8}}, tip);
  }
}

/// The panel: grid and value axis, band and line, measured readings, requested times on top, then the frame
/// and the time axis. Returns the y below it.
double plot_panel(Document& doc, const PlotData& p, double y) {
  const PanelScales s = panel_scales(p, y);
  svg::vertical_grid(doc, s.time, s.top, s.bottom);
  svg::y_axis(doc, s.value, plot_left, plot_right, fmt::format("{} [{}]", p.reading, p.unit));
  draw_band_and_line(doc, p, s);
  draw_measured(doc, p, s);
  draw_requested_times(doc, p, s);
  svg::plot_frame(doc, plot_left, s.top, plot_right, s.bottom);
  svg::x_ticks(doc, s.time, s.bottom);
  svg::x_axis_name(doc, plot_left, plot_right, s.bottom + 36, "time after the release [s]");
  return s.bottom + 56;
}

/// Footer: what the band leaves out, the report's notes, a failed line, then the caution; the finished SVG.
std::string plot_footer(Document& doc, const PredictionReport& report, const PlotData& p, double y) {
  std::vector<std::string> notes = report.notes;
  notes.insert(notes.begin(),
               "The band carries only the fit's parameter uncertainty: not the model's own error, differences "
               "between two rigs of the same design, or the other rig's release time (the prediction starts at its "
               "release).");
  if (!p.has_curve) notes.push_back("The forward model failed for the best fit on this rig: no curve is drawn.");
  for (const auto& n : notes) y = svg::text_lines(doc, svg::wrap(n, text_column, 12), page_margin, y, 12, amber) + 2;
  y += 6;
  return svg::finish_with_caution(doc, bench_caution, y, page_width, page_margin, muted);
}

}  // namespace

std::string prediction_plot_svg(const PredictionReport& report) {
  const PlotData p = plot_data(report);
  Document doc(page_width,
               fmt::format("spreadfit: predicted {} on {}", p.reading, io::rig_kind_name(report.rig->setup.rig)));
  doc.add("rect", {{"x", 0.0}, {"y", 0.0}, {"width", "100%"}, {"height", "100%"}, {"fill", "#ffffff"}});
  double y = plot_header(doc, report, p);
  y = plot_legend(doc, p, y);
  y = plot_panel(doc, p, y);
  return plot_footer(doc, report, p, y);
}

}  // namespace spreadfit::report
