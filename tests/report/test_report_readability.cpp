// Reports a QC manager reads at a glance: each check below pins one thing a reader was misled by (a clipped label,
// an axis squeezed by a curve drawn before the release, a unit converted away from the one entered, a literal
// caret, a chart that dropped a batch). Every SVG is also parsed by the strict checker and rendered to PNG.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "src/fit/final_only.hpp"
#include "src/fit/fit_law.hpp"
#include "src/qc/control_chart.hpp"
#include "src/report/control_chart_svg.hpp"
#include "src/report/fit_plot.hpp"
#include "src/report/summary_table.hpp"
#include "src/report/svg_document.hpp"
#include "tests/fit/fit_test_support.hpp"
#include "tests/report/svg_test_support.hpp"

using namespace spreadfit;
using namespace spreadfit::svg_test;

namespace {

// Every <text> of the document, collapsed.
std::vector<std::string> all_texts(const XmlReader& x) {
  std::vector<std::string> out;
  for (const auto& n : x.nodes())
    if (n.name == "text") out.push_back(collapsed(n.content));
  return out;
}

io::TestDescription channel_test(const std::string& csv, const std::string& unit) {
  io::TestDescription t;
  t.path = "channel.toml";
  t.sample_id = "RS-0001";
  t.product = "RS";
  t.density = 1100;
  t.setup = testing::channel_setup();
  io::ReadingSeries s;
  s.source = csv;
  s.kind = Reading::Front;
  s.value_unit = unit;
  s.time_unit = "s";
  t.series = {s};
  return t;
}

struct ChannelPlot {
  std::vector<fit::FitSeries> series;
  report::FitOutcome outcome;
  std::string svg;
};

/// A Bingham fit of channel readings released 1.5 s before the clock started, read with 0.5 mm noise but stated
/// to 0.3 mm, entered in mm (computed once: about a second). The readings come from the forward model verified
/// in tests/models.
const ChannelPlot& channel_plot() {
  static const ChannelPlot fixture = [] {
    ChannelPlot f;
    f.series = {testing::synthetic(testing::channel_setup(), {25, 8.0, 1.0}, 5e-4, 11, -1.5)};
    f.series.front().sigma = 3e-4;
    f.series.front().label = "data/RS-0001.csv";
    f.outcome.tests = {channel_test("data/RS-0001.csv", "mm")};
    f.outcome.candidates = {fit::fit_law(f.series, Law::Bingham)};
    f.outcome.chosen = f.outcome.candidates.front().converged() ? 0 : -1;
    if (f.outcome.result()) f.svg = report::fit_plot_svg(f.outcome, f.series);
    return f;
  }();
  return fixture;
}

double attribute(const XmlNode& n, const std::string& name) { return std::stod(n.attributes.at(name)); }

std::vector<std::pair<double, double>> points_of(const XmlNode& n) {
  std::vector<std::pair<double, double>> out;
  std::istringstream in(n.attributes.at("points"));
  std::string pair;
  while (in >> pair) {
    const auto comma = pair.find(',');
    out.emplace_back(std::stod(pair.substr(0, comma)), std::stod(pair.substr(comma + 1)));
  }
  return out;
}

}  // namespace

TEST_CASE("stdout table: long intervals stay in their column and each release time names its file") {
  report::FitOutcome o;
  o.tests = {channel_test("data/run-a.csv", "cm"), channel_test("data/run-b.csv", "cm")};
  fit::FitResult r;
  r.law = Law::HerschelBulkley;
  r.status = fit::FitStatus::Converged;
  r.rmse = 1e-3;
  r.points = 20;
  fit::ParameterEstimate ys{"yield_stress", "Pa", 18.2, 17.51, 18.73, false, true};
  fit::ParameterEstimate n{"flow_index", "-", 0.4123, 0.05567, 2.416, false, false};  // undetermined: the longest cell
  fit::ParameterEstimate k{"consistency", "Pa.s^n", 9.1, 0.1, 1234.5, false, false};
  fit::ParameterEstimate t1{"time_origin", "s", -1.2, -2.0, -0.4, false, true};
  fit::ParameterEstimate t2{"time_origin", "s", 0.3, -0.5, 1.1, false, true};
  r.parameters = {ys, k, n, t1, t2};
  o.candidates = {r};
  o.chosen = 0;
  const std::string table = report::summary_table(o);
  INFO(table);
  std::istringstream in(table);
  std::string line;
  std::vector<std::string> rows;
  while (std::getline(in, line))
    if (line.find("parameter") != std::string::npos || line.find(" Pa") != std::string::npos ||
        line.find("time_origin") != std::string::npos || line.find("flow_index") != std::string::npos)
      rows.push_back(line);
  REQUIRE(rows.size() == 6);
  // The unit column starts at the same place on every row, after every interval (common practice, no source).
  const std::size_t unit_at = rows.front().find("unit");
  for (const auto& row : rows) {
    CHECK(row.size() > unit_at);
    CHECK(row[unit_at - 1] == ' ');
    const bool before_unit = row.find("(undetermined)") == std::string::npos || row.find("(undetermined)") < unit_at;
    CHECK(before_unit);
  }
  CHECK(table.find("time_origin (run-a.csv)") != std::string::npos);
  CHECK(table.find("time_origin (run-b.csv)") != std::string::npos);
  CHECK(report::time_origin_labels(o) == std::vector<std::string>{"time_origin (run-a.csv)", "time_origin (run-b.csv)"});
}

TEST_CASE("units are written with a middle dot and superscripts") {
  CHECK(report::svg::unit_text("Pa.s^n") == "Pa\u00b7s\u207f");
  CHECK(report::svg::unit_text("Pa.s") == "Pa\u00b7s");
  CHECK(report::svg::unit_text("m^3") == "m\u00b3");
  CHECK(report::svg::unit_text("mm") == "mm");
  CHECK(report::svg::unit_text("-") == "-");
}

TEST_CASE("fit report of a channel released before the clock: from the release, on the readings' range, in mm") {
  const ChannelPlot& f = channel_plot();
  const fit::FitResult* r = f.outcome.result();
  REQUIRE(r != nullptr);
  REQUIRE(r->time_origins.size() == 1);
  INFO("release " << r->time_origins.front() << " s, sigma " << r->sigma);
  REQUIRE(r->time_origins.front() < 0);
  const XmlReader x(f.svg);
  const fit::FitSeries& s = f.series.front();

  SUBCASE("the curve and the band start at the fitted release, left of the clock's zero") {
    const auto curve = with_class(x, "fit");
    const auto band = with_class(x, "band");
    REQUIRE(curve.size() == 1);
    REQUIRE(band.size() == 1);
    const auto clock = with_class(x, "clock-start");
    REQUIRE(clock.size() == 1);
    const double zero = attribute(*clock.front(), "x1");
    CHECK(points_of(*curve.front()).front().first < zero);
    CHECK(points_of(*band.front()).front().first < zero);
    // And not before it: the curve's first point is the left end of the time axis.
    const auto readings = with_class(x, "reading");
    REQUIRE(!readings.empty());
    CHECK(points_of(*curve.front()).front().first >= 88);
  }
  SUBCASE("the value axis spans the readings, not zero, and is in the unit they were entered in") {
    CHECK(some_text_is(x, "front [mm]"));
    // The reading panel is the first plot frame (an unfilled rect at the plot's left edge); its ticks are the
    // right-aligned labels left of it within its height.
    double top = NAN, bottom = NAN;
    for (const auto& n : x.nodes())
      if (n.name == "rect" && n.attributes.count("fill") && n.attributes.at("fill") == "none" &&
          n.attributes.count("x") && std::abs(attribute(n, "x") - 88) < 1e-9) {
        top = attribute(n, "y"), bottom = top + attribute(n, "height");
        break;
      }
    REQUIRE(std::isfinite(top));
    double lowest = INFINITY;
    for (const auto& n : x.nodes())
      if (n.name == "text" && n.attributes.count("text-anchor") && n.attributes.at("text-anchor") == "end" &&
          n.attributes.count("x") && std::abs(attribute(n, "x") - 81) < 1e-9 && attribute(n, "y") >= top &&
          attribute(n, "y") <= bottom + 5) {
        try {
          lowest = std::min(lowest, std::stod(collapsed(n.content)));
        } catch (const std::exception&) {
        }
      }
    const double first_reading_mm = *std::min_element(s.values.begin(), s.values.end()) * 1e3;
    INFO("lowest tick " << lowest << " mm, lowest reading " << first_reading_mm << " mm");
    CHECK(lowest > 0.5 * first_reading_mm);
    CHECK(lowest <= first_reading_mm);
  }
  SUBCASE("the legend's resolution is the header's, the stated 0.3 mm") {
    const auto header = with_class(x, "fit-summary");
    REQUIRE(!header.empty());
    std::string text;
    for (const XmlNode* n : header) text += collapsed(n->content) + " ";
    CHECK(text.find("stated resolution 0.3 mm") != std::string::npos);
    const auto legend = with_class(x, "legend-series");
    REQUIRE(legend.size() == 1);
    CHECK(collapsed(legend.front()->content).find("bars \u00b10.3 mm, the stated resolution") != std::string::npos);
  }
  SUBCASE("no literal caret, and Pa\u00b7s in the header") {
    for (const auto& t : all_texts(x)) CHECK_MESSAGE(t.find('^') == std::string::npos, t);
    bool dot = false;
    for (const auto& t : all_texts(x)) dot = dot || t.find("Pa\u00b7s") != std::string::npos;
    CHECK(dot);
  }
  SUBCASE("the +/-2 sigma labels end well inside the page") {
    const auto labels = with_class(x, "sigma-label");
    REQUIRE(labels.size() == 2);
    // Three glyphs at 10 px; a generous 0.9 em each covers the widest of them (common practice, no source).
    for (const XmlNode* n : labels) CHECK(attribute(*n, "x") + 3 * 0.9 * 10 <= svg_width(x));
  }
  check_renders(f.svg, svg_width(x), "channel-before-clock");
}

TEST_CASE("fit report of two rigs: each panel has a time axis that fits its own series") {
  // Readings only (a failed fit): a plate read to 60 s and a channel read to 120 s.
  std::vector<fit::FitSeries> series(2);
  series[0].setup = testing::plate_setup();
  series[1].setup = testing::channel_setup();
  for (double t = 5; t <= 60 + 1e-9; t += 5) series[0].times.push_back(t), series[0].values.push_back(0.05 + t * 1e-4);
  for (double t = 10; t <= 120 + 1e-9; t += 10)
    series[1].times.push_back(t), series[1].values.push_back(0.06 + t * 1e-4);
  series[0].label = "plate.csv";
  series[1].label = "channel.csv";
  report::FitOutcome o;
  o.tests = {channel_test("channel.csv", "cm")};
  fit::FitResult attempt;
  attempt.law = Law::Bingham;
  attempt.status = fit::FitStatus::NotConverged;
  o.candidates = {attempt};
  const std::string svg = report::fit_plot_svg(o, series);
  const XmlReader x(svg);
  const auto titles = with_class(x, "panel-title");
  REQUIRE(titles.size() == 2);
  CHECK(collapsed(titles[0]->content) == "plate \u00b7 diameter");
  CHECK(collapsed(titles[1]->content) == "channel \u00b7 front");
  // The last reading of each panel sits at the right end of its own axis (the plate's is not squeezed into half).
  const auto readings = with_class(x, "reading");
  REQUIRE(readings.size() == 24);
  const auto centre_x = [&](const XmlNode* n) {
    return n->name == "circle" ? attribute(*n, "cx") : attribute(*n, "x") + 0.5 * attribute(*n, "width");
  };
  CHECK(centre_x(readings[11]) == doctest::Approx(centre_x(readings[23])).epsilon(0.01));
  check_renders(svg, svg_width(x), "two-rigs");
}

TEST_CASE("fit report of a slump test shows the measured slump") {
  // Pashias et al. (1996): the slump relation that fit_final_reading inverts; 4 cm of a 10 cm cylinder.
  report::FitOutcome o;
  io::TestDescription t;
  t.path = "slump.toml";
  t.sample_id = "RS-0002";
  t.density = 1100;
  t.setup.rig = SlumpRig{0.05, 0.1};
  t.setup.density = 1100;
  t.setup.reading = Reading::Slump;
  t.final_reading = 0.04;
  t.resolution = 1e-3;
  o.tests = {t};
  o.candidates = {fit::fit_final_reading(t.setup, 0.04, 1e-3)};
  o.chosen = o.candidates.front().converged() ? 0 : -1;
  const std::string svg = report::fit_plot_svg(o, {});
  const XmlReader x(svg);
  REQUIRE(with_class(x, "final-reading").size() == 1);
  CHECK(tooltip(x, *with_class(x, "final-reading").front()) == "measured slump: 4 cm");
  CHECK(some_text_is(x, "4 cm"));
  CHECK(with_class(x, "cylinder-height").size() == 1);
  const auto note = with_class(x, "final-note");
  REQUIRE(!note.empty());
  CHECK(collapsed(note.front()->content).find("Measured slump") == 0);
  for (const auto& text : all_texts(x)) CHECK(text.find("nan") == std::string::npos);
  check_renders(svg, svg_width(x), "slump");
}

TEST_CASE("control chart: a left-out batch is drawn and named, and the limits come from the others") {
  // Individuals chart limits: mean +/- 2.66 x mean moving range, 2.66 = 3 / d2 with d2 = 1.128 for n = 2
  // (Montgomery, Introduction to Statistical Quality Control, individuals chart; from memory).
  const std::vector<double> values = {30, 32, 31, 29};
  qc::ControlChart c = qc::individuals_chart("yield_stress", "Pa", {"B1", "B2", "B4", "B5"}, values);
  c.left_out = {{"B3", "power-law gives no yield_stress", 2}};
  c.spec_low = 20;
  c.spec_high = 35;
  const double mean = 30.5, mr = (2.0 + 1.0 + 2.0) / 3.0;
  CHECK(c.centre == doctest::Approx(mean));
  CHECK(c.upper == doctest::Approx(mean + 2.66 * mr));
  CHECK(c.position(2) == 3);  // B4 comes after the left-out B3
  const std::string svg = report::control_chart_svg(c, "Yield stress of product RS, 5 batches");
  const XmlReader x(svg);
  const auto left = with_class(x, "left-out");
  REQUIRE(left.size() == 1);
  CHECK(tooltip(x, *left.front()).find("B3: not charted (power-law gives no yield_stress)") == 0);
  const auto notes = with_class(x, "left-out-note");
  REQUIRE(notes.size() == 1);
  CHECK(collapsed(notes.front()->content).find("B3") != std::string::npos);
  const auto batch = with_class(x, "batch");
  REQUIRE(batch.size() == 5);
  CHECK(batch[2]->content == "B3");
  CHECK(with_class(x, "USL").size() == 1);
  CHECK(with_class(x, "LSL").size() == 1);
  CHECK(collapsed(with_class(x, "title").front()->content) == "Yield stress of product RS, 5 batches");
  check_renders(svg, svg_width(x), "chart-left-out");
}

TEST_CASE("control chart of a viscosity: on a log scale, every limit positive") {
  // Spread by factors: a linear chart would put the lower limit below zero (mean 7.17, mean moving range 2.74).
  const std::vector<double> values = {7.9, 5.7, 11.1, 8.0, 5.3, 5.0};
  std::string why;
  REQUIRE(qc::log_scale_suits("viscosity", values, why));
  CHECK(why.find("log scale") == 0);
  const qc::ControlChart linear = qc::individuals_chart("viscosity", "Pa.s", {"a", "b", "c", "d", "e", "f"}, values);
  CHECK(linear.lower < 0);
  const qc::ControlChart c = qc::individuals_chart("viscosity", "Pa.s", {"a", "b", "c", "d", "e", "f"}, values, 8, true);
  // Geometric mean and the moving range of the logarithms, by their definitions.
  double sum = 0, mr = 0;
  for (std::size_t i = 0; i < values.size(); ++i) {
    sum += std::log(values[i]);
    if (i) mr += std::abs(std::log(values[i]) - std::log(values[i - 1]));
  }
  const double centre = sum / 6, mean_mr = mr / 5;
  CHECK(c.centre == doctest::Approx(std::exp(centre)));
  CHECK(c.lower == doctest::Approx(std::exp(centre - 2.66 * mean_mr)));
  CHECK(c.upper == doctest::Approx(std::exp(centre + 2.66 * mean_mr)));
  CHECK(c.lower > 0);
  const std::string svg = report::control_chart_svg(c, "Viscosity of product RS, 6 batches");
  const XmlReader x(svg);
  CHECK(some_text_is(x, "viscosity [Pa\u00b7s], log scale"));
  for (const auto& t : all_texts(x)) CHECK(t.find('-') != 0);  // no negative tick or limit
  check_renders(svg, svg_width(x), "chart-log");
}
