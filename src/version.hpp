// The software's name and version, as written into every result.
#pragma once
#include <string_view>

namespace spreadfit {
std::string_view software_version();
inline constexpr std::string_view software_name = "spreadfit";
}  // namespace spreadfit
