// The short human summary `spreadfit fit` prints to stdout for each material.
//
// The parameter table has four columns (parameter, value, 95% interval, unit), each as wide as its widest cell,
// so a long interval ("0.05567 to 2.416 (undetermined)") or a long name never pushes a cell into the next
// column, whatever parameters a law reports. In a fit of several series, each release time is named after the
// readings file it belongs to: "time_origin (plate-run1.csv)".
#pragma once

#include <string>
#include <vector>

#include "src/report/fit_outcome.hpp"

namespace spreadfit::report {

std::string summary_table(const FitOutcome& outcome);

/// The rows of a parameter table as text: `rows` are {name, value, interval, unit} cells, each column padded to
/// its widest cell (or the header's), the value right-aligned, every line indented by `indent` spaces and ended
/// by a line feed; the unit column is not padded. The header row comes first.
std::string parameter_rows(const std::vector<std::vector<std::string>>& rows, std::size_t indent = 2);

/// The label of each release time of `outcome`'s result, in the order of FitResult::time_origins: the readings
/// file name of the series it belongs to, when the tests have several series; "time_origin" alone otherwise.
std::vector<std::string> time_origin_labels(const FitOutcome& outcome);

}  // namespace spreadfit::report
