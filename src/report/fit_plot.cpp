#include "src/report/fit_plot.hpp"
#include "src/fit/parameter_names.hpp"
#include "src/report/interval_text.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <stdexcept>
#include <variant>

#include "src/fit/prediction_band.hpp"
#include "src/io/units.hpp"
#include "src/report/svg_document.hpp"
#include "src/version.hpp"

namespace spreadfit::report {

namespace {

using svg::Attributes;
using svg::Document;
using svg::LinearScale;
using svg::Shape;

constexpr double page_width = 900;
constexpr double page_margin = 20;              // header and footer left/right margin
constexpr double plot_left = 88;                // plot area, x
constexpr double plot_right = page_width - 44;  // room for the +/-2 sigma labels right of the residual panel
constexpr double reading_panel_height = 270;
constexpr double residual_panel_height = 120;
constexpr double badge_width = 104;
constexpr int dense_points = 81;           // fitted curve: times from the fitted release to the last reading
constexpr double final_panel_height = 64;  // a final-only test's reading on its scale
constexpr int band_draws = 200;            // parameter draws for the 95% band

using svg::frame;
using svg::ink;
using svg::muted;
constexpr const char* alarm = "#b3261e";
constexpr const char* good = "#1e7b34";
constexpr const char* amber = "#8a5300";

struct Look {
  const char* colour;
  Shape shape;
};
// Dark, well separated hues on white; the shape differs too.
constexpr Look looks[] = {{"#1f4e9c", Shape::Circle},  {"#b5451b", Shape::Square}, {"#2c7a3f", Shape::Triangle},
                          {"#6b3fa0", Shape::Diamond}, {"#8a6a12", Shape::Circle}, {"#0f6e7a", Shape::Square}};

// One series as plotted.
struct View {
  std::size_t index = 0;  // in the fit's series order (selects the fitted release time)
  const fit::FitSeries* series = nullptr;
  std::string name;
  Look look{};
  double sigma = 0;           // error bar half-length [m]; 0: none
  bool sigma_stated = false;  // the bars are the stated resolution (else the fit's scatter)
  double release = 0;         // fitted release time [s] on the series' clock (0 when not fitted)
  std::string unit;           // the reading unit as the readings file wrote it; empty when not known
  int rig = 0;                // Rig variant index: series of different rigs get panels of their own
  fit::PredictionBand curve;       // dense best fit and band; empty when there is no fit
  bool has_curve = false, has_band = false;
  std::vector<double> fitted;  // best fit at the reading times; empty when not available
};

// A reading axis: the values of one kind of reading on one kind of rig, in the unit the readings were entered in
// (else cm from 3 cm up, mm below), with a time axis of its own that fits its series.
struct Panel {
  Reading reading = Reading::Front;
  int rig = 0;
  std::vector<std::size_t> views;
  double scale = 1000;  // display units per metre
  std::string unit = "mm";
  double t_lo = 0, t_hi = 1;  // time axis [s]
};

// A length in mm, as the header and the legend both write it (so the two always agree).
std::string mm(double metres) { return fmt::format("{:.3g} mm", metres * 1e3); }

// Display units per metre of a length unit symbol, or 0 when it is not one.
double per_metre(const std::string& unit) {
  if (unit.empty()) return 0;
  try {
    return 1.0 / io::convert_to_si(1.0, unit, io::Dimension::Length);
  } catch (const io::UnitError&) {  // not a length unit
    return 0;
  }
}

// The readings unit of the series read from `source`, from the test descriptions.
std::string entered_unit(const FitOutcome& outcome, const std::string& source) {
  for (const auto& t : outcome.tests)
    for (const auto& s : t.series)
      if (s.source == source) return s.value_unit;
  return {};
}

std::string panel_title(const Panel& p) {
  static const char* rig_names[] = {"channel", "plate", "squeeze", "slump"};
  const std::string rig = p.rig >= 0 && p.rig < 4 ? rig_names[p.rig] : "rig";
  return rig + " \u00b7 " + std::string(reading_name(p.reading));
}

fit::PredictionBand band_or_failure(const fit::FitResult& fit, const TestSetup& setup, const std::vector<double>& times,
                               std::size_t index, int draws) {
  try {
    return fit::prediction_band(fit, setup, times, index, draws);
  } catch (const std::invalid_argument&) {  // an invalid material or rig: no curve, said in the legend
    fit::PredictionBand failed;
    failed.ok = false;
    return failed;
  }
}

std::string display_name(const fit::FitSeries& s, std::size_t index) {
  if (s.label.empty()) return fmt::format("series {}", index + 1);
  const std::string file = std::filesystem::path(s.label).filename().string();
  return file.empty() ? s.label : file;
}

std::string parameter_text(const fit::ParameterEstimate& p) {
  std::string name = p.name;
  std::replace(name.begin(), name.end(), '_', ' ');
  const std::string unit = p.unit == "-" ? "" : " " + svg::unit_text(p.unit);
  const std::string interval = "95%: " + interval_text(p);
  return fmt::format("{} {:.4g}{} ({})", name, p.value, unit, interval);
}

bool finite(double v) { return std::isfinite(v); }

void verdict_badge(Document& doc, const qc::Verdict& verdict, double y) {
  const char* colour = verdict.status == qc::Verdict::Status::Pass   ? good
                       : verdict.status == qc::Verdict::Status::Fail ? alarm
                                                                 : "#6b7280";
  const char* word = verdict.status == qc::Verdict::Status::Pass   ? "PASS"
                     : verdict.status == qc::Verdict::Status::Fail ? "FAIL"
                                                               : "NO SPEC";
  const double x = page_width - page_margin - badge_width;
  doc.add_text("text",
               {{"x", x + badge_width / 2},
                {"y", y + 10},
                {"font-size", 10.0},
                {"fill", muted},
                {"text-anchor", "middle"},
                {"letter-spacing", 1.0}},
               "VERDICT");
  doc.add("rect", {{"x", x}, {"y", y + 16}, {"width", badge_width}, {"height", 30.0}, {"rx", 5.0}, {"fill", colour}});
  doc.add_text("text",
               {{"class", "verdict"},
                {"x", x + badge_width / 2},
                {"y", y + 36},
                {"font-size", 16.0},
                {"font-weight", "bold"},
                {"fill", "#ffffff"},
                {"text-anchor", "middle"}},
               word);
  double line = y + 62;
  const bool marginal =
      std::any_of(verdict.checks.begin(), verdict.checks.end(), [](const qc::SpecCheck& c) { return c.marginal; });
  if (marginal) {
    doc.add_text("text",
                 {{"x", x + badge_width / 2},
                  {"y", line},
                  {"font-size", 11.0},
                  {"fill", amber},
                  {"text-anchor", "middle"},
                  {"font-weight", "bold"}},
                 "marginal");
    line += 14;
  }
  for (const qc::SpecCheck& c : verdict.checks) {
    doc.add_text("text",
                 {{"x", x + badge_width},
                  {"y", line},
                  {"font-size", 10.0},
                  {"fill", c.pass ? muted : alarm},
                  {"text-anchor", "end"}},
                 fmt::format("{} {}", c.parameter, c.pass ? "pass" : (c.available ? "FAIL" : "missing")));
    line += 13;
  }
}

// The reading of each final-only test (a slump, or a plate or channel read once after it stopped) on a scale from
// zero: the measured value with its stated resolution, and for a slump the cylinder's height, the most it can fall.
double final_reading_panels(Document& doc, const FitOutcome& outcome, double y) {
  for (const auto& t : outcome.tests) {
    if (!t.final_reading) continue;
    const double measured = *t.final_reading;
    const double resolution = t.resolution.value_or(0.0);
    const auto* slump = std::get_if<SlumpRig>(&t.setup.rig);
    const double scale = measured >= 0.03 ? 100 : 1000;
    const std::string unit = scale == 100 ? "cm" : "mm";
    const std::string what = std::string(reading_name(t.setup.reading));
    double hi = std::max(1.25 * (measured + resolution), 1e-6);
    if (slump) hi = std::max(hi, 1.05 * slump->height);
    const LinearScale axis(0, hi * scale, plot_left, plot_right, 8);
    std::string note = fmt::format("Measured {} (final reading of {}): {:.4g} {}", what,
                                   std::filesystem::path(t.path).filename().string(), measured * scale, unit);
    note += resolution > 0 ? fmt::format(", resolution {}", mm(resolution)) : ", no resolution stated";
    if (slump) note += fmt::format("; the cylinder was {:.4g} {} high", slump->height * scale, unit);
    y = svg::text_lines(doc, svg::wrap(note, plot_right - page_margin, 13), page_margin, y + 4, 13, ink, "normal",
                        "final-note");
    const double top = y, bottom = y + final_panel_height, mid = 0.5 * (top + bottom);
    svg::vertical_grid(doc, axis, top, bottom);
    if (slump) {
      const double x = axis(slump->height * scale);
      doc.add("line", {{"class", "cylinder-height"},
                       {"x1", x},
                       {"y1", top},
                       {"x2", x},
                       {"y2", bottom},
                       {"stroke", muted},
                       {"stroke-width", 1.4},
                       {"stroke-dasharray", "5 4"}});
      doc.add_text("text",
                   {{"x", x - 4}, {"y", top + 13}, {"font-size", 11.0}, {"fill", muted}, {"text-anchor", "end"}},
                   "cylinder height");
    }
    doc.add("rect", {{"x", axis(0)},
                     {"y", mid - 7},
                     {"width", std::max(axis(measured * scale) - axis(0), 0.0)},
                     {"height", 14.0},
                     {"fill", looks[0].colour},
                     {"fill-opacity", 0.18}});
    const double x = axis(measured * scale);
    if (resolution > 0) {
      const double x1 = axis((measured - resolution) * scale), x2 = axis((measured + resolution) * scale);
      doc.add("path", {{"class", "error-bar"},
                       {"d", fmt::format("M{0} {1}H{2}M{0} {3}V{4}M{2} {3}V{4}", svg::number(x1), svg::number(mid),
                                         svg::number(x2), svg::number(mid - 4), svg::number(mid + 4))},
                       {"stroke", looks[0].colour},
                       {"stroke-width", 1.2},
                       {"fill", "none"}});
    }
    svg::marker(doc, Shape::Diamond, x, mid, 5.0,
                {{"class", "final-reading"}, {"fill", looks[0].colour}, {"stroke", "#ffffff"}, {"stroke-width", 1.0}},
                fmt::format("measured {}: {:.4g} {}", what, measured * scale, unit));
    doc.add_text("text",
                 {{"x", x},
                  {"y", mid - 12},
                  {"font-size", 12.0},
                  {"fill", ink},
                  {"text-anchor", "middle"},
                  {"font-weight", "bold"}},
                 fmt::format("{:.4g} {}", measured * scale, unit));
    svg::plot_frame(doc, plot_left, top, plot_right, bottom);
    svg::x_ticks(doc, axis, bottom);
    svg::x_axis_name(doc, plot_left, plot_right, bottom + 32, fmt::format("{} [{}]", what, unit));
    y = bottom + 50;
  }
  return y;
}

// --- data: what each series shows -------------------------------------------------------------------------
std::vector<View> series_views(const FitOutcome& outcome, const std::vector<fit::FitSeries>& series, const fit::FitResult* r) {
  std::vector<View> views;
  for (std::size_t i = 0; i < series.size(); ++i) {
    const fit::FitSeries& s = series[i];
    if (s.times.empty() || s.times.size() != s.values.size()) continue;
    View v;
    v.index = i;
    v.series = &s;
    v.name = display_name(s, i);
    v.look = looks[views.size() % std::size(looks)];
    v.sigma_stated = s.sigma && *s.sigma > 0 && finite(*s.sigma);
    v.sigma = v.sigma_stated ? *s.sigma : (r ? r->sigma : 0.0);
    if (!(v.sigma > 0) || !finite(v.sigma)) v.sigma = 0;
    v.unit = entered_unit(outcome, s.label);
    v.rig = int(s.setup.rig.index());
    if (r && i < r->time_origins.size() && finite(r->time_origins[i])) v.release = r->time_origins[i];
    if (r) {
      // From the fitted release (not before it: the sample was still behind the gate) to the last reading.
      const double from = std::min(v.release, s.times.front());
      std::vector<double> dense(dense_points);
      for (int k = 0; k < dense_points; ++k)
        dense[std::size_t(k)] = from + (s.times.back() - from) * k / (dense_points - 1);
      v.curve = band_or_failure(*r, s.setup, dense, i, band_draws);
      v.has_curve = v.curve.ok && v.curve.reading.size() == dense.size();
      v.has_band = v.has_curve && v.curve.samples >= 10;
      const fit::PredictionBand at_readings = band_or_failure(*r, s.setup, s.times, i, 0);
      if (at_readings.ok && at_readings.reading.size() == s.times.size()) v.fitted = at_readings.reading;
    }
    views.push_back(std::move(v));
  }
  return views;
}

// --- layout: one panel per rig and reading, its unit and its time range -----------------------------------------
std::vector<Panel> reading_panels(const std::vector<View>& views) {
  std::vector<Panel> panels;
  for (std::size_t k = 0; k < views.size(); ++k) {
    const Reading reading = views[k].series->setup.reading;
    auto it = std::find_if(panels.begin(), panels.end(),
                           [&](const Panel& p) { return p.reading == reading && p.rig == views[k].rig; });
    if (it == panels.end()) {
      panels.push_back(Panel{reading, views[k].rig, {}, 1000, "mm", 0, 1});
      it = panels.end() - 1;
    }
    it->views.push_back(k);
  }
  for (Panel& p : panels) {
    const View& first = views[p.views.front()];
    if (const double factor = per_metre(first.unit); factor > 0) {
      p.scale = factor, p.unit = first.unit;
    } else {
      double largest = 0;
      for (std::size_t k : p.views)
        for (double v : views[k].series->values) largest = std::max(largest, std::abs(v));
      if (largest >= 0.03) p.scale = 100, p.unit = "cm";
    }
    p.t_lo = 0, p.t_hi = 0;
    for (std::size_t k : p.views) {
      const View& v = views[k];
      p.t_lo = std::min(p.t_lo, v.has_curve ? v.curve.times.front() : v.series->times.front());
      p.t_hi = std::max(p.t_hi, v.series->times.back());
    }
    if (!(p.t_hi > p.t_lo)) p.t_hi = p.t_lo + 1;
    if (p.t_lo < 0) p.t_lo -= 0.015 * (p.t_hi - p.t_lo);  // the curve's start clear of the frame
  }
  return panels;
}

// --- header: sample, model, parameters, fit summary (or why there is no result), and the verdict badge -----------
double header(Document& doc, const FitOutcome& outcome, const std::vector<View>& views, const fit::FitResult* r,
              const std::string& sample_id, const std::string& product) {
  const double text_width = page_width - 2 * page_margin - badge_width - 24;
  std::string title = "Sample " + sample_id;
  if (!product.empty()) title += "  \u00b7  product " + product;
  double y = svg::text_lines(doc, svg::wrap(title, text_width, 19), page_margin, 34, 19, ink, "bold");
  y += 2;
  if (r) {
    std::string model = fmt::format("Model: {}", law_name(r->law));
    if (!outcome.choice_explanation.empty()) model += " (" + outcome.choice_explanation + ")";
    y = svg::text_lines(doc, svg::wrap(model, text_width, 13), page_margin, y, 13, ink);
    std::string parameters;
    for (const auto& p : r->parameters) {
      if (fit::is_parameter(p.name, fit::Parameter::TimeOrigin)) continue;
      if (!parameters.empty()) parameters += ";  ";
      parameters += parameter_text(p);
    }
    y = svg::text_lines(doc, svg::wrap(parameters, text_width, 13), page_margin, y, 13, ink);
    // The resolution as the legend states it, and the uncertainty the intervals rest on when that is larger.
    std::vector<double> stated;
    for (const View& v : views)
      if (v.sigma_stated && std::find(stated.begin(), stated.end(), v.sigma) == stated.end()) stated.push_back(v.sigma);
    std::string fit = finite(r->rmse) ? fmt::format("Fit: rmse {} over {} points", mm(r->rmse), r->points)
                                      : std::string("Fit: closed form from the arrested reading");
    if (!stated.empty()) {
      std::vector<std::string> texts;
      for (double s : stated) texts.push_back(mm(s));
      fit += fmt::format("; stated resolution {} (the error bars)", fmt::join(texts, ", "));
      if (stated.size() == 1 && finite(r->sigma) && r->sigma > stated.front() * (1 + 1e-6))
        fit += fmt::format("; the intervals use {}, the scatter being larger", mm(r->sigma));
    } else if (!views.empty() && finite(r->sigma) && r->sigma > 0) {
      fit += fmt::format("; no resolution stated: bars and intervals use the fit's scatter, {}", mm(r->sigma));
    }
    y = svg::text_lines(doc, svg::wrap(fit, text_width, 12), page_margin, y, 12, muted, "normal", "fit-summary");
  } else {
    y = svg::text_lines(
        doc, svg::wrap("No result: the fit failed, so no parameters, curve or residuals are shown.", text_width, 13),
        page_margin, y, 13, alarm, "bold");
    for (const auto& c : outcome.candidates)
      y = svg::text_lines(doc,
                          svg::wrap(fmt::format("{}: {}{}", law_name(c.law), fit::fit_status_name(c.status),
                                                c.reason.empty() ? "" : " \u2014 " + c.reason),
                                    text_width, 12),
                          page_margin, y, 12, muted);
  }
  verdict_badge(doc, outcome.verdict, 14);
  const double badge_bottom = 14 + 62 + double(outcome.verdict.checks.size() + 1) * 13.0;
  y = std::max(y, badge_bottom);
  return y;
}

// --- legend ---------------------------------------------------------------------------------------------------
double legend(Document& doc, const std::vector<View>& views, const fit::FitResult* r, double y) {
  struct Entry {
    enum Kind { Marker, Line, Band } kind;
    Look look;
    std::string text;
  };
  std::vector<Entry> entries;
  for (const View& v : views) {
    std::string text = fmt::format("{}: {} reading{}", v.name, v.series->times.size(),
                                   v.series->times.size() == 1 ? "" : "s");
    if (v.sigma > 0)
      text += v.sigma_stated ? fmt::format(", bars \u00b1{}, the stated resolution", mm(v.sigma))
                             : fmt::format(", bars \u00b1{}, the fit's scatter", mm(v.sigma));
    else
      text += ", no stated uncertainty";
    if (r && !v.has_curve)
      text += "; fitted curve could not be computed";
    else if (r && !v.has_band)
      text += "; 95% band not available";
    entries.push_back({Entry::Marker, v.look, text});
  }
  if (r && !views.empty()) {
    std::string line = views.size() > 1 ? "best fit from the fitted release (colour of its series)"
                                        : "best fit from the fitted release";
    const bool before_clock = std::any_of(views.begin(), views.end(), [](const View& v) { return v.release < 0; });
    if (before_clock) line += "; dotted: the clock's zero";
    entries.push_back({Entry::Line, views.front().look, line});
    entries.push_back({Entry::Band, views.front().look, "95% band of the fit"});
  }
  {
    double x = page_margin;
    y += 6;
    for (const Entry& e : entries) {
      const double w = 26 + svg::text_width(e.text, 12) + 20;
      if (x > page_margin && x + w > page_width - page_margin) x = page_margin, y += 20;
      const double cy = y + 10;
      if (e.kind == Entry::Marker) {
        doc.add("line", {{"x1", x + 9}, {"y1", cy - 7}, {"x2", x + 9}, {"y2", cy + 7}, {"stroke", e.look.colour}});
        svg::marker(
            doc, e.look.shape, x + 9, cy, 3.6,
            {{"class", "legend-reading"}, {"fill", "#ffffff"}, {"stroke", e.look.colour}, {"stroke-width", 1.6}});
      } else if (e.kind == Entry::Line) {
        doc.add("line",
                {{"x1", x}, {"y1", cy}, {"x2", x + 20}, {"y2", cy}, {"stroke", e.look.colour}, {"stroke-width", 2.2}});
      } else {
        doc.add("rect", {{"x", x},
                         {"y", cy - 6},
                         {"width", 20.0},
                         {"height", 12.0},
                         {"fill", e.look.colour},
                         {"fill-opacity", 0.18}});
      }
      doc.add_text("text",
                   {{"class", e.kind == Entry::Marker ? "legend-series" : "legend"},
                    {"x", x + 26},
                    {"y", cy + 4},
                    {"font-size", 12.0},
                    {"fill", ink}},
                   e.text);
      x += w;
    }
    y += 30;
  }
  return y;
}

// A banner above the readings of a failed fit, where it cannot hide any of them.
double no_result_banner(Document& doc, double y) {
  doc.add("rect", {{"x", plot_left},
                   {"y", y - 8},
                   {"width", plot_right - plot_left},
                   {"height", 26.0},
                   {"rx", 3.0},
                   {"fill", "#fdecea"},
                   {"stroke", alarm}});
  doc.add_text("text",
               {{"class", "no-result"},
                {"x", plot_left + 12},
                {"y", y + 10},
                {"font-size", 13.0},
                {"font-weight", "bold"},
                {"fill", alarm}},
               "NO RESULT \u2014 readings only: the fit failed (reasons above)");
  y += 32;
  return y;
}

// The readings of one panel: bands, fitted curves (clipped to the panel), the clock's start, readings with bars.
double reading_panel(Document& doc, const Panel& p, std::size_t pi, std::size_t panel_count,
                     const std::vector<View>& views, const fit::FitResult* r, const LinearScale& time, double y) {
  if (panel_count > 1) {
    doc.add_text("text",
                 {{"class", "panel-title"},
                  {"x", plot_left},
                  {"y", y},
                  {"font-size", 13.0},
                  {"font-weight", "bold"},
                  {"fill", ink}},
                 panel_title(p));
    y += 12;
  }
  const double top = y, bottom = y + reading_panel_height;
  // The value axis spans the readings with their bars and the fit over the readings' times: the curve from the
  // release may start far below (a channel's front at the gate), and is clipped to the panel there.
  double lo = INFINITY, hi = -INFINITY;
  auto include = [&](double v) {
    if (finite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  };
  for (std::size_t k : p.views) {
    const View& v = views[k];
    for (double value : v.series->values) include((value - v.sigma) * p.scale), include((value + v.sigma) * p.scale);
    if (v.has_curve)
      for (std::size_t i = 0; i < v.curve.times.size(); ++i) {
        if (v.curve.times[i] < v.series->times.front()) continue;
        include(v.curve.reading[i] * p.scale);
        if (v.has_band) include(v.curve.lower[i] * p.scale), include(v.curve.upper[i] * p.scale);
      }
  }
  const double pad = 0.06 * (hi - lo);
  // Readings are lengths: no axis below zero unless the data go there.
  const LinearScale value(lo >= 0 ? std::max(lo - pad, 0.0) : lo - pad, hi + pad, bottom, top, 6);
  svg::vertical_grid(doc, time, top, bottom);
  svg::y_axis(doc, value, plot_left, plot_right, fmt::format("{} [{}]", reading_name(p.reading), p.unit));
  svg::open_clipped_group(doc, fmt::format("panel-{}", pi + 1), plot_left, top, plot_right, bottom);
  for (std::size_t k : p.views) {  // bands first, under everything else
    const View& v = views[k];
    if (!v.has_band) continue;
    std::vector<std::pair<double, double>> outline;
    for (std::size_t i = 0; i < v.curve.times.size(); ++i)
      if (finite(v.curve.upper[i])) outline.emplace_back(time(v.curve.times[i]), value(v.curve.upper[i] * p.scale));
    for (std::size_t i = v.curve.times.size(); i-- > 0;)
      if (finite(v.curve.lower[i])) outline.emplace_back(time(v.curve.times[i]), value(v.curve.lower[i] * p.scale));
    doc.add("polygon", {{"class", "band"},
                        {"points", svg::points(outline)},
                        {"fill", v.look.colour},
                        {"fill-opacity", 0.16},
                        {"stroke", "none"}});
  }
  for (std::size_t k : p.views) {
    const View& v = views[k];
    if (!v.has_curve) continue;
    std::vector<std::pair<double, double>> line;
    for (std::size_t i = 0; i < v.curve.times.size(); ++i)
      if (finite(v.curve.reading[i])) line.emplace_back(time(v.curve.times[i]), value(v.curve.reading[i] * p.scale));
    doc.add("polyline", {{"class", "fit"},
                         {"points", svg::points(line)},
                         {"fill", "none"},
                         {"stroke", v.look.colour},
                         {"stroke-width", 2.2},
                         {"stroke-linejoin", "round"}});
  }
  doc.close();          // the clipped group
  if (r && p.t_lo < 0)  // the clock started after the release: mark where it started
    doc.add("line", {{"class", "clock-start"},
                     {"x1", time(0)},
                     {"y1", top},
                     {"x2", time(0)},
                     {"y2", bottom},
                     {"stroke", "#8d949c"},
                     {"stroke-width", 1.0},
                     {"stroke-dasharray", "2 3"}});
  for (std::size_t k : p.views) {
    const View& v = views[k];
    const fit::FitSeries& s = *v.series;
    for (std::size_t i = 0; i < s.times.size(); ++i) {
      const double x = time(s.times[i]), yv = value(s.values[i] * p.scale);
      if (v.sigma > 0) {
        const double y1 = value((s.values[i] - v.sigma) * p.scale), y2 = value((s.values[i] + v.sigma) * p.scale);
        const std::string d = fmt::format("M{0} {1}V{2}M{3} {1}H{4}M{3} {2}H{4}", svg::number(x), svg::number(y1),
                                          svg::number(y2), svg::number(x - 3), svg::number(x + 3));
        doc.add(
            "path",
            {{"class", "error-bar"}, {"d", d}, {"stroke", v.look.colour}, {"stroke-width", 1.1}, {"fill", "none"}});
      }
      std::string tip = fmt::format("{}: t = {:.4g} s, {} {:.4g} {}", v.name, s.times[i],
                                    reading_name(s.setup.reading), s.values[i] * p.scale, p.unit);
      if (!v.fitted.empty()) tip += fmt::format(" (fit {:.4g} {})", v.fitted[i] * p.scale, p.unit);
      svg::marker(doc, v.look.shape, x, yv, 3.4,
                  {{"class", "reading"}, {"fill", "#ffffff"}, {"stroke", v.look.colour}, {"stroke-width", 1.6}}, tip);
    }
  }
  svg::plot_frame(doc, plot_left, top, plot_right, bottom);
  svg::x_ticks(doc, time, bottom);
  y = bottom + 30;
  return y;
}

// Residuals of one panel's series, on the same time axis (or a note why there are none).
double residual_panel(Document& doc, const Panel& p, const std::vector<View>& views, const fit::FitResult* r,
                      const LinearScale& time, double y) {
  // Residuals of this panel's series, on the same time axis.
  const bool any_residuals =
      r && std::any_of(p.views.begin(), p.views.end(), [&](std::size_t k) { return !views[k].fitted.empty(); });
  if (any_residuals) {
    const double rtop = y, rbottom = y + residual_panel_height;
    const double two_sigma = 2 * r->sigma * 1e3;
    double extent = finite(two_sigma) ? two_sigma : 0;
    for (std::size_t k : p.views) {
      const View& v = views[k];
      for (std::size_t i = 0; i < v.fitted.size(); ++i) {
        const double e = (v.series->values[i] - v.fitted[i]) * 1e3;
        if (finite(e)) extent = std::max(extent, std::abs(e));
      }
    }
    if (!(extent > 0)) extent = 1;
    const LinearScale res(-1.1 * extent, 1.1 * extent, rbottom, rtop, 4);
    svg::vertical_grid(doc, time, rtop, rbottom);
    svg::y_axis(doc, res, plot_left, plot_right, "reading \u2212 fit [mm]");
    doc.add("line", {{"x1", plot_left},
                     {"y1", res(0)},
                     {"x2", plot_right},
                     {"y2", res(0)},
                     {"stroke", "#4a5058"},
                     {"stroke-width", 1.2}});
    if (two_sigma > 0 && finite(two_sigma)) {
      for (double level : {two_sigma, -two_sigma}) {
        doc.add("line", {{"x1", plot_left},
                         {"y1", res(level)},
                         {"x2", plot_right},
                         {"y2", res(level)},
                         {"stroke", "#8d949c"},
                         {"stroke-dasharray", "5 4"}});
        doc.add_text("text",
                     {{"class", "sigma-label"},
                      {"x", plot_right + 4},
                      {"y", res(level) + 3.5},
                      {"font-size", 10.0},
                      {"fill", muted}},
                     level > 0 ? "+2\u03c3" : "\u22122\u03c3");
      }
    }
    for (std::size_t k : p.views) {
      const View& v = views[k];
      for (std::size_t i = 0; i < v.fitted.size(); ++i) {
        const double e = (v.series->values[i] - v.fitted[i]) * 1e3;
        if (!finite(e)) continue;
        svg::marker(doc, v.look.shape, time(v.series->times[i]), res(e), 2.8,
                    {{"class", "residual"}, {"fill", v.look.colour}, {"stroke", v.look.colour}},
                    fmt::format("{}: t = {:.4g} s, residual {:.3g} mm", v.name, v.series->times[i], e));
      }
    }
    svg::plot_frame(doc, plot_left, rtop, plot_right, rbottom);
    svg::x_ticks(doc, time, rbottom);
    y = rbottom + 30;
  } else if (r) {
    doc.add_text("text", {{"x", page_margin}, {"y", y + 22}, {"font-size", 12.0}, {"fill", muted}},
                 "No residuals: the fitted curve could not be computed at the reading times.");
    y += 14;
  }
  return y;
}

// Notes where there is nothing to plot.
double nothing_to_plot_notes(Document& doc, const FitOutcome& outcome, const fit::FitResult* r, bool no_panels, double y) {
  const bool any_final = std::any_of(outcome.tests.begin(), outcome.tests.end(),
                                     [](const auto& t) { return t.final_reading.has_value(); });
  if (no_panels && !any_final) {
    const std::string note =
        r ? "No reading series to plot: see the parameters above." : "NO RESULT \u2014 and no reading series to plot.";
    doc.add_text("text",
                 {{"class", r ? "note" : "no-result"},
                  {"x", page_margin},
                  {"y", y + 14},
                  {"font-size", 13.0},
                  {"fill", r ? ink : alarm}},
                 note);
    y += 34;
  } else if (no_panels && !r) {
    doc.add_text("text",
                 {{"class", "no-result"}, {"x", page_margin}, {"y", y + 4}, {"font-size", 13.0}, {"fill", alarm}},
                 "NO RESULT \u2014 the fit failed (reasons above).");
    y += 24;
  }
  return y;
}

// --- footer: the result's warnings ------------------------------------------------------------------------------
double warnings_footer(Document& doc, const fit::FitResult* r, double y) {
  const double footer_width = page_width - 2 * page_margin;
  if (r)
    for (const auto& w : r->warnings)
      y = svg::text_lines(doc, svg::wrap("Warning: " + w, footer_width, 12), page_margin, y + 4, 12, amber) - 4;
  y += 6;
  return y;
}

}  // namespace

std::string fit_plot_svg(const FitOutcome& outcome, const std::vector<fit::FitSeries>& series) {
  const fit::FitResult* r = outcome.result();
  const std::string sample_id = outcome.tests.empty() ? std::string("(no sample id)") : outcome.tests.front().sample_id;
  const std::string product = outcome.tests.empty() ? std::string() : outcome.tests.front().product;
  const std::vector<View> views = series_views(outcome, series, r);
  const std::vector<Panel> panels = reading_panels(views);

  Document doc(page_width, fmt::format("spreadfit: sample {}", sample_id));
  doc.add("rect", {{"x", 0.0}, {"y", 0.0}, {"width", "100%"}, {"height", "100%"}, {"fill", "#ffffff"}});
  double y = header(doc, outcome, views, r, sample_id, product);
  y = legend(doc, views, r, y);
  // --- one reading panel per rig and reading, each over its own time axis, its residuals under it -------------
  if (!r && !panels.empty()) y = no_result_banner(doc, y);
  for (std::size_t pi = 0; pi < panels.size(); ++pi) {
    const Panel& p = panels[pi];
    // From the clock's zero, or from the release when that came first (not widened there to a round tick).
    const LinearScale widened(std::max(p.t_lo, 0.0), p.t_hi, plot_left, plot_right, 9);
    const LinearScale time(p.t_lo < 0 ? p.t_lo : widened.lo(), widened.hi(), plot_left, plot_right, 9, p.t_lo >= 0);
    y = reading_panel(doc, p, pi, panels.size(), views, r, time, y);
    y = residual_panel(doc, p, views, r, time, y);
    svg::x_axis_name(doc, plot_left, plot_right, y + 6, "time [s]");
    y += 30;
  }
  y = final_reading_panels(doc, outcome, y);
  y = nothing_to_plot_notes(doc, outcome, r, panels.empty(), y);
  y = warnings_footer(doc, r, y);
  return svg::finish_with_caution(doc, bench_caution, y, page_width, page_margin, muted);
}

}  // namespace spreadfit::report
