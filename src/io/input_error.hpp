// Bad input found at the boundary (a test description, a readings file, a quantity with a unit), and the
// "did you mean" helper every unknown name goes through.
//
// The command line turns an InputError into exit code 2 and prints what() as is; nothing below it prints.
#pragma once

#include <cstddef>
#include <optional>
#include <ostream>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace spreadfit::io {

/// Bad input: which file, where in it, which field, and what was wrong.
///
/// what() is one line, "FILE:LINE:COLUMN: FIELD: message", with the parts that are not known left out
/// (line 0 = no line, column 0 = no column, empty field = no field), e.g.
///   tests/TS12.toml:9: rig.volme: unknown key 'volme' in [rig]; did you mean 'volume'?
///   runs/TS12.csv:14:5: front [cm]: '2,9' is not a number (expected a finite decimal number such as 2.9)
/// Lines and columns are 1-based; a column counts characters (bytes) from the start of the line, as editors do.
/// A command-line option has no file: its errors read "--model: unknown model 'bingam'; did you mean 'bingham'?".
/// what() is safe to print to a terminal: control characters (and NUL) are shown as \xNN, and a field or message
/// too long to read is shortened with "...".
///
/// A reader that finds several independent errors (rows of a readings file) throws the first with the others
/// attached (`further()`, at most `max_reported` in all); print_input_error prints them all.
class InputError : public std::runtime_error {
 public:
  InputError(std::string file, int line, std::string field, std::string message, int column = 0);

  /// Errors a reader reports at most per file.
  static constexpr std::size_t max_reported = 10;

  const std::string& file() const noexcept { return file_; }
  int line() const noexcept { return line_; }
  int column() const noexcept { return column_; }
  const std::string& field() const noexcept { return field_; }
  /// The message without the location prefix.
  const std::string& message() const noexcept { return message_; }

  /// The errors found after this one in the same input (without this one), each a what() line.
  const std::vector<std::string>& further() const noexcept { return further_; }
  /// Whether the reader stopped looking after max_reported errors.
  bool truncated() const noexcept { return truncated_; }
  void add_further(std::vector<std::string> lines, bool truncated) {
    further_ = std::move(lines);
    truncated_ = truncated;
  }

 private:
  std::vector<std::string> further_;
  bool truncated_ = false;
  std::string file_;
  int line_;
  int column_;
  std::string field_;
  std::string message_;
};

/// Writes "PREFIX: <what()>" and one such line per further error (and a line saying more were not shown).
void print_input_error(std::ostream& out, const InputError& error, std::string_view prefix = "spreadfit");

/// `text` as it may be echoed in a message: control characters as \xNN, cut to `limit` bytes with "..." (not in
/// the middle of a UTF-8 sequence).
std::string shorten_for_message(std::string_view text, std::size_t limit = 60);
/// The same in single quotes: 'text'.
std::string quote_for_message(std::string_view text, std::size_t limit = 60);

/// Edit distance with adjacent transpositions (optimal string alignment): insertions, deletions,
/// substitutions and swaps of two neighbouring characters each cost 1. Compares bytes exactly.
std::size_t edit_distance(std::string_view a, std::string_view b);

/// The candidate a mistyped `given` most likely meant, compared without regard to ASCII case, or nullopt when
/// none is close. Close means: distance <= 1 for names up to 4 characters, <= 2 up to 8, <= 3 beyond, and fewer
/// edits than `given` has characters (so 'x' does not "mean" 'm'). Ties go to the earlier candidate.
std::optional<std::string> nearest_name(std::string_view given, const std::vector<std::string_view>& candidates);

/// "a, b, c".
std::string join_names(const std::vector<std::string_view>& names);

/// The tail of an "unknown name" message: "; did you mean 'volume'?" when a candidate is close, otherwise
/// " (expected one of: a, b, c)".
std::string did_you_mean(std::string_view given, const std::vector<std::string_view>& candidates);

}  // namespace spreadfit::io
