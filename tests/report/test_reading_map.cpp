// The reading map SVG (src/report/reading_map_svg.hpp) and its logarithmic axis (svg::LogScale). The maps are
// filled from published closed forms, so a contour's place can be checked: the arrested radius of a plate spread
// (Roussel & Coussot 2005, J. Rheol. 49) and the slump of a cylinder (Pashias et al. 1996, J. Rheol. 40). Every
// SVG goes through the strict XML reader and rsvg-convert of svg_test_support.hpp.
#include <doctest/doctest.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <numbers>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "src/report/contour.hpp"
#include "src/report/fit_outcome.hpp"
#include "src/report/reading_map_svg.hpp"
#include "src/report/svg_document.hpp"
#include "tests/report/svg_test_support.hpp"

using namespace spreadfit;
using namespace spreadfit::svg_test;
using std::numbers::pi;

namespace {

constexpr double g = 9.81;  // m/s^2, standard gravity rounded (common practice, no source)

std::vector<double> log_grid(double lo, double hi, int points) {
  std::vector<double> v;
  for (int k = 0; k < points; ++k) v.push_back(lo * std::pow(hi / lo, double(k) / (points - 1)));
  return v;
}

std::vector<double> linear_grid(double lo, double hi, int points) {
  std::vector<double> v;
  for (int k = 0; k < points; ++k) v.push_back(lo + (hi - lo) * k / (points - 1));
  return v;
}

// Arrested radius of a plate spread in the plastic limit (Roussel & Coussot 2005): tau_y = 225 rho g V^2 /
// (128 pi^2 R^5), solved for R; and the yield stress that arrests at radius R.
constexpr double plate_density = 1050, plate_volume = 200e-6;  // kg/m^3, m^3: a 200 mL sample
double arrested_radius(double yield_stress) {
  return std::pow(225 * plate_density * g * plate_volume * plate_volume / (128 * pi * pi * yield_stress), 0.2);
}
double yield_stress_at(double radius) {
  return 225 * plate_density * g * plate_volume * plate_volume / (128 * pi * pi * std::pow(radius, 5));
}

// Radius over yield stress 2-200 Pa (log) and flow index 0.3-1 (linear; the plastic limit does not depend on it),
// two grid points marked failed, the reading limits 7-8.5 cm and a yield-stress spec of 20-35 Pa.
report::ReadingMap plate_map(int points = 21) {
  report::ReadingMap m;
  m.title = "radius at arrest on plate, herschel-bulkley";
  m.notes = {"consistency held at 8 Pa s^n", "plastic limit of the spread (Roussel & Coussot 2005)"};
  m.x_name = "yield stress [Pa]";
  m.y_name = "flow index [-]";
  m.x_log = true;
  m.x = log_grid(2, 200, points);
  m.y = linear_grid(0.3, 1.0, points);
  for (std::size_t j = 0; j < m.y.size(); ++j) {
    m.reading.emplace_back();
    for (double tau : m.x) m.reading.back().push_back(arrested_radius(tau));
  }
  m.reading[3][4] = std::nan("");
  m.reading[points - 1][points - 1] = std::nan("");
  m.reading_name = "radius";
  m.reading_limits = {{0.07, 0.085}};
  m.x_limits = {{20, 35}};
  return m;
}

// Slump of a 20 mm cylinder (Pashias et al. 1996): s/H0 = 1 - 2 tau'(1 - ln(2 tau')), tau' = tau_y / (rho g H0),
// no slump from tau' = 0.5 on; over yield stress 1-100 Pa (log) and density 900-1400 kg/m^3 (linear).
report::ReadingMap slump_map() {
  constexpr double height = 0.02;
  report::ReadingMap m;
  m.title = "slump of a 20 mm cylinder";
  m.x_name = "yield stress [Pa]";
  m.y_name = "density [kg/m3]";
  m.x_log = true;
  m.x = log_grid(1, 100, 15);
  m.y = linear_grid(900, 1400, 11);
  for (double rho : m.y) {
    m.reading.emplace_back();
    for (double tau : m.x) {
      const double t = tau / (rho * g * height);
      m.reading.back().push_back(t >= 0.5 ? 0.0 : height * (1 - 2 * t * (1 - std::log(2 * t))));
    }
  }
  m.reading_name = "slump";
  m.y_limits = {{1000, 1200}};
  return m;
}

std::vector<std::string> texts_of(const XmlReader& x, const std::string& cls) {
  std::vector<std::string> out;
  for (const XmlNode* n : with_class(x, cls)) out.push_back(collapsed(n->content));
  return out;
}

// Words of every text and attribute value, lower case, split at anything but letters and digits.
std::vector<std::string> words(const XmlReader& x) {
  std::vector<std::string> out;
  auto split = [&](const std::string& s) {
    std::string w;
    for (char c : s + " ") {
      if (std::isalnum(static_cast<unsigned char>(c))) {
        w += char(std::tolower(static_cast<unsigned char>(c)));
      } else if (!w.empty()) {
        out.push_back(w);
        w.clear();
      }
    }
  };
  for (const XmlNode& n : x.nodes()) {
    split(n.content);
    for (const auto& [k, v] : n.attributes) split(v);
  }
  return out;
}

// The x coordinates of a path's points ("M x y L x y ...").
std::vector<double> path_xs(const std::string& d) {
  std::istringstream in(d);
  std::vector<double> xs;
  std::string token;
  while (in >> token) {
    if (token == "M" || token == "L" || token == "Z") continue;
    if (token.front() == 'M' || token.front() == 'L') token.erase(0, 1);
    xs.push_back(std::stod(token));
    in >> token;  // y
  }
  return xs;
}

double tick_pixel(const XmlReader& x, const std::string& cls, const std::string& label) {
  for (const XmlNode* n : with_class(x, cls))
    if (collapsed(n->content) == label) return std::stod(n->attributes.at(cls == "x-tick" ? "x" : "y"));
  FAIL("no " << cls << " labelled " << label);
  return 0;
}

}  // namespace

TEST_CASE("map axes: a log scale ticks 1, 2, 5 x 10^k in plain numbers, each at its logarithm") {
  // Definition of a logarithmic axis: pixel = p0 + log(v / lo) / log(hi / lo) (p1 - p0).
  constexpr double tolerance = 1e-9;  // px, rounding only
  SUBCASE("two decades: the 1-2-5 sequence") {
    const report::svg::LogScale s(2, 200, 100, 800);
    std::vector<std::string> labels;
    for (double t : s.ticks()) {
      labels.push_back(s.tick_label(t));
      CHECK(s(t) == doctest::Approx(100 + std::log(t / 2) / std::log(100.0) * 700).epsilon(tolerance));
    }
    CHECK(labels == std::vector<std::string>{"2", "5", "10", "20", "50", "100", "200"});
    CHECK(s(2) == doctest::Approx(100));
    CHECK(s(200) == doctest::Approx(800));
  }
  SUBCASE("six decades: powers of ten only, small ones without an exponent") {
    const report::svg::LogScale s(0.001, 1000, 500, 40);  // a y axis: pixels decrease upward
    std::vector<std::string> labels;
    for (double t : s.ticks()) labels.push_back(s.tick_label(t));
    CHECK(labels == std::vector<std::string>{"0.001", "0.01", "0.1", "1", "10", "100", "1000"});
    CHECK(s(1) == doctest::Approx(270));  // the middle decade boundary of six
  }
  SUBCASE("a narrow range gets round linear ticks inside it") {
    const report::svg::LogScale s(20, 35, 0, 100);
    REQUIRE(s.ticks().size() >= 4);
    for (double t : s.ticks()) {
      CHECK(t >= 20);
      CHECK(t <= 35);
      CHECK(std::abs(t / 2 - std::round(t / 2)) < 1e-9);  // steps of 2 over a range of 15 (LinearScale's rule, 6 ticks)
    }
  }
  SUBCASE("a range of a factor of 3.5 holding one 1-2-5 tick gets enough ticks to read") {
    const report::svg::LogScale s(13, 45, 0, 100);
    std::vector<std::string> labels;
    for (double t : s.ticks()) labels.push_back(s.tick_label(t));
    CHECK(labels == std::vector<std::string>{"15", "20", "25", "30", "35", "40", "45"});
  }
  SUBCASE("a range without a logarithm falls back to 1 to 10") {
    const report::svg::LogScale s(-3, 0, 0, 100);
    CHECK(s.lo() == 1);
    CHECK(s.hi() == 10);
  }
}

TEST_CASE("map: plate radius over yield stress and flow index, with limits, a spec box and failed points") {
  const report::ReadingMap m = plate_map();
  const std::string svg = report::reading_map_svg(m);
  const XmlReader x(svg);  // throws, failing the test, when not well-formed

  SUBCASE("contour labels keep clear of the limit lines") {
    std::vector<std::pair<double, double>> limit_points;  // vertices of the limit contours [px]
    for (const XmlNode* n : with_class(x, "limit-contour")) {
      std::istringstream in(n->attributes.at("d"));
      std::string word;
      while (in >> word) {
        if (word == "M" || word == "L" || word == "Z") continue;
        if (word[0] == 'M' || word[0] == 'L') word = word.substr(1);
        std::string second;
        in >> second;
        limit_points.emplace_back(std::stod(word), std::stod(second));
      }
    }
    REQUIRE(!limit_points.empty());
    for (const XmlNode* n : with_class(x, "contour-label")) {
      // The label centre: its baseline sits 0.35 em (10.5 px font) below it.
      const double lx = std::stod(n->attributes.at("x")), ly = std::stod(n->attributes.at("y")) - 0.35 * 10.5;
      double nearest = INFINITY;
      for (const auto& [px, py] : limit_points) nearest = std::min(nearest, std::hypot(px - lx, py - ly));
      // Half a short label plus a margin (common practice, no source); vertices are dense enough (grid spacing).
      CHECK_MESSAGE(nearest > 8, collapsed(n->content) << " at " << lx << "," << ly);
    }
  }

  SUBCASE("title, notes, caution and the count of failed points are shown") {
    CHECK(some_text_is(x, m.title));
    CHECK(some_text_is(x, m.notes.front()));
    CHECK(some_text_is(x, report::bench_caution));
    const auto failed_note = texts_of(x, "failed-note");
    REQUIRE(failed_note.size() == 1);
    CHECK(failed_note.front().find("failed at 2 of 441 grid points") != std::string::npos);
    CHECK(with_class(x, "failed").size() == 1);
  }
  SUBCASE("every kind of element is there") {
    CHECK(with_class(x, "contour").size() >= 3);
    CHECK(with_class(x, "limit-contour").size() == 2);
    CHECK(with_class(x, "in-limits").size() == 1);
    CHECK(with_class(x, "param-box").size() == 1);
    CHECK(!with_class(x, "contour-label").empty());
    CHECK(with_class(x, "limit-label").size() == 2);
  }
  SUBCASE("the radius reaches 3 cm, so it is shown in cm") {
    // 2 Pa arrests at about 13 cm, 200 Pa at about 5.2 cm (Roussel & Coussot 2005, the formula above).
    bool legend_in_cm = false;
    for (const XmlNode& n : x.nodes())
      if (n.name == "text" && collapsed(n.content).find("radius contours every") == 0)
        legend_in_cm = collapsed(n.content).find(" cm") != std::string::npos;
    CHECK(legend_in_cm);
    const double lo = arrested_radius(200) * 100, hi = arrested_radius(2) * 100;
    for (const auto& label : texts_of(x, "contour-label")) {
      const double v = std::stod(label);
      CHECK(v > lo);
      CHECK(v < hi);
      CHECK(std::abs(v - std::round(v)) < 1e-9);  // whole cm: the 1-2-5 step over a 5-13 cm range is 1 or 2 cm
    }
    auto limit_labels = texts_of(x, "limit-label");
    std::sort(limit_labels.begin(), limit_labels.end());
    CHECK(limit_labels == std::vector<std::string>{"7", "8.5"});  // the limits given, 0.07 and 0.085 m
  }
  SUBCASE("the log axis is ticked 2 to 200 and the linear one 0.3 to 1") {
    CHECK(texts_of(x, "x-tick") == std::vector<std::string>{"2", "5", "10", "20", "50", "100", "200"});
    const auto y_ticks = texts_of(x, "y-tick");
    CHECK(y_ticks.front() == "0.3");
    CHECK(y_ticks.back() == "1");
    CHECK(some_text_is(x, "yield stress [Pa]"));
    CHECK(some_text_is(x, "flow index [-]"));
  }
  SUBCASE("the bold limit contours stand where the closed form puts those radii") {
    // The arrested radius does not depend on the flow index, so the 7 cm and 8.5 cm contours are vertical lines at
    // the yield stress of Roussel & Coussot's formula. Linear interpolation of R ~ tau^(-1/5) over 0.1 decade in
    // log tau errs by about (h^2/8)|R''|/|R'| ~ 6e-4 decade, about 0.3 px here; 1 px allows the 0.01 px rounding.
    constexpr double tolerance = 1.0;  // px
    const double p10 = tick_pixel(x, "x-tick", "10"), p100 = tick_pixel(x, "x-tick", "100");
    const auto limits = with_class(x, "limit-contour");
    REQUIRE(limits.size() == 2);
    for (std::size_t k = 0; k < 2; ++k) {
      const double radius = k == 0 ? 0.07 : 0.085;
      const double expected = p10 + std::log10(yield_stress_at(radius) / 10) * (p100 - p10);
      const auto xs = path_xs(limits[k]->attributes.at("d"));
      REQUIRE(!xs.empty());
      double worst = 0;
      for (double px : xs) worst = std::max(worst, std::abs(px - expected));
      INFO("radius " << radius << " m: " << xs.size() << " points, expected x " << expected << " px, worst " << worst);
      CHECK(worst <= tolerance);
    }
  }
  SUBCASE("the spec box spans the whole flow-index axis between 20 and 35 Pa") {
    const XmlNode& box = *with_class(x, "param-box").front();
    const double p10 = tick_pixel(x, "x-tick", "10"), p100 = tick_pixel(x, "x-tick", "100");
    const double left = std::stod(box.attributes.at("x")), width = std::stod(box.attributes.at("width"));
    // Position on a log axis by definition; 0.01 px rounding of the written numbers.
    CHECK(left == doctest::Approx(p10 + std::log10(2.0) * (p100 - p10)).epsilon(1e-4));
    CHECK(left + width == doctest::Approx(p10 + std::log10(3.5) * (p100 - p10)).epsilon(1e-4));
    CHECK(std::stod(box.attributes.at("y")) < tick_pixel(x, "y-tick", "1"));
  }
  SUBCASE("no number that is not a number is printed") {
    for (const auto& w : words(x)) {
      CHECK(w != "nan");
      CHECK(w != "inf");
      CHECK(w != "infinity");
    }
  }
  SUBCASE("it renders to a PNG of the width it declares") {
    CHECK(svg_width(x) == 900);
    check_renders(svg, svg_width(x), "reading-map");
  }
}

TEST_CASE("map: a slump under 3 cm is labelled in mm") {
  // Pashias et al. (1996): at most about 19 mm of slump from a 20 mm cylinder over these grids.
  const std::string svg = report::reading_map_svg(slump_map());
  const XmlReader x(svg);
  bool legend_in_mm = false;
  for (const XmlNode& n : x.nodes())
    if (n.name == "text" && collapsed(n.content).find("slump contours every") == 0)
      legend_in_mm = collapsed(n.content).find(" mm") != std::string::npos;
  CHECK(legend_in_mm);
  CHECK(with_class(x, "in-limits").empty());  // no reading limits given
  CHECK(with_class(x, "failed").empty());     // the closed form is defined everywhere
  CHECK(with_class(x, "param-box").size() == 1);
  for (const auto& label : texts_of(x, "contour-label")) {
    const double v = std::stod(label);
    CHECK(v > 0);
    CHECK(v < 20);
  }
  check_renders(svg, svg_width(x), "reading-map-mm");
}

TEST_CASE("map: a grid where the model failed everywhere still gives a readable page") {
  report::ReadingMap m = plate_map(5);
  for (auto& row : m.reading) std::fill(row.begin(), row.end(), std::nan(""));
  const std::string svg = report::reading_map_svg(m);
  const XmlReader x(svg);
  CHECK(with_class(x, "contour").empty());
  CHECK(with_class(x, "in-limits").empty());
  CHECK(with_class(x, "failed").size() == 1);
  CHECK(collapsed(with_class(x, "summary").front()->content).find("failed at every grid point") != std::string::npos);
  for (const auto& w : words(x)) CHECK(w != "nan");
  check_renders(svg, svg_width(x), "reading-map-failed");
}

TEST_CASE("map: input that breaks the conventions is refused") {
  report::ReadingMap m = plate_map(5);
  SUBCASE("a logarithmic axis with a zero") {
    m.x.front() = 0;
    CHECK_THROWS_AS(report::reading_map_svg(m), std::invalid_argument);
  }
  SUBCASE("a descending axis") {
    std::reverse(m.y.begin(), m.y.end());
    CHECK_THROWS_AS(report::reading_map_svg(m), std::invalid_argument);
  }
  SUBCASE("a row of the wrong length") {
    m.reading.back().pop_back();
    CHECK_THROWS_AS(report::reading_map_svg(m), std::invalid_argument);
  }
  SUBCASE("reading limits upside down or not finite") {
    m.reading_limits = {{0.09, 0.07}};
    CHECK_THROWS_AS(report::reading_map_svg(m), std::invalid_argument);
    m.reading_limits = {{std::nan(""), 0.07}};
    CHECK_THROWS_AS(report::reading_map_svg(m), std::invalid_argument);
  }
}
