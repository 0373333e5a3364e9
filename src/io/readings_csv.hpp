// Readings CSV: the spread of one test against time, as an operator or a logger wrote it.
//
//   # TS12-0412, channel, read at the left wall      <- comment: '#' as the first non-blank character
//   time [s],front [cm]                              <- header: each column "name [unit]"
//   0,0
//   5,3.1
//
// Format (README "Readings CSV", made precise here):
// - Cells are separated by commas. A cell may be wrapped in double quotes (spreadsheets do), with "" for a quote
//   inside. Blanks around a cell are ignored. Lines may end in LF, CRLF or CR; a UTF-8 byte-order mark is skipped.
// - Blank lines and comment lines are skipped anywhere in the file.
// - Exactly two columns: `time [unit]` first (s, ms, min, h), then one reading (front | radius | diameter | gap |
//   slump) in a length unit (m, cm, mm, um, in). A third column is an error: replicates go in files of their own,
//   listed with `files = [...]` in the test description, so each keeps its own times and line numbers.
// - Every data row has both cells, each a finite decimal number with a '.' decimal point. Times are >= 0 and
//   strictly increasing; readings are >= 0. At least one data row, at most 5000; the file at most 16 MB.
// - Column names compare without regard to case ("Time [s]"); unit symbols are case-sensitive (mPa is not MPa).
// - Times above one day and readings above 10 m are refused; above one hour, above 1 m, or an interval 50 times the
//   usual one are kept with a warning (io/plausible_ranges.hpp). UTF-16 files and NUL bytes are refused.
// - Row errors do not stop the reading: up to InputError::max_reported of them are reported together.
// Every error is an InputError located at file:line:column, with the column header as the field.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "models/rig.hpp"

namespace spreadfit::io {

/// One series of readings, in SI units, with where each came from.
struct ReadingSeries {
  std::string source;           ///< file the series was read from (as opened), for messages
  Reading kind = Reading::Front;  ///< from the second column's name
  std::vector<double> times;    ///< [s], >= 0, strictly increasing
  std::vector<double> values;   ///< [m], >= 0; one per time
  std::vector<int> lines;       ///< 1-based line of each row in `source`, so later stages can cite it
  std::string time_unit;        ///< unit symbols as the header wrote them (for reports in the user's units)
  std::string value_unit;
  /// Implausible but possible values (io/plausible_ranges.hpp), each a "FILE:LINE: FIELD: message" line.
  std::vector<std::string> warnings;
};

/// Interface names of the readings, in the order of enum Reading: front, radius, diameter, gap, slump.
const std::vector<std::string_view>& reading_names();
/// The Reading an interface name denotes (exact, lower case), or nullopt.
std::optional<Reading> reading_from_name(std::string_view name);

/// Reads and checks a readings file. Throws InputError (including when the file cannot be opened).
ReadingSeries read_readings_csv(const std::filesystem::path& file);

/// The same from text in memory; `source` names it in messages and in the result.
ReadingSeries parse_readings_csv(std::string_view text, const std::string& source);

}  // namespace spreadfit::io
