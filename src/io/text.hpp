// Small text helpers shared by the parsers (units, readings CSV, command-line values).
#pragma once

#include <string_view>

namespace spreadfit::io {

/// The blanks around a value: space, tab and the line ends CR and LF.
inline constexpr std::string_view kBlanks = " \t\r\n";

/// `s` without its leading and trailing characters from `blanks`; a view into the same characters.
std::string_view trim(std::string_view s, std::string_view blanks = kBlanks);

}  // namespace spreadfit::io
