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

using namespace spreadfit;
using spreadfit::io::test::TempDir;

namespace {

// ---- a strict little XML reader: well-formedness plus what the checks below need ---------------------------------

struct XmlNode {
  std::string name;
  std::map<std::string, std::string> attributes;  // values with references decoded
  std::string content;                            // all character data inside, descendants included, decoded
  std::vector<std::size_t> children;
};

std::string utf8(unsigned long code) {
  std::string s;
  if (code < 0x80) {
    s += char(code);
  } else if (code < 0x800) {
    s += char(0xC0 | (code >> 6));
    s += char(0x80 | (code & 0x3F));
  } else if (code < 0x10000) {
    s += char(0xE0 | (code >> 12));
    s += char(0x80 | ((code >> 6) & 0x3F));
    s += char(0x80 | (code & 0x3F));
  } else {
    s += char(0xF0 | (code >> 18));
    s += char(0x80 | ((code >> 12) & 0x3F));
    s += char(0x80 | ((code >> 6) & 0x3F));
    s += char(0x80 | (code & 0x3F));
  }
  return s;
}

/// Parses a whole document; throws std::runtime_error naming the offset of the first fault. Node 0 is the root.
class XmlReader {
 public:
  explicit XmlReader(const std::string& text) : s_(text) { parse(); }
  const std::vector<XmlNode>& nodes() const { return nodes_; }

 private:
  [[noreturn]] void fail(const std::string& what) const {
    throw std::runtime_error("not well-formed XML at offset " + std::to_string(i_) + ": " + what);
  }
  bool at(const char* prefix) const { return s_.compare(i_, std::char_traits<char>::length(prefix), prefix) == 0; }
  static bool space(char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\r'; }
  void skip_space() {
    while (i_ < s_.size() && space(s_[i_])) ++i_;
  }
  std::string name() {
    const std::size_t start = i_;
    auto first = [](char c) { return std::isalpha(static_cast<unsigned char>(c)) || c == '_' || c == ':'; };
    if (i_ >= s_.size() || !first(s_[i_])) fail("expected a name");
    while (i_ < s_.size() &&
           (first(s_[i_]) || std::isdigit(static_cast<unsigned char>(s_[i_])) || s_[i_] == '-' || s_[i_] == '.'))
      ++i_;
    return s_.substr(start, i_ - start);
  }
  std::string decode(const std::string& raw) const {
    std::string out;
    for (std::size_t k = 0; k < raw.size(); ++k) {
      if (raw[k] == '<') fail("'<' in character data or an attribute value");
      if (raw[k] != '&') {
        out += raw[k];
        continue;
      }
      const std::size_t end = raw.find(';', k);
      if (end == std::string::npos) fail("'&' that starts no reference");
      const std::string ref = raw.substr(k + 1, end - k - 1);
      static const std::map<std::string, std::string> named = {
          {"amp", "&"}, {"lt", "<"}, {"gt", ">"}, {"quot", "\""}, {"apos", "'"}};
      if (named.count(ref)) {
        out += named.at(ref);
      } else if (ref.size() > 1 && ref[0] == '#') {
        const bool hex = ref[1] == 'x';
        const std::string digits = ref.substr(hex ? 2 : 1);
        if (digits.empty() ||
            digits.find_first_not_of(hex ? "0123456789abcdefABCDEF" : "0123456789") != std::string::npos)
          fail("bad character reference &" + ref + ";");
        out += utf8(std::stoul(digits, nullptr, hex ? 16 : 10));
      } else {
        fail("unknown entity &" + ref + ";");
      }
      k = end;
    }
    return out;
  }
  void parse() {
    std::vector<std::size_t> open;
    bool root_closed = false;
    while (i_ < s_.size()) {
      if (s_[i_] != '<') {
        const std::size_t end = std::min(s_.find('<', i_), s_.size());
        const std::string raw = s_.substr(i_, end - i_);
        if (raw.find("]]>") != std::string::npos) fail("']]>' in character data");
        if (open.empty()) {
          if (!std::all_of(raw.begin(), raw.end(), space)) fail("text outside the root element");
        } else {
          const std::string text = decode(raw);
          for (std::size_t n : open) nodes_[n].content += text;
        }
        i_ = end;
      } else if (at("<?")) {
        if (!nodes_.empty()) fail("processing instruction after the root started");
        const std::size_t end = s_.find("?>", i_);
        if (end == std::string::npos) fail("unterminated processing instruction");
        i_ = end + 2;
      } else if (at("<!--")) {
        const std::size_t end = s_.find("-->", i_ + 4);
        if (end == std::string::npos) fail("unterminated comment");
        i_ = end + 3;
      } else if (at("</")) {
        i_ += 2;
        const std::string n = name();
        skip_space();
        if (i_ >= s_.size() || s_[i_] != '>') fail("expected '>' closing </" + n);
        ++i_;
        if (open.empty() || nodes_[open.back()].name != n) fail("end tag </" + n + "> does not match");
        open.pop_back();
        if (open.empty()) root_closed = true;
      } else {
        ++i_;
        if (root_closed) fail("a second root element");
        XmlNode node;
        node.name = name();
        while (true) {
          const bool had_space = i_ < s_.size() && space(s_[i_]);
          skip_space();
          if (i_ >= s_.size()) fail("unterminated start tag <" + node.name);
          if (at("/>") || s_[i_] == '>') break;
          if (!had_space) fail("attributes must be separated by white space");
          const std::string attribute = name();
          skip_space();
          if (i_ >= s_.size() || s_[i_] != '=') fail("expected '=' after " + attribute);
          ++i_;
          skip_space();
          if (i_ >= s_.size() || (s_[i_] != '"' && s_[i_] != '\'')) fail("attribute value not quoted");
          const char quote = s_[i_++];
          const std::size_t end = s_.find(quote, i_);
          if (end == std::string::npos) fail("unterminated attribute value");
          if (node.attributes.count(attribute)) fail("attribute " + attribute + " given twice");
          node.attributes[attribute] = decode(s_.substr(i_, end - i_));
          i_ = end + 1;
        }
        const bool empty = at("/>");
        i_ += empty ? 2 : 1;
        if (!open.empty())
          nodes_[open.back()].children.push_back(nodes_.size());
        else if (!nodes_.empty())
          fail("a second root element");
        nodes_.push_back(std::move(node));
        if (!empty)
          open.push_back(nodes_.size() - 1);
        else if (open.empty())
          root_closed = true;
      }
    }
    if (!open.empty()) fail("element <" + nodes_[open.back()].name + "> not closed");
    if (nodes_.empty()) fail("no root element");
  }

  const std::string& s_;
  std::size_t i_ = 0;
  std::vector<XmlNode> nodes_;
};

/// Runs of white space as one space, trimmed: the text a viewer shows.
std::string collapsed(const std::string& text) {
  std::string out;
  for (char c : text) {
    const bool blank = c == ' ' || c == '\n' || c == '\t' || c == '\r';
    if (blank) {
      if (!out.empty() && out.back() != ' ') out += ' ';
    } else {
      out += c;
    }
  }
  if (!out.empty() && out.back() == ' ') out.pop_back();
  return out;
}

bool has_class(const XmlNode& n, const std::string& token) {
  auto it = n.attributes.find("class");
  if (it == n.attributes.end()) return false;
  std::istringstream words(it->second);
  std::string w;
  while (words >> w)
    if (w == token) return true;
  return false;
}

std::vector<const XmlNode*> with_class(const XmlReader& x, const std::string& token) {
  std::vector<const XmlNode*> out;
  for (const auto& n : x.nodes())
    if (has_class(n, token)) out.push_back(&n);
  return out;
}

bool some_text_is(const XmlReader& x, const std::string& wanted) {
  return std::any_of(x.nodes().begin(), x.nodes().end(),
                     [&](const XmlNode& n) { return n.name == "text" && collapsed(n.content) == wanted; });
}

std::string tooltip(const XmlReader& x, const XmlNode& n) {
  for (std::size_t c : n.children)
    if (x.nodes()[c].name == "title") return x.nodes()[c].content;
  return {};
}

std::size_t point_count(const XmlNode& n) {
  std::istringstream in(n.attributes.at("points"));
  std::string pair;
  std::size_t count = 0;
  while (in >> pair) ++count;
  return count;
}

// ---- running the outside checkers --------------------------------------------------------------------------------

int shell(const std::string& command) {
  const int status = std::system(command.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string read_bytes(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

/// Renders `svg` with rsvg-convert (scripts/setup installs librsvg2-bin) and checks the PNG: exit status 0, the
/// PNG signature, and the width the SVG asked for. Also runs xmllint when it is installed.
void check_renders(const std::string& svg, double width, const std::string& stem) {
  const TempDir dir;
  const auto svg_file = dir.write(stem + ".svg", svg);
  const auto png_file = dir.path() / (stem + ".png");
  if (shell("command -v xmllint >/dev/null 2>&1") == 0) {
    CHECK_MESSAGE(shell("xmllint --noout '" + svg_file.string() + "' 2>/dev/null") == 0, "xmllint rejects " << stem);
  }
  REQUIRE_MESSAGE(shell("command -v rsvg-convert >/dev/null 2>&1") == 0,
                  "rsvg-convert is missing (scripts/setup installs librsvg2-bin)");
  const int code = shell("rsvg-convert -o '" + png_file.string() + "' '" + svg_file.string() + "' 2>/dev/null");
  REQUIRE_MESSAGE(code == 0, "rsvg-convert failed on " << stem << " with exit code " << code);
  const std::string png = read_bytes(png_file);
  REQUIRE(png.size() > 24);
  CHECK(png.compare(0, 8, "\x89PNG\r\n\x1a\n") == 0);
  CHECK(png.compare(12, 4, "IHDR") == 0);
  const auto byte = [&](std::size_t k) { return static_cast<unsigned long>(static_cast<unsigned char>(png[k])); };
  const unsigned long png_width = byte(16) << 24 | byte(17) << 16 | byte(18) << 8 | byte(19);
  CHECK(double(png_width) == width);
}

double svg_width(const XmlReader& x) { return std::stod(x.nodes().front().attributes.at("width")); }

// ---- a real fit to plot ------------------------------------------------------------------------------------------

const std::string awkward_id = "TS<12>&\"co\"-'0412'";

struct PlotFixture {
  std::vector<FitSeries> series;
  FitOutcome outcome;
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
    f.outcome.candidates = {fit_law(f.series, Law::Bingham)};
    f.outcome.chosen = f.outcome.candidates.front().converged() ? 0 : -1;
    const std::vector<io::SpecLimit> limits = {{"yield_stress", 1.0, 1000.0, 1}};
    f.outcome.verdict = judge(f.outcome.candidates.front(), limits);
    if (f.outcome.result()) f.svg = fit_plot_svg(f.outcome, f.series);
    return f;
  }();
  return fixture;
}

}  // namespace

TEST_CASE("escaping turns markup characters into references and keeps UTF-8 text") {
  CHECK(svg::escape("a<b>&\"c\"'d'") == "a&lt;b&gt;&amp;&quot;c&quot;&apos;d&apos;");
  CHECK(svg::escape("21.5 \u00b0C \u00b1 0.5") == "21.5 \u00b0C \u00b1 0.5");
  SUBCASE("characters XML cannot carry become the replacement character") {
    CHECK(svg::escape(std::string("a\x01"
                                  "b")) ==
          "a\xEF\xBF\xBD"
          "b");
    CHECK(svg::escape("tab\tand\nnewline") == "tab\tand\nnewline");
  }
  SUBCASE("bytes that are not UTF-8 become the replacement character") {
    CHECK(svg::escape("\xff") == "\xEF\xBF\xBD");
    CHECK(svg::escape("\xC3") == "\xEF\xBF\xBD");                          // truncated sequence
    CHECK(svg::escape("\xC0\xAF") == "\xEF\xBF\xBD\xEF\xBF\xBD");          // overlong '/'
    CHECK(svg::escape("\xED\xA0\x80").find("\xED") == std::string::npos);  // a surrogate
  }
}

TEST_CASE("numbers are written compactly, without exponent or negative zero") {
  CHECK(svg::number(12.0) == "12");
  CHECK(svg::number(12.5) == "12.5");
  CHECK(svg::number(0.126, 2) == "0.13");
  CHECK(svg::number(-0.001) == "0");
  CHECK(svg::number(-3.25) == "-3.25");
  CHECK(svg::number(1.5e7) == "15000000");
  CHECK(svg::number(0.00042, 5) == "0.00042");
  CHECK_THROWS_AS(svg::number(std::nan("")), std::invalid_argument);
  CHECK_THROWS_AS(svg::number(INFINITY), std::invalid_argument);
}

TEST_CASE("scale ticks are round numbers that cover the data") {
  struct Range {
    double lo, hi;
  };
  for (const Range r : {Range{0, 60}, Range{6.13, 14.87}, Range{-0.93, 0.81}, Range{0.00012, 0.00019},
                        Range{1234, 98765}, Range{5, 5}}) {
    const svg::LinearScale s(r.lo, r.hi, 100, 500, 6);
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
  const std::string text = bench_caution;
  const double width = 500, size = 12;
  const auto lines = svg::wrap(text, width, size);
  CHECK(lines.size() >= 2);
  std::string joined;
  for (const auto& l : lines) {
    CHECK(svg::text_width(l, size) <= width);
    joined += (joined.empty() ? "" : " ") + l;
  }
  CHECK(joined == text);
  CHECK(svg::wrap("", width, size).empty());
}

TEST_CASE("a document closes what is still open and refuses an unmatched close") {
  svg::Document doc(120, "a <small> test");
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
  svg::Document empty(10, "t");
  CHECK_THROWS_AS(empty.close(), std::logic_error);
  CHECK_THROWS_AS(empty.finish(0), std::invalid_argument);
}

TEST_CASE("fit plot of a converged fit: readings, curve, band, residuals, header and caution") {
  const PlotFixture& f = converged_plot();
  const FitResult& fit = f.outcome.candidates.front();
  INFO(fit_status_name(fit.status) << " " << fit.reason << ", " << fit.evaluations << " solves");
  REQUIRE(f.outcome.result() != nullptr);
  REQUIRE(f.outcome.verdict.status == Verdict::Status::Pass);
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
    CHECK(some_text_is(x, bench_caution));
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
  FitOutcome failed;
  failed.tests = {plate_test("TS12-0413")};
  FitResult attempt;
  attempt.law = Law::HerschelBulkley;
  attempt.status = FitStatus::NotConverged;
  attempt.reason = "iteration limit reached";
  failed.candidates = {attempt};
  failed.chosen = -1;
  const std::string svg = fit_plot_svg(failed, good.series);
  const XmlReader x(svg);
  CHECK(with_class(x, "reading").size() == good.series.front().times.size());
  CHECK(with_class(x, "residual").empty());
  CHECK(with_class(x, "fit").empty());
  CHECK(with_class(x, "no-result").size() == 1);
  CHECK(some_text_is(x, "herschel-bulkley: not converged \u2014 iteration limit reached"));
  CHECK(with_class(x, "verdict").front()->content == "NO SPEC");
  CHECK(some_text_is(x, bench_caution));
  check_renders(svg, svg_width(x), "failed-fit-plot");
}

TEST_CASE("control chart marks the point beyond the limits and the run, and labels every batch") {
  // Twelve batches near 10 Pa, one spike, then a shift up: the spike lies beyond the limits and the shifted
  // batches form a run above the centre line.
  std::vector<double> values = {10.1, 9.8,  10.2, 9.9,  10.0, 14.5, 10.1, 9.7,  10.3, 9.9,  10.0,
                                10.2, 11.1, 11.4, 11.2, 11.0, 11.3, 11.5, 11.1, 11.2, 11.4, 11.3};
  std::vector<std::string> labels;
  for (std::size_t i = 0; i < values.size(); ++i) labels.push_back("B-" + std::to_string(401 + i));
  const ControlChart chart = individuals_chart("yield_stress", "Pa", labels, values);
  REQUIRE(chart.beyond_limits[5]);
  const auto beyond_count = std::size_t(std::count(chart.beyond_limits.begin(), chart.beyond_limits.end(), true));
  const auto run_count = std::size_t(std::count(chart.in_run.begin(), chart.in_run.end(), true));
  INFO("beyond " << beyond_count << ", in run " << run_count << ", limits " << chart.lower << " to " << chart.upper);
  REQUIRE(run_count >= 8);

  const std::string svg = control_chart_svg(chart, "Yield stress of TS12 & <trial> batches");
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
  CHECK(some_text_is(x, bench_caution));
  check_renders(svg, svg_width(x), "control-chart");
}

TEST_CASE("control chart of many batches labels a subset that does not crowd") {
  std::vector<double> values;
  std::vector<std::string> labels;
  for (int i = 0; i < 120; ++i) {
    values.push_back(20 + std::sin(0.7 * i) + 0.3 * std::cos(2.3 * i));
    labels.push_back("TS12-" + std::to_string(1000 + i));
  }
  const ControlChart chart = individuals_chart("viscosity", "Pa.s", labels, values);
  const std::string svg = control_chart_svg(chart, "Viscosity");
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
