#include "src/report/svg_document.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <initializer_list>
#include <stdexcept>

#include "src/version.hpp"

namespace spreadfit::report::svg {

namespace {

// Length of the valid UTF-8 sequence starting at text[i], or 0 when the bytes there are not one.
// (RFC 3629: no overlong forms, no surrogates, nothing above U+10FFFF.)
std::size_t utf8_sequence(std::string_view text, std::size_t i) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
  const unsigned char b0 = byte(i);
  if (b0 < 0x80) return 1;
  std::size_t n = 0;
  unsigned char lo = 0x80, hi = 0xBF;  // allowed range of the second byte
  if (b0 >= 0xC2 && b0 <= 0xDF)
    n = 2;
  else if (b0 == 0xE0)
    n = 3, lo = 0xA0;
  else if (b0 >= 0xE1 && b0 <= 0xEC)
    n = 3;
  else if (b0 == 0xED)
    n = 3, hi = 0x9F;
  else if (b0 >= 0xEE && b0 <= 0xEF)
    n = 3;
  else if (b0 == 0xF0)
    n = 4, lo = 0x90;
  else if (b0 >= 0xF1 && b0 <= 0xF3)
    n = 4;
  else if (b0 == 0xF4)
    n = 4, hi = 0x8F;
  else
    return 0;
  if (i + n > text.size()) return 0;
  if (byte(i + 1) < lo || byte(i + 1) > hi) return 0;
  for (std::size_t k = 2; k < n; ++k)
    if (byte(i + k) < 0x80 || byte(i + k) > 0xBF) return 0;
  return n;
}

constexpr const char* replacement_character = "\xEF\xBF\xBD";

}  // namespace

std::string escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const char c = text[i];
    switch (c) {
      case '&':
        out += "&amp;";
        ++i;
        continue;
      case '<':
        out += "&lt;";
        ++i;
        continue;
      case '>':
        out += "&gt;";
        ++i;
        continue;
      case '"':
        out += "&quot;";
        ++i;
        continue;
      case '\'':
        out += "&apos;";
        ++i;
        continue;
      default:
        break;
    }
    const auto b = static_cast<unsigned char>(c);
    if (b < 0x20 && c != '\t' && c != '\n' && c != '\r') {
      out += replacement_character;
      ++i;
      continue;
    }
    const std::size_t n = utf8_sequence(text, i);
    if (n == 0) {
      out += replacement_character;
      ++i;
    } else {
      out.append(text.substr(i, n));
      i += n;
    }
  }
  return out;
}

std::string number(double value, int decimals) {
  if (!std::isfinite(value)) throw std::invalid_argument("svg::number: the value is not finite");
  decimals = std::clamp(decimals, 0, 12);
  std::string s = fmt::format("{:.{}f}", value, decimals);
  if (s.find('.') != std::string::npos) {
    while (s.back() == '0') s.pop_back();
    if (s.back() == '.') s.pop_back();
  }
  if (s == "-0") s = "0";
  return s;
}

std::string points(const std::vector<std::pair<double, double>>& xy) {
  std::string s;
  for (const auto& [x, y] : xy) {
    if (!s.empty()) s += ' ';
    s += number(x);
    s += ',';
    s += number(y);
  }
  return s;
}

Document::Document(double width, std::string_view title) : width_(width), title_(title) {
  if (!(width > 0) || !std::isfinite(width)) throw std::invalid_argument("svg::Document: width must be positive");
}

void Document::start_tag(std::string_view name, const Attributes& attributes) {
  body_ += std::string(open_.size() + 1, ' ');
  body_ += '<';
  body_ += name;
  for (const Attribute& a : attributes) {
    body_ += ' ';
    body_ += a.name;
    body_ += "=\"";
    body_ += escape(a.value);
    body_ += '"';
  }
}

void Document::add(std::string_view name, const Attributes& attributes) {
  start_tag(name, attributes);
  body_ += "/>\n";
}

void Document::add_text(std::string_view name, const Attributes& attributes, std::string_view text) {
  start_tag(name, attributes);
  body_ += '>';
  body_ += escape(text);
  body_ += "</";
  body_ += name;
  body_ += ">\n";
}

void Document::add_text_lines(const Attributes& attributes, const std::vector<std::string>& lines, double x, double y,
                              double line_height) {
  start_tag("text", attributes);
  body_ += '>';
  for (std::size_t i = 0; i < lines.size(); ++i) {
    if (i > 0) body_ += ' ';
    body_ += "<tspan x=\"" + number(x) + "\" y=\"" + number(y + double(i) * line_height) + "\">";
    body_ += escape(lines[i]);
    body_ += "</tspan>";
  }
  body_ += "</text>\n";
}

void Document::open(std::string_view name, const Attributes& attributes) {
  start_tag(name, attributes);
  body_ += ">\n";
  open_.emplace_back(name);
}

void Document::close() {
  if (open_.empty()) throw std::logic_error("svg::Document::close: no element is open");
  body_ += std::string(open_.size(), ' ');
  body_ += "</" + open_.back() + ">\n";
  open_.pop_back();
}

std::string Document::finish(double height) {
  if (!(height > 0) || !std::isfinite(height)) throw std::invalid_argument("svg::Document: height must be positive");
  while (!open_.empty()) close();
  std::string s = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  s += fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"{1}\" viewBox=\"0 0 {0} {1}\" "
      "font-family=\"sans-serif\">\n",
      number(width_), number(height));
  s += " <title>" + escape(title_) + "</title>\n";
  s += body_;
  s += "</svg>\n";
  return s;
}

LinearScale::LinearScale(double lo, double hi, double pixel_lo, double pixel_hi, int target_ticks, bool widen)
    : pixel_lo_(pixel_lo), pixel_hi_(pixel_hi) {
  if (!std::isfinite(lo) || !std::isfinite(hi)) lo = 0, hi = 1;
  if (hi < lo) std::swap(lo, hi);
  if (hi - lo <= 1e-12 * std::max(std::abs(lo), std::abs(hi))) {
    const double pad = lo == 0 ? 1.0 : 0.1 * std::abs(lo);
    lo -= pad;
    hi += pad;
  }
  target_ticks = std::max(target_ticks, 2);
  const double raw = (hi - lo) / target_ticks;
  const double power = std::pow(10.0, std::floor(std::log10(raw)));
  const double fraction = raw / power;
  step_ = (fraction < 1.5 ? 1.0 : fraction < 3.5 ? 2.0 : fraction < 7.5 ? 5.0 : 10.0) * power;
  const double first = std::floor(lo / step_ + 1e-9);
  const double last = std::ceil(hi / step_ - 1e-9);
  for (double k = first; k <= last + 0.5; k += 1.0) {
    const double v = k * step_;
    ticks_.push_back(std::abs(v) < 1e-9 * step_ ? 0.0 : v);
  }
  if (!widen) {
    const double slack = 1e-9 * step_;
    std::erase_if(ticks_, [&](double t) { return t < lo - slack || t > hi + slack; });
    lo_ = lo;
    hi_ = hi;
    return;
  }
  lo_ = std::min(ticks_.front(), lo);  // min/max: a tick may miss the data end by a rounding error
  hi_ = std::max(ticks_.back(), hi);
}

double LinearScale::operator()(double value) const {
  return pixel_lo_ + (value - lo_) / (hi_ - lo_) * (pixel_hi_ - pixel_lo_);
}

std::string LinearScale::tick_label(double value) const {
  const int decimals = std::max(0, -int(std::floor(std::log10(step_) + 1e-9)));
  return number(value, decimals);
}

LogScale::LogScale(double lo, double hi, double pixel_lo, double pixel_hi, int target_ticks)
    : pixel_lo_(pixel_lo), pixel_hi_(pixel_hi) {
  if (!std::isfinite(lo) || !std::isfinite(hi) || !(lo > 0) || !(hi > 0)) lo = 1, hi = 10;
  if (hi < lo) std::swap(lo, hi);
  if (hi <= lo * (1 + 1e-12)) lo /= 1.1, hi *= 1.1;
  lo_ = lo;
  hi_ = hi;
  target_ticks = std::max(target_ticks, 2);
  const auto inside = [&](double v) { return v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9); };
  // m x 10^e as the nearest double to the decimal (dividing by an exact power of ten for e < 0).
  const auto decimal = [](double m, int e) { return e >= 0 ? m * std::pow(10.0, e) : m / std::pow(10.0, -e); };
  const auto decade_ticks = [&](std::initializer_list<double> mantissas) {
    std::vector<double> t;
    const int first = int(std::floor(std::log10(lo))) - 1, last = int(std::ceil(std::log10(hi))) + 1;
    for (int e = first; e <= last; ++e)
      for (double m : mantissas)
        if (inside(decimal(m, e))) t.push_back(decimal(m, e));
    return t;
  };
  ticks_ = decade_ticks({1.0});
  if (int(ticks_.size()) >= target_ticks) return;
  ticks_ = decade_ticks({1.0, 2.0, 5.0});
  if (int(ticks_.size()) >= std::min(target_ticks, 4)) return;
  ticks_.clear();
  const LinearScale linear(lo, hi, 0, 1, target_ticks);
  for (double t : linear.ticks())
    if (inside(t)) ticks_.push_back(t);
}

double LogScale::operator()(double value) const {
  return pixel_lo_ + std::log(value / lo_) / std::log(hi_ / lo_) * (pixel_hi_ - pixel_lo_);
}

std::string LogScale::tick_label(double value) const {
  // The fewest decimals that write the value exactly to 9 significant digits.
  for (int decimals = 0; decimals < 12; ++decimals) {
    const double shifted = value * std::pow(10.0, decimals);
    if (std::abs(shifted - std::round(shifted)) <= 1e-9 * std::max(1.0, std::abs(shifted)))
      return number(value, decimals);
  }
  return number(value, 12);
}

void y_axis(Document& doc, const LinearScale& y, double x_left, double x_right, std::string_view name) {
  for (double t : y.ticks()) {
    const double py = y(t);
    doc.add("line",
            {{"x1", x_left}, {"y1", py}, {"x2", x_right}, {"y2", py}, {"stroke", "#e3e6ea"}, {"stroke-width", 1.0}});
    doc.add_text("text",
                 {{"x", x_left - 7}, {"y", py + 4}, {"font-size", 11.0}, {"text-anchor", "end"}, {"fill", "#3b4048"}},
                 y.tick_label(t));
  }
  const double middle = 0.5 * (y(y.lo()) + y(y.hi()));
  double widest = 0;
  for (double t : y.ticks()) widest = std::max(widest, text_width(y.tick_label(t), 11.0));
  const double x = x_left - widest - 20;
  doc.add_text("text",
               {{"x", x},
                {"y", middle},
                {"font-size", 12.0},
                {"text-anchor", "middle"},
                {"fill", "#1b1f24"},
                {"transform", "rotate(-90 " + number(x) + " " + number(middle) + ")"}},
               name);
}

void x_ticks(Document& doc, const LinearScale& x, double bottom) {
  for (double v : x.ticks()) {
    const double px = x(v);
    doc.add("line", {{"x1", px}, {"y1", bottom}, {"x2", px}, {"y2", bottom + 4}, {"stroke", frame}});
    doc.add_text("text",
                 {{"x", px}, {"y", bottom + 17}, {"font-size", 11.0}, {"fill", "#3b4048"}, {"text-anchor", "middle"}},
                 x.tick_label(v));
  }
}

void vertical_grid(Document& doc, const LinearScale& x, double top, double bottom) {
  for (double v : x.ticks())
    doc.add("line", {{"x1", x(v)}, {"y1", top}, {"x2", x(v)}, {"y2", bottom}, {"stroke", "#eef0f2"}});
}

void plot_frame(Document& doc, double left, double top, double right, double bottom) {
  doc.add("rect", {{"x", left},
                   {"y", top},
                   {"width", right - left},
                   {"height", bottom - top},
                   {"fill", "none"},
                   {"stroke", frame},
                   {"stroke-width", 1.0}});
}

void x_axis_name(Document& doc, double left, double right, double y, std::string_view name) {
  doc.add_text("text",
               {{"x", 0.5 * (left + right)}, {"y", y}, {"font-size", 12.0}, {"fill", ink}, {"text-anchor", "middle"}},
               name);
}

double text_lines(Document& doc, const std::vector<std::string>& lines, double x, double y, double size,
                  std::string_view fill, std::string_view weight, std::string_view cls) {
  for (const auto& line : lines) {
    Attributes a{
        {"x", x}, {"y", y}, {"font-size", size}, {"fill", std::string(fill)}, {"font-weight", std::string(weight)}};
    if (!cls.empty()) a.insert(a.begin(), Attribute("class", std::string(cls)));
    doc.add_text("text", a, line);
    y += 1.45 * size;
  }
  return y;
}

void marker(Document& doc, Shape shape, double x, double y, double size, const Attributes& attributes,
            std::string_view tooltip) {
  Attributes a;
  std::string_view name;
  switch (shape) {
    case Shape::Circle:
      name = "circle";
      a = {{"cx", x}, {"cy", y}, {"r", size}};
      break;
    case Shape::Square: {
      const double half = 0.88 * size;  // about the circle's area
      name = "rect";
      a = {{"x", x - half}, {"y", y - half}, {"width", 2 * half}, {"height", 2 * half}};
      break;
    }
    case Shape::Triangle: {
      const double r = 1.3 * size;
      name = "polygon";
      a = {{"points", points({{x, y - r}, {x + 0.866 * r, y + 0.5 * r}, {x - 0.866 * r, y + 0.5 * r}})}};
      break;
    }
    case Shape::Diamond: {
      const double r = 1.25 * size;
      name = "polygon";
      a = {{"points", points({{x, y - r}, {x + r, y}, {x, y + r}, {x - r, y}})}};
      break;
    }
  }
  a.insert(a.end(), attributes.begin(), attributes.end());
  if (tooltip.empty()) {
    doc.add(name, a);
  } else {
    doc.open(name, a);
    doc.add_text("title", {}, tooltip);
    doc.close();
  }
}

double text_box(Document& doc, std::string_view text, double x, double y, double width, double font_size,
                std::string_view fill, std::string_view stroke, std::string_view text_colour) {
  const double pad = 0.75 * font_size, line_height = 1.4 * font_size;
  const std::vector<std::string> lines = wrap(text, width - 2 * pad, font_size);
  const double height = 2 * pad + line_height * double(lines.size()) - (line_height - font_size);
  doc.add("rect", {{"x", x},
                   {"y", y},
                   {"width", width},
                   {"height", height},
                   {"rx", 4.0},
                   {"fill", std::string(fill)},
                   {"stroke", std::string(stroke)},
                   {"stroke-width", 1.0}});
  doc.add_text_lines({{"font-size", font_size}, {"fill", std::string(text_colour)}}, lines, x + pad,
                     y + pad + 0.8 * font_size, line_height);
  return height;
}

std::string unit_text(std::string_view unit) {
  std::string out;
  for (std::size_t i = 0; i < unit.size(); ++i) {
    const char c = unit[i];
    const bool between_symbols = i > 0 && i + 1 < unit.size() &&
                                 std::isalpha(static_cast<unsigned char>(unit[i - 1])) &&
                                 std::isalpha(static_cast<unsigned char>(unit[i + 1]));
    if ((c == '.' || c == ' ') && between_symbols) {
      out += "\u00b7";
    } else if (c == '^' && i + 1 < unit.size()) {
      const char power = unit[++i];
      switch (power) {
        case 'n':
          out += "\u207f";
          break;
        case '2':
          out += "\u00b2";
          break;
        case '3':
          out += "\u00b3";
          break;
        case '-':
          if (i + 1 < unit.size() && unit[i + 1] == '1') {
            out += "\u207b\u00b9";
            ++i;
          } else {
            out += "^-";
          }
          break;
        default:
          out += '^';
          out += power;
      }
    } else {
      out += c;
    }
  }
  return out;
}

void open_clipped_group(Document& doc, std::string_view id, double left, double top, double right, double bottom) {
  doc.open("defs", {});
  doc.open("clipPath", {{"id", std::string(id)}});
  doc.add("rect", {{"x", left}, {"y", top}, {"width", right - left}, {"height", bottom - top}});
  doc.close();
  doc.close();
  doc.open("g", {{"clip-path", fmt::format("url(#{})", id)}});
}

double text_width(std::string_view text, double font_size) {
  std::size_t characters = 0;
  for (char c : text)
    if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) ++characters;  // count UTF-8 lead bytes only
  return 0.56 * font_size * double(characters);
}

std::vector<std::string> wrap(std::string_view text, double max_width, double font_size) {
  std::vector<std::string> lines;
  std::string line;
  std::size_t i = 0;
  while (i < text.size()) {
    while (i < text.size() && text[i] == ' ') ++i;
    if (i == text.size()) break;
    const std::size_t end = std::min(text.find(' ', i), text.size());
    const std::string_view word = text.substr(i, end - i);
    const std::string candidate = line.empty() ? std::string(word) : line + " " + std::string(word);
    if (!line.empty() && text_width(candidate, font_size) > max_width) {
      lines.push_back(line);
      line = std::string(word);
    } else {
      line = candidate;
    }
    i = end;
  }
  if (!line.empty()) lines.push_back(line);
  return lines;
}

std::string finish_with_caution(Document& doc, std::string_view caution, double y, double page_width, double margin,
                                std::string_view footer_colour) {
  y += text_box(doc, caution, margin, y, page_width - 2 * margin, 12, "#fbf5e6", "#dcc48e", "#3a3020");
  doc.add_text("text",
               {{"x", page_width - margin},
                {"y", y + 18},
                {"font-size", 10.0},
                {"fill", std::string(footer_colour)},
                {"text-anchor", "end"}},
               fmt::format("{} {}", software_name, software_version()));
  return doc.finish(y + 28);
}

}  // namespace spreadfit::report::svg
