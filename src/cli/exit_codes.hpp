// The exit codes of the spreadfit command (README, "Exit codes"). Scripts and makefiles test these numbers;
// change them only by adding new ones.
#pragma once

namespace spreadfit::cli {

enum class ExitCode : int {
  Done = 0,              ///< done; every result within spec (or no spec given)
  OutOfSpec = 1,         ///< done; at least one result out of spec
  BadInput = 2,          ///< bad input or usage: the message names file, line/field and what was expected
  NumericalFailure = 3,  ///< a solve or fit failed; reported in words, never printed as numbers
};

/// The number main returns.
constexpr int to_int(ExitCode code) { return static_cast<int>(code); }

}  // namespace spreadfit::cli
