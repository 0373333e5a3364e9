#include "src/io/input_error.hpp"

#include <algorithm>
#include <cctype>
#include <utility>

namespace spreadfit::io {

namespace {

// Longest parts echoed whole: a file path, a field (a CSV header cell, an option as written), a message.
constexpr std::size_t kFileLimit = 300;
constexpr std::size_t kFieldLimit = 80;
constexpr std::size_t kMessageLimit = 600;

/// One printable line: line breaks become blanks, other control characters (NUL, ESC, DEL) \xNN.
std::string printable(std::string_view text, std::size_t limit) {
  std::string out;
  std::size_t i = 0;
  for (; i < text.size() && out.size() < limit; ++i) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    if (c == '\n' || c == '\r' || c == '\t')
      out += ' ';
    else if (c < 0x20 || c == 0x7F) {
      static const char* const hex = "0123456789ABCDEF";
      out += "\\x";
      out += hex[c >> 4];
      out += hex[c & 0xF];
    } else
      out += static_cast<char>(c);
  }
  if (i < text.size()) {
    // Do not end inside a UTF-8 sequence: drop continuation bytes and the lead byte they belong to.
    while (!out.empty() && (static_cast<unsigned char>(out.back()) & 0xC0) == 0x80) out.pop_back();
    if (!out.empty() && (static_cast<unsigned char>(out.back()) & 0xC0) == 0xC0) out.pop_back();
    out += "...";
  }
  return out;
}

std::string location_line(const std::string& file, int line, int column, const std::string& field,
                          const std::string& message) {
  std::string out = printable(file, kFileLimit);
  if (!file.empty() && line > 0) {
    out += ':' + std::to_string(line);
    if (column > 0) out += ':' + std::to_string(column);
  }
  if (!out.empty()) out += ": ";
  if (!field.empty()) out += printable(field, kFieldLimit) + ": ";
  out += printable(message, kMessageLimit);
  return out;
}

std::string lower_ascii(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

}  // namespace

InputError::InputError(std::string file, int line, std::string field, std::string message, int column)
    : std::runtime_error(location_line(file, line, column, field, message)),
      file_(std::move(file)),
      line_(line),
      column_(column),
      field_(std::move(field)),
      message_(std::move(message)) {}

void print_input_error(std::ostream& out, const InputError& error, std::string_view prefix) {
  out << prefix << ": " << error.what() << '\n';
  for (const std::string& line : error.further()) out << prefix << ": " << line << '\n';
  if (error.truncated())
    out << prefix << ": " << (error.file().empty() ? std::string("input") : printable(error.file(), kFileLimit))
        << ": stopped after " << InputError::max_reported << " errors; more may follow\n";
}

std::string shorten_for_message(std::string_view text, std::size_t limit) { return printable(text, limit); }

std::string quote_for_message(std::string_view text, std::size_t limit) {
  // Built by appending: GCC 12 gives a false -Wrestrict on "'" + std::string.
  std::string out(1, '\'');
  out.append(printable(text, limit)).push_back('\'');
  return out;
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
  const std::size_t n = a.size(), m = b.size();
  // Three rolling rows: i-2, i-1, i (the transposition looks two rows back).
  std::vector<std::size_t> two_back(m + 1), prev(m + 1), cur(m + 1);
  for (std::size_t j = 0; j <= m; ++j) prev[j] = j;
  for (std::size_t i = 1; i <= n; ++i) {
    cur[0] = i;
    for (std::size_t j = 1; j <= m; ++j) {
      const std::size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
      cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
        cur[j] = std::min(cur[j], two_back[j - 2] + 1);
    }
    std::swap(two_back, prev);
    std::swap(prev, cur);
  }
  return prev[m];
}

std::optional<std::string> nearest_name(std::string_view given, const std::vector<std::string_view>& candidates) {
  const std::string g = lower_ascii(given);
  std::optional<std::string> best;
  std::size_t best_distance = 0;
  for (std::string_view c : candidates) {
    const std::size_t d = edit_distance(g, lower_ascii(c));
    const std::size_t length = std::max(g.size(), c.size());
    const std::size_t limit = length <= 4 ? 1 : length <= 8 ? 2 : 3;
    if (d > limit || d >= g.size()) continue;
    if (!best || d < best_distance) {
      best = std::string(c);
      best_distance = d;
    }
  }
  return best;
}

std::string join_names(const std::vector<std::string_view>& names) {
  std::string out;
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (i > 0) out += ", ";
    out += names[i];
  }
  return out;
}

std::string did_you_mean(std::string_view given, const std::vector<std::string_view>& candidates) {
  if (auto near = nearest_name(given, candidates)) return "; did you mean '" + *near + "'?";
  return " (expected one of: " + join_names(candidates) + ")";
}

}  // namespace spreadfit::io
