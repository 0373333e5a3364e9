// SVG reports: the small writer (escaping, numbers, scales, wrapping) and the two reports built on it. Every SVG
// is parsed by a strict checker of our own (and by xmllint when installed) and rendered to PNG by rsvg-convert.
#include <doctest/doctest.h>
#include <sys/wait.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <iterator>
#include <map>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "src/fit/fit_law.hpp"
#include "src/qc/control_chart.hpp"
#include "src/report/control_chart_svg.hpp"
#include "src/report/fit_plot.hpp"
#include "src/report/svg_document.hpp"
#include "tests/fit/fit_test_support.hpp"
#include "tests/io/io_test_support.hpp"
#include "tests/report/svg_test_support.hpp"

using namespace spreadfit;
using spreadfit::io::test::TempDir;
using namespace spreadfit::svg_test;

namespace {

// ---- a real fit to plot ------------------------------------------------------------------------------------------

const std::string awkward_id = "TS<12>&\"co\"-'0412'";

struct PlotFixture {
  std::vector<fit::FitSeries> series;
  report::FitOutcome outcome;
  std::string svg;  // fit_plot_svg of the above
};

io::TestDescription plate_test(const std::string& id) {
  io::TestDescription t;
  t.path = "plate.toml";
  t.sample_id = id;
  t.product = "TS12";
  t.density = 1050;
  t.setup = testing::plate_setup();
  return t;
}

/// Bingham fit of plate readings with 0.5 mm noise, fixed seed, and its plot (computed once: about a second).
const PlotFixture& converged_plot() {
  static const PlotFixture fixture = [] {
    PlotFixture f;
    f.series = {testing::synthetic(testing::plate_setup(), {15, 8.0, 0.45}, 5e-4, 7)};
    f.series.front().label = "data/plate-run1.csv";
    f.outcome.tests = {plate_test(awkward_id)};
    f.outcome.candidates = {fit::fit_law(f.series, Law::Bingham)};
    f.outcome.chosen = f.outcome.candidates.front().converged() ? 0 : -1;
    const std::vector<io::SpecLimit> limits = {{"yield_stress", 1.0, 1000.0, 1}};
    f.outcome.verdict = qc::judge(f.outcome.candidates.front(), limits);
    if (f.outcome.result()) f.svg = report::fit_plot_svg(f.outcome, f.series);
    return f;
  }();
  return fixture;
}

}  // namespace

TEST_CASE("escaping turns markup characters into references and keeps UTF-8 text") {
  CHECK(report::svg::escape("a<b>&\"c\"'d'") == "a&lt;b&gt;&amp;&quot;c&quot;&apos;d&apos;");
  CHECK(report::svg::escape("21.5 \u00b0C \u00b1 0.5") == "21.5 \u00b0C \u00b1 0.5");
  SUBCASE("characters XML cannot carry become the replacement character") {
    CHECK(report::svg::escape(std::string("a\x01"
                                  "b")) ==
          "a\xEF\xBF\xBD"
          "b");
    CHECK(report::svg::escape("tab\tand\nnewline") == "tab\tand\nnewline");
  }
  SUBCASE("bytes that are not UTF-8 become the replacement character") {
    CHECK(report::svg::escape("\xff") == "\xEF\xBF\xBD");
    CHECK(report::svg::escape("\xC3") == "\xEF\xBF\xBD");                          // truncated sequence
    CHECK(report::svg::escape("\xC0\xAF") == "\xEF\xBF\xBD\xEF\xBF\xBD");          // overlong '/'
    CHECK(report::svg::escape("\xED\xA0\x80").find("\xED") == std::string::npos);  // a surrogate
  }
}

TEST_CASE("numbers are written compactly, without exponent or negative zero") {
  CHECK(report::svg::number(12.0) == "12");
  CHECK(report::svg::number(12.5) == "12.5");
  CHECK(report::svg::number(0.126, 2) == "0.13");
  CHECK(report::svg::number(-0.001) == "0");
  CHECK(report::svg::number(-3.25) == "-3.25");
  CHECK(report::svg::number(1.5e7) == "15000000");
  CHECK(report::svg::number(0.00042, 5) == "0.00042");
  CHECK_THROWS_AS(report::svg::number(std::nan("")), std::invalid_argument);
  CHECK_THROWS_AS(report::svg::number(INFINITY), std::invalid_argument);
}

TEST_CASE("scale ticks are round numbers that cover the data") {
  struct Range {
    double lo, hi;
  };
  for (const Range r : {Range{0, 60}, Range{6.13, 14.87}, Range{-0.93, 0.81}, Range{0.00012, 0.00019},
                        Range{1234, 98765}, Range{5, 5}}) {
    const report::svg::LinearScale s(r.lo, r.hi, 100, 500, 6);
    INFO("range " << r.lo << " to " << r.hi << ": step " << s.step() << ", " << s.ticks().size() << " ticks");
    CHECK(s.lo() <= r.lo);
    CHECK(s.hi() >= r.hi);
    CHECK(s.ticks().size() >= 3);
    CHECK(s.ticks().size() <= 13);
    const double mantissa = s.step() / std::pow(10.0, std::floor(std::log10(s.step())));
    CHECK((std::abs(mantissa - 1) < 1e-9 || std::abs(mantissa - 2) < 1e-9 || std::abs(mantissa - 5) < 1e-9));
    for (double t : s.ticks()) CHECK(std::abs(t / s.step() - std::round(t / s.step())) < 1e-6);
    CHECK(s(s.lo()) == doctest::Approx(100));
    CHECK(s(s.hi()) == doctest::Approx(500));
    // Labels tell neighbouring ticks apart.
    for (std::size_t k = 1; k < s.ticks().size(); ++k)
      CHECK(s.tick_label(s.ticks()[k]) != s.tick_label(s.ticks()[k - 1]));
  }
}

TEST_CASE("wrapped lines fit the width and join back into the text") {
  const std::string text = report::bench_caution;
  const double width = 500, size = 12;
  const auto lines = report::svg::wrap(text, width, size);
  CHECK(lines.size() >= 2);
  std::string joined;
  for (const auto& l : lines) {
    CHECK(report::svg::text_width(l, size) <= width);
    joined += (joined.empty() ? "" : " ") + l;
  }
  CHECK(joined == text);
  CHECK(report::svg::wrap("", width, size).empty());
}

TEST_CASE("a document closes what is still open and refuses an unmatched close") {
  report::svg::Document doc(120, "a <small> test");
  doc.open("g", {{"class", "outer"}});
  doc.add_text("text", {{"x", 1.5}, {"y", 2.0}}, "x < y & z");
  doc.add_text_lines({{"font-size", 10.0}}, {"first line", "second line"}, 5, 20, 12);
  const std::string svg = doc.finish(80);
  const XmlReader x(svg);
  CHECK(x.nodes().front().name == "svg");
  CHECK(x.nodes().front().attributes.at("viewBox") == "0 0 120 80");
  CHECK(some_text_is(x, "x < y & z"));
  CHECK(some_text_is(x, "first line second line"));
  CHECK(collapsed(x.nodes()[1].content) == "a <small> test");
  report::svg::Document empty(10, "t");
  CHECK_THROWS_AS(empty.close(), std::logic_error);
  CHECK_THROWS_AS(empty.finish(0), std::invalid_argument);
}

TEST_CASE("fit plot of a converged fit: readings, curve, band, residuals, header and caution") {
  const PlotFixture& f = converged_plot();
  const fit::FitResult& fit = f.outcome.candidates.front();
  INFO(fit::fit_status_name(fit.status) << " " << fit.reason << ", " << fit.evaluations << " solves");
  REQUIRE(f.outcome.result() != nullptr);
  REQUIRE(f.outcome.verdict.status == qc::Verdict::Status::Pass);
  const std::string& svg = f.svg;
  const XmlReader x(svg);  // throws, failing the test, when not well-formed
  const std::size_t readings = f.series.front().times.size();

  SUBCASE("the sample id is in the title and the heading, escaped in the markup") {
    CHECK(collapsed(x.nodes()[1].content).find(awkward_id) != std::string::npos);
    CHECK(svg.find("TS&lt;12&gt;&amp;&quot;co&quot;-&apos;0412&apos;") != std::string::npos);
    CHECK(svg.find(awkward_id) == std::string::npos);
    CHECK(some_text_is(x, "Sample " + awkward_id + " \u00b7 product TS12"));
  }
  SUBCASE("the law, the verdict and the caution are stated") {
    CHECK(some_text_is(x, "Model: bingham"));
    const auto verdict = with_class(x, "verdict");
    REQUIRE(verdict.size() == 1);
    CHECK(verdict.front()->content == "PASS");
    CHECK(some_text_is(x, report::bench_caution));
  }
  SUBCASE("one marker, error bar and residual per reading") {
    CHECK(with_class(x, "reading").size() == readings);
    CHECK(with_class(x, "error-bar").size() == readings);
    CHECK(with_class(x, "residual").size() == readings);
    const auto markers = with_class(x, "reading");
    CHECK(tooltip(x, *markers.front()).find("plate-run1.csv: t = 2 s, diameter") == 0);
  }
  SUBCASE("the fitted curve has the dense times and the band surrounds it") {
    const auto curve = with_class(x, "fit");
    const auto band = with_class(x, "band");
    REQUIRE(curve.size() == 1);
    REQUIRE(band.size() == 1);
    CHECK(point_count(*curve.front()) == 81);
    CHECK(point_count(*band.front()) == 2 * 81);
  }
  SUBCASE("axes name the quantities and units") {
    CHECK(some_text_is(x, "diameter [cm]"));  // the plate spreads to about 12 cm
    CHECK(some_text_is(x, "time [s]"));
    CHECK(some_text_is(x, "reading \u2212 fit [mm]"));
  }
  SUBCASE("it renders to a PNG of the width it declares") {
    CHECK(svg_width(x) == 900);
    check_renders(svg, svg_width(x), "fit-plot");
  }
}

TEST_CASE("fit plot of a failed fit still shows the readings with a no-result note") {
  const PlotFixture& good = converged_plot();
  report::FitOutcome failed;
  failed.tests = {plate_test("TS12-0413")};
  fit::FitResult attempt;
  attempt.law = Law::HerschelBulkley;
  attempt.status = fit::FitStatus::NotConverged;
  attempt.reason = "iteration limit reached";
  failed.candidates = {attempt};
  failed.chosen = -1;
  const std::string svg = report::fit_plot_svg(failed, good.series);
  const XmlReader x(svg);
  CHECK(with_class(x, "reading").size() == good.series.front().times.size());
  CHECK(with_class(x, "residual").empty());
  CHECK(with_class(x, "fit").empty());
  CHECK(with_class(x, "no-result").size() == 1);
  CHECK(some_text_is(x, "herschel-bulkley: not converged \u2014 iteration limit reached"));
  CHECK(with_class(x, "verdict").front()->content == "NO SPEC");
  CHECK(some_text_is(x, report::bench_caution));
  check_renders(svg, svg_width(x), "failed-fit-plot");
}

TEST_CASE("control chart marks the point beyond the limits and the run, and labels every batch") {
  // Twelve batches near 10 Pa, one spike, then a shift up: the spike lies beyond the limits and the shifted
  // batches form a run above the centre line.
  std::vector<double> values = {10.1, 9.8,  10.2, 9.9,  10.0, 14.5, 10.1, 9.7,  10.3, 9.9,  10.0,
                                10.2, 11.1, 11.4, 11.2, 11.0, 11.3, 11.5, 11.1, 11.2, 11.4, 11.3};
  std::vector<std::string> labels;
  for (std::size_t i = 0; i < values.size(); ++i) labels.push_back("B-" + std::to_string(401 + i));
  const qc::ControlChart chart = qc::individuals_chart("yield_stress", "Pa", labels, values);
  REQUIRE(chart.beyond_limits[5]);
  const auto beyond_count = std::size_t(std::count(chart.beyond_limits.begin(), chart.beyond_limits.end(), true));
  const auto run_count = std::size_t(std::count(chart.in_run.begin(), chart.in_run.end(), true));
  INFO("beyond " << beyond_count << ", in run " << run_count << ", limits " << chart.lower << " to " << chart.upper);
  REQUIRE(run_count >= 8);

  const std::string svg = report::control_chart_svg(chart, "Yield stress of TS12 & <trial> batches");
  const XmlReader x(svg);
  const auto beyond = with_class(x, "beyond-limits");
  REQUIRE(beyond.size() == beyond_count);
  bool spike_marked = false;
  for (const XmlNode* n : beyond) {
    CHECK(n->name == "polygon");  // the diamond, unlike the circles of ordinary points
    if (tooltip(x, *n).find("B-406: 14.5 Pa, beyond the upper control limit") == 0) spike_marked = true;
  }
  CHECK(spike_marked);
  CHECK(with_class(x, "in-run").size() == run_count);
  CHECK(with_class(x, "point").size() == values.size());
  for (const XmlNode* n : with_class(x, "point"))
    if (!has_class(*n, "beyond-limits") && !has_class(*n, "in-run")) CHECK(n->name == "circle");
  // Every batch id on the axis, in order.
  const auto batch = with_class(x, "batch");
  REQUIRE(batch.size() == labels.size());
  for (std::size_t i = 0; i < labels.size(); ++i) CHECK(batch[i]->content == labels[i]);
  // The legend says what the marks mean, with counts.
  CHECK(some_text_is(x, "beyond a control limit (" + std::to_string(beyond_count) + ")"));
  CHECK(some_text_is(x, "in a run of 8 or more on one side of the centre line (" + std::to_string(run_count) + ")"));
  CHECK(collapsed(with_class(x, "title").front()->content) == "Yield stress of TS12 & <trial> batches");
  CHECK(with_class(x, "UCL").size() == 1);
  CHECK(with_class(x, "LCL").size() == 1);
  CHECK(some_text_is(x, report::bench_caution));
  check_renders(svg, svg_width(x), "control-chart");
}

TEST_CASE("control chart of many batches labels a subset that does not crowd") {
  std::vector<double> values;
  std::vector<std::string> labels;
  for (int i = 0; i < 120; ++i) {
    values.push_back(20 + std::sin(0.7 * i) + 0.3 * std::cos(2.3 * i));
    labels.push_back("TS12-" + std::to_string(1000 + i));
  }
  const qc::ControlChart chart = qc::individuals_chart("viscosity", "Pa.s", labels, values);
  const std::string svg = report::control_chart_svg(chart, "Viscosity");
  const XmlReader x(svg);
  const auto batch = with_class(x, "batch");
  INFO(batch.size() << " of " << labels.size() << " ids shown");
  CHECK(batch.size() < labels.size());
  CHECK(batch.size() >= labels.size() / 4);
  CHECK(with_class(x, "point").size() == labels.size());
  // Neighbouring shown ids are at least 19 px apart along the axis.
  std::vector<double> xs;
  for (const XmlNode* n : batch) xs.push_back(std::stod(n->attributes.at("x")));
  for (std::size_t i = 1; i < xs.size(); ++i) CHECK(xs[i] - xs[i - 1] >= 19);
  check_renders(svg, svg_width(x), "control-chart-many");
}
