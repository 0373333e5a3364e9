// Checks shared by the SVG report tests: a strict XML reader (well-formedness, elements by class, their text) and
// the outside checkers (rsvg-convert renders every SVG to PNG; xmllint parses it when installed).
#pragma once

#include <doctest/doctest.h>
#include <sys/wait.h>

#include <algorithm>
#include <cctype>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <map>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "tests/io/io_test_support.hpp"

namespace spreadfit::svg_test {

using spreadfit::io::test::TempDir;

// ---- a strict little XML reader: well-formedness plus what the checks below need ---------------------------------

struct XmlNode {
  std::string name;
  std::map<std::string, std::string> attributes;  // values with references decoded
  std::string content;                            // all character data inside, descendants included, decoded
  std::vector<std::size_t> children;
};

inline std::string utf8(unsigned long code) {
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
inline std::string collapsed(const std::string& text) {
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

inline bool has_class(const XmlNode& n, const std::string& token) {
  auto it = n.attributes.find("class");
  if (it == n.attributes.end()) return false;
  std::istringstream words(it->second);
  std::string w;
  while (words >> w)
    if (w == token) return true;
  return false;
}

inline std::vector<const XmlNode*> with_class(const XmlReader& x, const std::string& token) {
  std::vector<const XmlNode*> out;
  for (const auto& n : x.nodes())
    if (has_class(n, token)) out.push_back(&n);
  return out;
}

inline bool some_text_is(const XmlReader& x, const std::string& wanted) {
  return std::any_of(x.nodes().begin(), x.nodes().end(),
                     [&](const XmlNode& n) { return n.name == "text" && collapsed(n.content) == wanted; });
}

inline std::string tooltip(const XmlReader& x, const XmlNode& n) {
  for (std::size_t c : n.children)
    if (x.nodes()[c].name == "title") return x.nodes()[c].content;
  return {};
}

inline std::size_t point_count(const XmlNode& n) {
  std::istringstream in(n.attributes.at("points"));
  std::string pair;
  std::size_t count = 0;
  while (in >> pair) ++count;
  return count;
}

// ---- running the outside checkers --------------------------------------------------------------------------------

inline int shell(const std::string& command) {
  const int status = std::system(command.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

inline std::string read_bytes(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

/// Renders `svg` with rsvg-convert (scripts/setup installs librsvg2-bin) and checks the PNG: exit status 0, the
/// PNG signature, and the width the SVG asked for. Also runs xmllint when it is installed.
inline void check_renders(const std::string& svg, double width, const std::string& stem) {
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

inline double svg_width(const XmlReader& x) { return std::stod(x.nodes().front().attributes.at("width")); }

}  // namespace spreadfit::svg_test
