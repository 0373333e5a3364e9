#include "src/io/readings_csv.hpp"

#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "src/io/input_error.hpp"
#include "src/io/text.hpp"
#include "src/io/units.hpp"

namespace spreadfit::io {

namespace {

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
  std::vector<Cell> split(std::string_view line, int line_number) const;
  void read_header(std::string_view line, int line_number);
  void read_row(std::string_view line, int line_number);

  std::string_view text_;
  std::string source_;
  ReadingSeries series_;
  std::string time_field_, value_field_;  ///< header cells as written, used as the field in messages
  int header_line_ = 0;
  int previous_line_ = 0;
  std::string previous_time_text_;
};

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
    p.name = std::string(trim(std::string_view(cell.text).substr(0, open), kCellBlanks));
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
    fail(line_number, column, "",
         "row has " + std::to_string(cells.size()) + (cells.size() == 1 ? " cell" : " cells") +
             " (expected 2: " + time_field_ + ", " + value_field_ + ")");
  }
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
  if (t < 0)
    fail(line_number, cells[0].column, time_field_, "'" + cells[0].text + "' is negative (expected a time >= 0)");
  if (!series_.times.empty() && !(t > series_.times.back()))
    fail(line_number, cells[0].column, time_field_,
         "time '" + cells[0].text + "' is not after '" + previous_time_text_ + "' on line " +
             std::to_string(previous_line_) + " (expected strictly increasing times)");
  if (v < 0)
    fail(line_number, cells[1].column, value_field_,
         "'" + cells[1].text + "' is negative (expected a reading >= 0)");
  series_.times.push_back(t);
  series_.values.push_back(v);
  series_.lines.push_back(line_number);
  previous_line_ = line_number;
  previous_time_text_ = cells[0].text;
}

ReadingSeries CsvReader::read() {
  series_ = ReadingSeries{};
  series_.source = source_;
  std::string_view rest = text_;
  if (rest.substr(0, 3) == "\xEF\xBB\xBF") rest.remove_prefix(3);
  if (trim(rest, kCellBlanks).find_first_not_of("\r\n") == std::string_view::npos)
    fail(0, 0, "", "file is empty (expected a header row such as 'time [s],front [cm]' and rows of readings)");

  int line_number = 0;
  bool have_header = false;
  while (!rest.empty()) {
    const std::size_t end = rest.find('\n');
    std::string_view line = rest.substr(0, end);
    rest = end == std::string_view::npos ? std::string_view{} : rest.substr(end + 1);
    ++line_number;
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    const std::string_view content = trim(line, kCellBlanks);
    if (content.empty() || content.front() == '#') continue;
    if (!have_header) {
      read_header(line, line_number);
      have_header = true;
    } else {
      read_row(line, line_number);
    }
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
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(source, 0, "", std::string("cannot open readings file: ") + std::strerror(errno));
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw InputError(source, 0, "", "cannot read readings file");
  const std::string text = buffer.str();
  return parse_readings_csv(text, source);
}

}  // namespace spreadfit::io
