// A small SVG writer for spreadfit's reports: elements with attributes and text, written as well-formed XML
// (UTF-8), numbers in a compact fixed-point form, and the linear scales with round tick values both plots need.
// No layout engine and no fonts: the reports place every element themselves and use the viewer's generic
// sans-serif face, so an SVG renders the same offline on any system.
#pragma once

#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace spreadfit::report::svg {

/// `text` made safe as XML character data and as a quoted attribute value: & < > " ' become entity references;
/// control characters XML 1.0 does not allow (all below U+0020 except tab, line feed and carriage return) and
/// bytes that are not valid UTF-8 become U+FFFD (the replacement character). Valid UTF-8 passes unchanged.
std::string escape(std::string_view text);

/// A finite number in the shortest fixed-point form with at most `decimals` digits after the point: 12, 12.5,
/// -0.25; never "-0" and never an exponent. Throws std::invalid_argument for NaN or infinity (a coordinate that
/// is not a number is a bug in the caller, which must leave such points out).
std::string number(double value, int decimals = 2);

/// One attribute; the value is plain text (escaped when written), or a number written with number().
struct Attribute {
  Attribute(std::string attribute_name, std::string text) : name(std::move(attribute_name)), value(std::move(text)) {}
  Attribute(std::string attribute_name, const char* text) : name(std::move(attribute_name)), value(text) {}
  Attribute(std::string attribute_name, double v, int decimals = 2)
      : name(std::move(attribute_name)), value(number(v, decimals)) {}
  Attribute(std::string attribute_name, int v) : name(std::move(attribute_name)), value(std::to_string(v)) {}
  std::string name, value;
};
using Attributes = std::vector<Attribute>;

/// Points as the `points` attribute of a polyline or polygon: "x1,y1 x2,y2 ...".
std::string points(const std::vector<std::pair<double, double>>& xy);

/// An SVG document built element by element, in drawing order (later elements paint over earlier ones).
/// Element and attribute names are the caller's constants (not escaped); attribute values and text are escaped.
class Document {
 public:
  /// `title` becomes the document's <title> (shown by viewers, read by screen readers).
  Document(double width, std::string_view title);

  /// An element without content, e.g. add("circle", {{"cx", 10.0}, {"cy", 20.0}, {"r", 3.0}}).
  void add(std::string_view name, const Attributes& attributes);
  /// An element holding text only, e.g. a <text> or <title>.
  void add_text(std::string_view name, const Attributes& attributes, std::string_view text);
  /// A <text> of several lines: one <tspan> a line at `x`, the first on baseline `y`, the next `line_height`
  /// lower. The lines are separated by one space, so the element's text is the lines joined as one sentence.
  void add_text_lines(const Attributes& attributes, const std::vector<std::string>& lines, double x, double y,
                      double line_height);
  /// Starts an element that holds others (a <g>, or a marker that carries a <title> tooltip).
  void open(std::string_view name, const Attributes& attributes);
  /// Ends the innermost open element. Throws std::logic_error when none is open.
  void close();

  double width() const { return width_; }

  /// The finished document, `height` px tall (a viewBox of width x height); closes any element still open.
  /// Throws std::invalid_argument when the height is not positive.
  std::string finish(double height);

 private:
  void start_tag(std::string_view name, const Attributes& attributes);
  double width_;
  std::string title_;
  std::string body_;
  std::vector<std::string> open_;
};

/// A linear map from data values to pixels, with round tick values (1, 2 or 5 times a power of ten) that span
/// the data: the domain is widened to the outermost ticks.
class LinearScale {
 public:
  /// Data range [lo, hi] onto pixels [pixel_lo, pixel_hi] (pixel_hi < pixel_lo for a y axis, which grows upward).
  /// About `target_ticks` ticks. A zero-width or inverted range is widened around its value; non-finite ends
  /// give the range [0, 1]. With `widen` false the domain stays [lo, hi] and only the ticks inside it are kept
  /// (an axis that starts where the data start, e.g. a time axis from a release before the clock's zero).
  LinearScale(double lo, double hi, double pixel_lo, double pixel_hi, int target_ticks = 6, bool widen = true);

  double operator()(double value) const;
  const std::vector<double>& ticks() const { return ticks_; }
  double step() const { return step_; }
  double lo() const { return lo_; }
  double hi() const { return hi_; }
  /// A tick value written with just enough decimals to tell ticks apart (0.05 -> "0.05", 20 -> "20").
  std::string tick_label(double value) const;

 private:
  double lo_ = 0, hi_ = 1, pixel_lo_ = 0, pixel_hi_ = 1, step_ = 1;
  std::vector<double> ticks_;
};

/// A logarithmic map from positive data values to pixels over exactly [lo, hi] (not widened: a contour map's
/// plot area is its grid), with ticks at 1, 2 and 5 times powers of ten inside the range, or at powers of ten only
/// when those alone give `target_ticks` or more. A range with fewer than four 1-2-5 ticks (or `target_ticks`, when
/// less; e.g. 13 to 45, which holds only 20) gets the round linear ticks of LinearScale for `target_ticks` inside
/// it instead (15, 20, ..., 45), so that a short log axis still reads at a glance. A non-positive or non-finite end
/// gives the range [1, 10]; a zero-width range is widened by 10% each way.
class LogScale {
 public:
  LogScale(double lo, double hi, double pixel_lo, double pixel_hi, int target_ticks = 6);

  /// Pixel of a positive value (values outside [lo, hi] extrapolate).
  double operator()(double value) const;
  const std::vector<double>& ticks() const { return ticks_; }
  double lo() const { return lo_; }
  double hi() const { return hi_; }
  /// A tick value as a plain number, never with an exponent: 0.002, 0.5, 20, 5000.
  std::string tick_label(double value) const;

 private:
  double lo_ = 1, hi_ = 10, pixel_lo_ = 0, pixel_hi_ = 1;
  std::vector<double> ticks_;
};

/// Horizontal grid lines and labelled ticks of a y axis on the plot area [x_left, x_right] x [scale range], and
/// the axis name rotated along the left edge. Ticks are labelled with LinearScale::tick_label.
void y_axis(Document& doc, const LinearScale& y, double x_left, double x_right, std::string_view name);

/// Tick marks and labels of an x axis under a plot area whose bottom edge is at `bottom`, labelled with
/// LinearScale::tick_label.
void x_ticks(Document& doc, const LinearScale& x, double bottom);

/// Light vertical grid lines at the x ticks, from `top` to `bottom`.
void vertical_grid(Document& doc, const LinearScale& x, double top, double bottom);

/// The outline of a plot area.
void plot_frame(Document& doc, double left, double top, double right, double bottom);

/// The name of an x axis, centred under the plot area [left, right] on baseline `y`.
void x_axis_name(Document& doc, double left, double right, double y, std::string_view name);

/// One <text> element a line at `x`, the first on baseline `y` and each next 1.45 x `size` lower, in `fill` and
/// `weight`, with the class `cls` when it is not empty. Returns the baseline after the last line.
double text_lines(Document& doc, const std::vector<std::string>& lines, double x, double y, double size,
                  std::string_view fill, std::string_view weight = "normal", std::string_view cls = {});

/// Marker shapes for scatter points: distinct in outline as well as colour, for readers who do not tell colours apart.
enum class Shape { Circle, Square, Triangle, Diamond };

/// A marker centred on (x, y), `size` px from its centre to its edge (the radius of a circle), as one element
/// (<circle>, <rect> or <polygon>) with `attributes` (class, fill, stroke) added; a non-empty `tooltip` becomes
/// the element's <title>.
void marker(Document& doc, Shape shape, double x, double y, double size, const Attributes& attributes,
            std::string_view tooltip = {});

/// `text` wrapped to fit a box of `width` px whose top-left corner is (x, y), drawn with a `fill` background and a
/// `stroke` border, text in `text_colour` at `font_size` px; one <text> element (add_text_lines). Returns the box
/// height.
double text_box(Document& doc, std::string_view text, double x, double y, double width, double font_size,
                std::string_view fill, std::string_view stroke, std::string_view text_colour);

/// Colours every report shares: text, secondary text, plot frames.
inline constexpr const char* ink = "#1b1f24";
inline constexpr const char* muted = "#59606a";
inline constexpr const char* frame = "#9aa1a9";

/// The foot every report shares: the caution box across the page at `y`, the software name and version under it,
/// then the finished document.
std::string finish_with_caution(Document& doc, std::string_view caution, double y, double page_width, double margin,
                                std::string_view footer_colour);

/// A unit as a reader writes it: the interface's ASCII symbols with a middle dot for the product and superscripts
/// for powers, "Pa.s^n" -> "Pa\u00b7s\u207f", "Pa.s" -> "Pa\u00b7s", "m^3" -> "m\u00b3", "Pa s" -> "Pa\u00b7s". Other
/// text passes unchanged.
std::string unit_text(std::string_view unit);

/// Opens a group whose drawing is clipped to the rectangle [left, right] x [top, bottom]: a <clipPath> with the
/// id `id` (unique in the document), then <g clip-path="url(#id)">; close it with Document::close().
void open_clipped_group(Document& doc, std::string_view id, double left, double top, double right, double bottom);

/// Approximate width [px] of `text` in the generic sans-serif face at `font_size` px (0.56 em a character on
/// average, a little generous so that layouts built on it do not overlap).
double text_width(std::string_view text, double font_size);

/// `text` broken at spaces into lines no wider than `max_width` px at `font_size` (a single longer word keeps a
/// line of its own).
std::vector<std::string> wrap(std::string_view text, double max_width, double font_size);

}  // namespace spreadfit::report::svg
