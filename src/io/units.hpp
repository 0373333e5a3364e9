// Quantities with units: "1.10 g/mL", "5 cm", "21.5 degC", or a bare number already in SI units.
//
// Every value leaves this file in SI (m, m^3, kg, kg/m^3, s, Pa, Pa s, Pa s^n, N, K). Factors are exact
// definitions: SI prefixes (SI Brochure, 9th ed. 2019, Table 7), minute, hour and litre (ibid. Table 8),
// degree Celsius t/degC = T/K - 273.15 (ibid. Table 4 and its notes), poise 0.1 Pa s and inch 0.0254 m
// (NIST SP 811, 2008 ed., Appendix B.8).
//
// Unit symbols are matched exactly: case carries meaning (mPa.s is not MPa.s). A few spellings are accepted
// for one unit (l and L for the litre, which the SI Brochure allows; ml; cm^3 and cm3; Pa s, Pa.s and the
// middle dot; um, and the micro sign). Unknown symbols, and symbols of another dimension, are errors.
#pragma once

#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace spreadfit::io {

/// What a quantity measures. Each has one SI unit, in which every value is returned.
enum class Dimension {
  Dimensionless,  ///< 1 (flow index); no unit, "1" or "-"
  Length,         ///< m:   m, cm, mm, um, in
  Volume,         ///< m^3: m3, L, mL, uL, cm3, mm3, dm3
  Mass,           ///< kg:  kg, g, mg
  Density,        ///< kg/m^3: kg/m3, g/mL, g/cm3, kg/L, g/L
  Time,           ///< s:   s, ms, min, h
  Stress,         ///< Pa:  Pa, kPa, N/m2
  Viscosity,      ///< Pa s: Pa.s, mPa.s, cP, P
  Consistency,    ///< Pa s^n: Pa.s^n, mPa.s^n (Herschel-Bulkley K; the viscosity when n = 1)
  Force,          ///< N:   N, mN
  Temperature,    ///< K:   K, degC
  MolarEnergy,    ///< J/mol: J/mol, kJ/mol (activation energies)
};

/// One accepted unit symbol: value_si = value * factor + offset (offset is nonzero only for degC).
struct Unit {
  std::string_view symbol;
  Dimension dimension;
  double factor;
  double offset = 0.0;
  double to_si(double value) const { return value * factor + offset; }
};

/// Which signs a quantity may take, judged on its SI value (a temperature is always judged in K, > 0).
enum class Range { Any, NonNegative, Positive };

/// A malformed number, an unknown unit, a unit of the wrong dimension or a value out of range. The message is
/// one line without location; the test-description and CSV readers rethrow it as an InputError with the file,
/// line and field.
class UnitError : public std::invalid_argument {
 public:
  using std::invalid_argument::invalid_argument;
};

/// "length", "volume", ... as used in messages.
std::string_view dimension_name(Dimension dimension);
/// The SI unit values are returned in: "m", "m3", "kg", "kg/m3", "s", "Pa", "Pa.s", "Pa.s^n", "N", "K", "1".
std::string_view si_unit_symbol(Dimension dimension);
/// The main symbols of a dimension, SI first, as listed in messages (alternative spellings left out).
std::vector<std::string_view> unit_symbols(Dimension dimension);

/// The unit `symbol` (already trimmed) names, which must measure `expected`. Throws UnitError:
///   unknown unit 'cn'; did you mean 'cm'?
///   'Pa' is a unit of stress (expected a unit of length: m, cm, mm, um, in)
const Unit& find_unit(std::string_view symbol, Dimension expected);

/// value [symbol] in SI. Throws UnitError as find_unit, and for a non-finite value.
double convert_to_si(double value, std::string_view symbol, Dimension expected);

/// A whole string as a finite decimal number ("2.5", "-1e-3", "+4"); surrounding blanks allowed.
/// Throws UnitError ("'2,5' is not a number ...", "'nan' is not a finite number ...").
double parse_number(std::string_view text);

/// "value unit" -> SI value, checked against `range`. The blank between value and unit may be left out
/// ("5cm"); a dimensionless quantity may have no unit. A string without a unit is refused for every other
/// dimension (a bare "5" is ambiguous; give a TOML number for SI). Throws UnitError.
double parse_quantity(std::string_view text, Dimension dimension, Range range = Range::Positive);

/// Throws UnitError when `si_value` breaks `range` (or is not finite, or a temperature is not above 0 K).
/// `as_written` is echoed in the message ("'-5 cm' is negative (expected a length >= 0)").
void check_range(double si_value, Dimension dimension, Range range, std::string_view as_written);

}  // namespace spreadfit::io
