#include "src/io/plausible_ranges.hpp"

#include <fmt/format.h>

#include <cmath>

#include "src/io/input_error.hpp"
#include "src/io/units.hpp"

namespace spreadfit::io {

namespace {

/// "0.001 m to 2 m", or "at most 2 m" when the range starts at 0.
std::string span(double low, double high, std::string_view unit) {
  if (low <= 0) return fmt::format("at most {:.4g} {}", high, unit);
  return fmt::format("{:.4g} {} to {:.4g} {}", low, unit, high, unit);
}

}  // namespace

std::optional<std::string> check_plausible(double si, const PlausibleRange& range, std::string_view as_written) {
  const std::string shown = quote_for_message(as_written);
  if (!std::isfinite(si)) throw UnitError(shown + " is not a finite number");
  if (si < range.refuse_below || si > range.refuse_above)
    throw UnitError(fmt::format("{} is impossible for a {} (expected {}; check the unit)", shown, range.what,
                                span(range.refuse_below, range.refuse_above, range.unit)));
  if (si < range.warn_below || si > range.warn_above)
    return fmt::format("{} is unusual for a {} (usually {}): check the unit", shown, range.what,
                       span(range.warn_below, range.warn_above, range.unit));
  return std::nullopt;
}

}  // namespace spreadfit::io
