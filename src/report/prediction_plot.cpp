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

}  // namespace

std::string prediction_plot_svg(const PredictionReport& report) {
  const io::TestDescription& rig = *report.rig;
  const fit::FitResult& fit = *report.material;
  const std::string reading(reading_name(report.reading));

  // Readings of the same kind on this rig, if its description has them: the prediction's check.
  const io::ReadingSeries* measured = nullptr;
  for (const auto& s : rig.series)
    if (s.kind == report.reading && !s.times.empty()) {
      measured = &s;
      break;
    }
  const fit::PredictionBand& curve = report.curve;
  const fit::PredictionBand& at = report.at_times;
  const bool has_curve = curve.ok && curve.reading.size() == curve.times.size() && !curve.times.empty();
  const bool has_band = has_curve && curve.samples >= 10;

  double largest = 0, last_time = 0;
  auto include_extent = [&](const std::vector<double>& v) {
    for (double x : v)
      if (finite(x)) largest = std::max(largest, std::abs(x));
  };
  if (has_curve) include_extent(curve.upper), include_extent(curve.reading), last_time = curve.times.back();
  if (at.ok) include_extent(at.upper);
  for (double t : at.times) last_time = std::max(last_time, t);
  if (measured) include_extent(measured->values), last_time = std::max(last_time, measured->times.back());
  const double scale = largest >= 0.03 ? 100 : 1000;
  const std::string unit = largest >= 0.03 ? "cm" : "mm";
  const double sigma = rig.resolution.value_or(0.0);

  int inside = 0, compared = 0;
  std::vector<double> measured_band_low, measured_band_high;
  if (measured && has_band) {
    // Band at the measured times by linear interpolation of the dense band (81 times: fine enough for a count).
    auto interpolate = [&](const std::vector<double>& v, double t) {
      const auto it = std::upper_bound(curve.times.begin(), curve.times.end(), t);
      if (it == curve.times.begin()) return v.front();
      if (it == curve.times.end()) return v.back();
      const std::size_t j = std::size_t(it - curve.times.begin());
      const double f = (t - curve.times[j - 1]) / (curve.times[j] - curve.times[j - 1]);
      return v[j - 1] + f * (v[j] - v[j - 1]);
    };
    for (double t : measured->times) {
      measured_band_low.push_back(interpolate(curve.lower, t));
      measured_band_high.push_back(interpolate(curve.upper, t));
    }
    for (std::size_t i = 0; i < measured->times.size(); ++i) {
      if (measured->times[i] > curve.times.back()) continue;
      ++compared;
      const double v = measured->values[i];
      if (v + sigma >= measured_band_low[i] && v - sigma <= measured_band_high[i]) ++inside;
    }
  }

  Document doc(page_width, fmt::format("spreadfit: predicted {} on {}", reading, io::rig_kind_name(rig.setup.rig)));
  doc.add("rect", {{"x", 0.0}, {"y", 0.0}, {"width", "100%"}, {"height", "100%"}, {"fill", "#ffffff"}});

  // --- header ---------------------------------------------------------------------------------------------------
  const double text_width = page_width - 2 * page_margin;
  double y = svg::text_lines(
      doc, svg::wrap(fmt::format("Predicted {} on the {}", reading, io::rig_kind_name(rig.setup.rig)), text_width, 19),
      page_margin, 34, 19, ink, "bold");
  y += 2;
  y = svg::text_lines(doc, svg::wrap(rig_text(rig), text_width, 13), page_margin, y, 13, ink);
  y = svg::text_lines(doc, svg::wrap(material_text(fit, report.material_source), text_width, 13), page_margin, y, 13,
                      ink);
  std::string band_text =
      has_band ? fmt::format("Band: 2.5% to 97.5% of the readings of {} parameter draws from the fit's uncertainty.",
                             curve.samples)
               : "No band: the fit's uncertainty could not be sampled (see notes); the line is the best fit.";
  if (measured) {
    band_text += fmt::format(" Measured on this rig: {} readings ({})", measured->times.size(),
                             std::filesystem::path(measured->source).filename().string());
    band_text += has_band ? fmt::format(", {} of {} within the band{}.", inside, compared,
                                        sigma > 0 ? " allowing the stated resolution" : "")
                          : ".";
  }
  y = svg::text_lines(doc, svg::wrap(band_text, text_width, 12), page_margin, y, 12, muted);

  // --- legend -----------------------------------------------------------------------------------------------------
  {
    y += 6;
    double x = page_margin;
    const double cy = y + 10;
    auto entry = [&](const std::string& text) {
      doc.add_text("text", {{"x", x + 26}, {"y", cy + 4}, {"font-size", 12.0}, {"fill", ink}}, text);
      x += 26 + svg::text_width(text, 12) + 20;
    };
    doc.add("line",
            {{"x1", x}, {"y1", cy}, {"x2", x + 20}, {"y2", cy}, {"stroke", curve_colour}, {"stroke-width", 2.2}});
    entry("prediction (best fit)");
    if (has_band) {
      doc.add(
          "rect",
          {{"x", x}, {"y", cy - 6}, {"width", 20.0}, {"height", 12.0}, {"fill", curve_colour}, {"fill-opacity", 0.18}});
      entry("95% band");
    }
    svg::marker(doc, svg::Shape::Diamond, x + 10, cy, 4.0,
                {{"class", "legend-predicted"}, {"fill", "#ffffff"}, {"stroke", curve_colour}, {"stroke-width", 1.6}});
    entry("requested times");
    if (measured) {
      svg::marker(doc, svg::Shape::Circle, x + 10, cy, 3.4,
                  {{"class", "legend-measured"}, {"fill", measured_colour}, {"stroke", measured_colour}});
      entry(sigma > 0 ? fmt::format("measured on this rig, \u00b1{:.3g} mm", sigma * 1e3) : "measured on this rig");
    }
    y += 34;
  }

  // --- panel ------------------------------------------------------------------------------------------------------
  const double top = y, bottom = y + panel_height;
  double lo = INFINITY, hi = -INFINITY;
  auto include = [&](double v) {
    if (finite(v)) lo = std::min(lo, v * scale), hi = std::max(hi, v * scale);
  };
  if (has_curve)
    for (std::size_t i = 0; i < curve.times.size(); ++i)
      include(curve.reading[i]), include(curve.lower[i]), include(curve.upper[i]);
  if (measured)
    for (double v : measured->values) include(v - sigma), include(v + sigma);
  if (at.ok)
    for (std::size_t i = 0; i < at.times.size(); ++i) include(at.reading[i]);
  if (!(lo <= hi)) lo = 0, hi = 1;
  const double pad = 0.04 * (hi - lo);
  const LinearScale time(0, last_time > 0 ? last_time : 1, plot_left, plot_right, 9);
  const LinearScale value(lo >= 0 ? std::max(lo - pad, 0.0) : lo - pad, hi + pad, bottom, top, 6);
  svg::vertical_grid(doc, time, top, bottom);
  svg::y_axis(doc, value, plot_left, plot_right, fmt::format("{} [{}]", reading, unit));
  if (has_band) {
    std::vector<std::pair<double, double>> outline;
    for (std::size_t i = 0; i < curve.times.size(); ++i)
      if (finite(curve.upper[i])) outline.emplace_back(time(curve.times[i]), value(curve.upper[i] * scale));
    for (std::size_t i = curve.times.size(); i-- > 0;)
      if (finite(curve.lower[i])) outline.emplace_back(time(curve.times[i]), value(curve.lower[i] * scale));
    doc.add("polygon", {{"class", "band"},
                        {"points", svg::points(outline)},
                        {"fill", curve_colour},
                        {"fill-opacity", 0.16},
                        {"stroke", "none"}});
  }
  if (has_curve) {
    std::vector<std::pair<double, double>> line;
    for (std::size_t i = 0; i < curve.times.size(); ++i)
      if (finite(curve.reading[i])) line.emplace_back(time(curve.times[i]), value(curve.reading[i] * scale));
    doc.add("polyline", {{"class", "prediction"},
                         {"points", svg::points(line)},
                         {"fill", "none"},
                         {"stroke", curve_colour},
                         {"stroke-width", 2.2},
                         {"stroke-linejoin", "round"}});
  }
  if (measured) {
    for (std::size_t i = 0; i < measured->times.size(); ++i) {
      const double t = measured->times[i], v = measured->values[i];
      if (!finite(v) || t > time.hi()) continue;
      if (sigma > 0)
        doc.add("path",
                {{"class", "error-bar"},
                 {"d", fmt::format("M{0} {1}V{2}", svg::number(time(t)), svg::number(value((v - sigma) * scale)),
                                   svg::number(value((v + sigma) * scale)))},
                 {"stroke", measured_colour},
                 {"stroke-width", 1.1}});
      std::string tip = fmt::format("measured: t = {:.4g} s, {} {:.4g} {}", t, reading, v * scale, unit);
      if (!measured_band_low.empty())
        tip += fmt::format(" (band {:.4g} to {:.4g} {})", measured_band_low[i] * scale, measured_band_high[i] * scale,
                           unit);
      svg::marker(doc, svg::Shape::Circle, time(t), value(v * scale), 3.2,
                  {{"class", "measured"}, {"fill", measured_colour}, {"stroke", measured_colour}}, tip);
    }
  }
  if (at.ok)
    for (std::size_t i = 0; i < at.times.size(); ++i) {
      if (!finite(at.reading[i])) continue;
      std::string tip =
          fmt::format("predicted: t = {:.4g} s, {} {:.4g} {}", at.times[i], reading, at.reading[i] * scale, unit);
      if (at.samples >= 10)
        tip += fmt::format(" (95% band {:.4g} to {:.4g} {})", at.lower[i] * scale, at.upper[i] * scale, unit);
      svg::marker(doc, svg::Shape::Diamond, time(at.times[i]), value(at.reading[i] * scale), 4.6,
                  {{"class", "predicted"}, {"fill", "#ffffff"}, {"stroke", curve_colour}, {"stroke-width", 1.8}}, tip);
    }
  svg::plot_frame(doc, plot_left, top, plot_right, bottom);
  svg::x_ticks(doc, time, bottom);
  svg::x_axis_name(doc, plot_left, plot_right, bottom + 36, "time after the release [s]");
  y = bottom + 56;

  // --- footer -----------------------------------------------------------------------------------------------------
  std::vector<std::string> notes = report.notes;
  notes.insert(notes.begin(),
               "The band carries only the fit's parameter uncertainty: not the model's own error, differences "
               "between two rigs of the same design, or the other rig's release time (the prediction starts at its "
               "release).");
  if (!has_curve) notes.push_back("The forward model failed for the best fit on this rig: no curve is drawn.");
  for (const auto& n : notes) y = svg::text_lines(doc, svg::wrap(n, text_width, 12), page_margin, y, 12, amber) + 2;
  y += 6;
  return svg::finish_with_caution(doc, bench_caution, y, page_width, page_margin, muted);
}

}  // namespace spreadfit::report
