// The one form of the models' input checks: "<field> = <value>: expected <what>", thrown as std::invalid_argument,
// the value in its shortest round-trip text (std::to_string would print 1e-9 as 0.000000). The tool checks its
// input first and names the file and field (src/io/); these checks guard the models' own callers.
#pragma once

#include <string>

namespace spreadfit {

/// Shortest text that reads back to the same double (std::to_chars).
std::string shortest_text(double value);

/// Throws std::invalid_argument("<field> = <shortest_text(value)>: expected <expected>").
[[noreturn]] void reject_input(const std::string& field, double value, const char* expected);

}  // namespace spreadfit
