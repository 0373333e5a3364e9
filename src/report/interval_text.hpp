// A 95% interval in words for tables and plots: both limits, or the one the readings support, or
// "undetermined" when the profile likelihood reached the parameter's range on both sides.
#pragma once

#include <fmt/format.h>
#include <string>

#include "src/fit/fit_types.hpp"

namespace spreadfit::report {

inline std::string interval_text(const fit::ParameterEstimate& p) {
  if (p.upper_only) return p.upper_open ? "undetermined" : fmt::format("below {:.4g}", p.upper);
  if (p.lower_open && p.upper_open) return "undetermined";
  if (p.lower_open) return fmt::format("below {:.4g}", p.upper);
  if (p.upper_open) return fmt::format("above {:.4g}", p.lower);
  std::string s = fmt::format("{:.4g} to {:.4g}", p.lower, p.upper);
  if (!p.identifiable) s += " (wide)";
  return s;
}

}  // namespace spreadfit::report
