#include "src/io/readings_csv.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "src/io/input_error.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/text.hpp"
#include "src/io/units.hpp"

namespace spreadfit::io {

namespace {

/// Most rows one file may hold: bounds the work of a fit (each row is solved at every evaluation).
constexpr std::size_t kMaxRows = 5000;
/// Largest file read: a file of kMaxRows rows is under 200 kB; anything far larger is not a readings file.
constexpr std::uintmax_t kMaxFileBytes = 16u << 20;
/// An interval this many times longer than the one before and the median is flagged as a possible slip.
constexpr double kJumpFactor = 50.0;

struct Cell {
  std::string text;  ///< without surrounding blanks and quotes
  int column = 1;    ///< 1-based byte column of the cell's first non-blank character
};

bool is_blank(char c) { return c == ' ' || c == '\t'; }

/// Blanks around a cell: space and tab (a line's CR is removed where the line is read).
constexpr std::string_view kCellBlanks = " \t";

/// Reads one CSV input: holds the source name and the current line for errors.
class CsvReader {
 public:
  CsvReader(std::string_view text, std::string source) : text_(text), source_(std::move(source)) {}

  ReadingSeries read();

 private:
  [[noreturn]] void fail(int line, int column, const std::string& field, const std::string& message) const {
    throw InputError(source_, line, field, message, column);
  }
  /// Records a row's error and reads on, so that one run reports up to InputError::max_reported of them.
  void note(const InputError& error);
  void warn(int line, const std::string& field, const std::string& message) {
    series_.warnings.push_back(InputError(source_, line, field, message).what());
  }
  std::vector<Cell> split(std::string_view line, int line_number) const;
  void read_header(std::string_view line, int line_number);
  void read_row(std::string_view line, int line_number);

  std::string_view text_;
  std::string source_;
  ReadingSeries series_;
  std::string time_field_, value_field_;  ///< header cells as written, used as the field in messages
  int header_line_ = 0;
  std::vector<double> steps_;  ///< intervals between successive times so far
  double median_step_ = 0;
  int previous_line_ = 0;
  std::string previous_time_text_;
  std::vector<InputError> errors_;
  bool stopped_ = false;  ///< max_reported errors seen: the rest of the file is not read
};

void CsvReader::note(const InputError& error) {
  errors_.push_back(error);
  if (errors_.size() >= InputError::max_reported) stopped_ = true;
}

/// "'2,9'" style echo of a cell: short and printable.
std::string echo(const std::string& text) { return quote_for_message(text); }

/// Whether `a` and `b` look like the two halves of a number written with a decimal comma ("2" and "9").
bool digits_only(const std::string& text) {
  return !text.empty() && text.find_first_not_of("0123456789") == std::string::npos;
}

std::vector<Cell> CsvReader::split(std::string_view line, int line_number) const {
  std::vector<Cell> cells;
  std::size_t i = 0;
  const std::size_t n = line.size();
  while (true) {
    while (i < n && is_blank(line[i])) ++i;
    Cell cell;
    cell.column = static_cast<int>(i) + 1;
    if (i < n && line[i] == '"') {
      const int open_column = static_cast<int>(i) + 1;
      ++i;
      bool closed = false;
      while (i < n) {
        if (line[i] == '"') {
          if (i + 1 < n && line[i + 1] == '"') {
            cell.text += '"';
            i += 2;
            continue;
          }
          ++i;
          closed = true;
          break;
        }
        cell.text += line[i++];
      }
      if (!closed) fail(line_number, open_column, "", "quote opened here is not closed (expected a closing \")");
      while (i < n && is_blank(line[i])) ++i;
      if (i < n && line[i] != ',')
        fail(line_number, static_cast<int>(i) + 1, "",
             std::string("unexpected '") + line[i] + "' after a closing quote (expected ',' or the end of the line)");
      cell.text = std::string(trim(cell.text, kCellBlanks));
    } else {
      const std::size_t start = i;
      while (i < n && line[i] != ',') ++i;
      cell.text = std::string(trim(line.substr(start, i - start), kCellBlanks));
    }
    cells.push_back(std::move(cell));
    if (i >= n) break;
    ++i;  // the comma
  }
  return cells;
}

void CsvReader::read_header(std::string_view line, int line_number) {
  header_line_ = line_number;
  const std::vector<Cell> cells = split(line, line_number);
  const std::string example = "a header row such as 'time [s],front [cm]'";

  // A first row that starts with a number is data without a header.
  bool starts_with_number = true;
  try {
    parse_number(cells.front().text);
  } catch (const UnitError&) {
    starts_with_number = false;
  }
  if (starts_with_number)
    fail(line_number, cells.front().column, "", "missing header row (expected " + example + " before the data)");
  if (cells.size() == 1) {
    const bool other_separator = line.find(';') != std::string_view::npos || line.find('\t') != std::string_view::npos;
    fail(line_number, cells.front().column, "",
         std::string("header has one column") +
             (other_separator ? "; cells must be separated by ',' not ';' or tabs" : "") + " (expected " + example +
             ")");
  }
  if (cells.size() > 2)
    fail(line_number, cells[2].column, cells[2].text,
         "unexpected third column (expected 2 columns: time and one reading; put replicates in files of their "
         "own and list them in [readings] files = [...])");

  struct Parsed {
    std::string name, unit;
    int unit_column;
  };
  auto parse_cell = [&](const Cell& cell) {
    const std::size_t open = cell.text.find('[');
    const std::size_t close = cell.text.rfind(']');
    if (cell.text.empty()) fail(line_number, cell.column, "", "empty column header (expected " + example + ")");
    if (open == std::string::npos || close == std::string::npos || close < open)
      fail(line_number, cell.column, cell.text,
           "column header has no unit in brackets (expected 'name [unit]', such as 'time [s]' or 'front [cm]')");
    if (!trim(std::string_view(cell.text).substr(close + 1), kCellBlanks).empty())
      fail(line_number, cell.column + static_cast<int>(close) + 1, cell.text,
           "text after the unit's closing ']' (expected 'name [unit]')");
    Parsed p;
    // Names compare without regard to ASCII case ("Time [s]", "FRONT [mm]"); units keep their case (mPa, MPa).
    p.name = std::string(trim(std::string_view(cell.text).substr(0, open), kCellBlanks));
    for (char& c : p.name) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    p.unit = std::string(trim(std::string_view(cell.text).substr(open + 1, close - open - 1), kCellBlanks));
    p.unit_column = cell.column + static_cast<int>(open) + 1;
    if (p.unit.empty())
      fail(line_number, p.unit_column, cell.text, "empty unit in brackets (expected a unit, such as [s] or [cm])");
    return p;
  };

  const Parsed time = parse_cell(cells[0]);
  const Parsed reading = parse_cell(cells[1]);
  time_field_ = cells[0].text;
  value_field_ = cells[1].text;

  if (time.name != "time") {
    const bool near_time = !reading_from_name(time.name) && nearest_name(time.name, {"time"});
    fail(line_number, cells[0].column, cells[0].text,
         near_time ? "unknown column '" + time.name + "'; did you mean 'time'?"
                   : "first column is '" + time.name + "' (expected 'time [unit]' first, then the reading)");
  }
  const auto kind = reading_from_name(reading.name);
  if (!kind)
    fail(line_number, cells[1].column, cells[1].text,
         "unknown reading '" + reading.name + "'" + did_you_mean(reading.name, reading_names()));

  try {
    find_unit(time.unit, Dimension::Time);
  } catch (const UnitError& e) {
    fail(line_number, time.unit_column, cells[0].text, e.what());
  }
  try {
    find_unit(reading.unit, Dimension::Length);
  } catch (const UnitError& e) {
    fail(line_number, reading.unit_column, cells[1].text, e.what());
  }
  series_.kind = *kind;
  series_.time_unit = time.unit;
  series_.value_unit = reading.unit;
}

void CsvReader::read_row(std::string_view line, int line_number) {
  const std::vector<Cell> cells = split(line, line_number);
  if (cells.size() != 2) {
    const int column = cells.size() > 2 ? cells[2].column : static_cast<int>(line.size()) + 1;
    std::string hint;
    // "0,2,9" under a two-column header: most often a decimal comma from a spreadsheet in another locale.
    if (cells.size() == 3 && digits_only(cells[2].text))
      hint = "; a decimal comma? write numbers with a decimal point, such as 2.9";
    fail(line_number, column, "",
         "row has " + std::to_string(cells.size()) + (cells.size() == 1 ? " cell" : " cells") +
             " (expected 2: " + shorten_for_message(time_field_) + ", " + shorten_for_message(value_field_) + ")" +
             hint);
  }
  if (series_.times.size() >= kMaxRows)
    fail(line_number, 0, "",
         fmt::format("more than {} readings in one file (expected at most {}; keep every n-th row: a test read "
                     "every 0.1 s for 8 minutes has 4800)",
                     kMaxRows, kMaxRows));
  double t = 0, v = 0;
  try {
    t = convert_to_si(parse_number(cells[0].text), series_.time_unit, Dimension::Time);
  } catch (const UnitError& e) {
    fail(line_number, cells[0].column, time_field_, e.what());
  }
  try {
    v = convert_to_si(parse_number(cells[1].text), series_.value_unit, Dimension::Length);
  } catch (const UnitError& e) {
    fail(line_number, cells[1].column, value_field_, e.what());
  }
  if (t < 0) fail(line_number, cells[0].column, time_field_, echo(cells[0].text) + " is negative (expected a time >= 0)");
  try {
    if (auto warning = check_plausible(t, plausible::reading_time, cells[0].text + " " + series_.time_unit))
      warn(line_number, time_field_, *warning);
  } catch (const UnitError& e) {
    fail(line_number, cells[0].column, time_field_, e.what());
  }
  if (!series_.times.empty() && !(t > series_.times.back()))
    fail(line_number, cells[0].column, time_field_,
         "time " + echo(cells[0].text) + " is not after " + echo(previous_time_text_) + " on line " +
             std::to_string(previous_line_) + " (expected strictly increasing times)");
  if (v < 0)
    fail(line_number, cells[1].column, value_field_, echo(cells[1].text) + " is negative (expected a reading >= 0)");
  try {
    if (auto warning = check_plausible(v, plausible::spread_reading, cells[1].text + " " + series_.value_unit))
      warn(line_number, value_field_, *warning);
  } catch (const UnitError& e) {
    fail(line_number, cells[1].column, value_field_, e.what());
  }
  // A typing slip in one time cell (300 typed as 3000) makes one interval far longer than its neighbours.
  const std::size_t n = series_.times.size();
  if (n >= 2) {
    const double step = t - series_.times[n - 1];
    const double before = series_.times[n - 1] - series_.times[n - 2];
    if (before > 0 && step > kJumpFactor * before && step > kJumpFactor * median_step_)
      warn(line_number, time_field_,
           fmt::format("time {} comes {:.3g} s after the previous reading, more than {:.0f} times the usual "
                       "interval: a typing slip?",
                       echo(cells[0].text), step, kJumpFactor));
  }
  if (n >= 1) {
    steps_.push_back(t - series_.times[n - 1]);
    if (steps_.size() <= 16 || steps_.size() % 64 == 0) {  // a median of the intervals so far, updated now and then
      std::vector<double> sorted = steps_;
      std::nth_element(sorted.begin(), sorted.begin() + std::ptrdiff_t(sorted.size() / 2), sorted.end());
      median_step_ = sorted[sorted.size() / 2];
    }
  }
  series_.times.push_back(t);
  series_.values.push_back(v);
  series_.lines.push_back(line_number);
  previous_line_ = line_number;
  previous_time_text_ = cells[0].text;
}

/// Where the first byte that cannot be in a UTF-8 text CSV is: a NUL (UTF-16 and UTF-32 put one in every ASCII
/// character; a binary file has them anywhere). 0 when there is none.
std::size_t first_nul(std::string_view text) {
  const std::size_t at = text.find('\0');
  return at == std::string_view::npos ? 0 : at + 1;
}

ReadingSeries CsvReader::read() {
  series_ = ReadingSeries{};
  series_.source = source_;
  std::string_view rest = text_;
  if (rest.substr(0, 2) == "\xFF\xFE" || rest.substr(0, 2) == "\xFE\xFF")
    fail(0, 0, "", "file is UTF-16 text (expected UTF-8 or plain ASCII; save it as 'CSV UTF-8')");
  if (rest.substr(0, 3) == "\xEF\xBB\xBF") rest.remove_prefix(3);
  if (const std::size_t nul = first_nul(rest)) {
    const std::string_view before = rest.substr(0, nul - 1);
    const int line = 1 + static_cast<int>(std::count(before.begin(), before.end(), '\n'));
    const std::size_t line_start = before.rfind('\n');
    const int column = static_cast<int>(nul - (line_start == std::string_view::npos ? 0 : line_start + 1));
    throw InputError(source_, line, "",
                     "NUL byte in the file: it is UTF-16 or binary (expected a text CSV saved as UTF-8 or ASCII)",
                     column);
  }
  if (trim(rest, kCellBlanks).find_first_not_of("\r\n") == std::string_view::npos)
    fail(0, 0, "", "file is empty (expected a header row such as 'time [s],front [cm]' and rows of readings)");

  int line_number = 0;
  bool have_header = false;
  while (!rest.empty() && !stopped_) {
    // Lines end in LF, CRLF or a lone CR (old Mac spreadsheets).
    const std::size_t end = rest.find_first_of("\r\n");
    std::string_view line = rest.substr(0, end);
    if (end == std::string_view::npos)
      rest = {};
    else
      rest = rest.substr(end + (rest[end] == '\r' && end + 1 < rest.size() && rest[end + 1] == '\n' ? 2 : 1));
    ++line_number;
    const std::string_view content = trim(line);
    if (content.empty() || content.front() == '#') continue;
    if (!have_header) {
      read_header(line, line_number);
      have_header = true;
      continue;
    }
    try {
      read_row(line, line_number);
    } catch (const InputError& e) {
      note(e);
      // Past the row cap nothing more is read; the error says why.
      if (series_.times.size() >= kMaxRows) break;
    }
  }
  if (!errors_.empty()) {
    InputError first = errors_.front();
    std::vector<std::string> further;
    for (std::size_t i = 1; i < errors_.size(); ++i) further.emplace_back(errors_[i].what());
    first.add_further(std::move(further), stopped_);
    throw first;
  }
  if (!have_header)
    fail(0, 0, "", "no header row, only comments (expected a header row such as 'time [s],front [cm]')");
  if (series_.times.empty())
    fail(header_line_, 0, "", "no readings below the header (expected rows of time and reading, such as '5,3.1')");
  return std::move(series_);
}

}  // namespace

const std::vector<std::string_view>& reading_names() {
  static const std::vector<std::string_view> names{"front", "radius", "diameter", "gap", "slump"};
  return names;
}

std::optional<Reading> reading_from_name(std::string_view name) {
  static const Reading kinds[] = {Reading::Front, Reading::Radius, Reading::Diameter, Reading::Gap, Reading::Slump};
  const auto& names = reading_names();
  for (std::size_t i = 0; i < names.size(); ++i)
    if (names[i] == name) return kinds[i];
  return std::nullopt;
}

ReadingSeries parse_readings_csv(std::string_view text, const std::string& source) {
  return CsvReader(text, source).read();
}

ReadingSeries read_readings_csv(const std::filesystem::path& file) {
  const std::string source = file.string();
  std::error_code ec;
  if (std::filesystem::is_directory(file, ec))
    throw InputError(source, 0, "", "is a directory (expected a readings CSV file)");
  const std::uintmax_t size = std::filesystem::file_size(file, ec);
  if (!ec && size > kMaxFileBytes)
    throw InputError(source, 0, "",
                     fmt::format("file is {} MB (expected a readings CSV of at most {} rows, well under {} MB)",
                                 size >> 20, kMaxRows, kMaxFileBytes >> 20));
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(source, 0, "", std::string("cannot open readings file: ") + std::strerror(errno));
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw InputError(source, 0, "", "cannot read readings file");
  const std::string text = buffer.str();
  return parse_readings_csv(text, source);
}

}  // namespace spreadfit::io
