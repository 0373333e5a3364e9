#include "src/io/units.hpp"

#include <array>
#include <charconv>
#include <cmath>
#include <string>
#include <system_error>

#include "src/io/input_error.hpp"
#include "src/io/text.hpp"

namespace spreadfit::io {

namespace {

struct UnitEntry {
  Unit unit;
  bool listed;  ///< shown in "expected ..." lists; alternative spellings are not
};

using D = Dimension;

// Exact factors; sources in units.hpp. Listed symbols first within each dimension, SI first.
// UTF-8 spellings: micro sign U+00B5 = C2 B5, Greek mu U+03BC = CE BC, middle dot U+00B7 = C2 B7,
// degree sign U+00B0 = C2 B0.
const std::array kUnits{
    // length
    UnitEntry{{"m", D::Length, 1.0}, true},
    UnitEntry{{"cm", D::Length, 1e-2}, true},
    UnitEntry{{"mm", D::Length, 1e-3}, true},
    UnitEntry{{"um", D::Length, 1e-6}, true},
    UnitEntry{{"\xC2\xB5m", D::Length, 1e-6}, false},
    UnitEntry{{"\xCE\xBCm", D::Length, 1e-6}, false},
    UnitEntry{{"in", D::Length, 0.0254}, true},
    // volume
    UnitEntry{{"m3", D::Volume, 1.0}, true},
    UnitEntry{{"m^3", D::Volume, 1.0}, false},
    UnitEntry{{"L", D::Volume, 1e-3}, true},
    UnitEntry{{"l", D::Volume, 1e-3}, false},
    UnitEntry{{"mL", D::Volume, 1e-6}, true},
    UnitEntry{{"ml", D::Volume, 1e-6}, false},
    UnitEntry{{"uL", D::Volume, 1e-9}, true},
    UnitEntry{{"ul", D::Volume, 1e-9}, false},
    UnitEntry{{"\xC2\xB5L", D::Volume, 1e-9}, false},
    UnitEntry{{"\xCE\xBCL", D::Volume, 1e-9}, false},
    UnitEntry{{"cm3", D::Volume, 1e-6}, true},
    UnitEntry{{"cm^3", D::Volume, 1e-6}, false},
    UnitEntry{{"mm3", D::Volume, 1e-9}, true},
    UnitEntry{{"mm^3", D::Volume, 1e-9}, false},
    UnitEntry{{"dm3", D::Volume, 1e-3}, true},
    UnitEntry{{"dm^3", D::Volume, 1e-3}, false},
    // mass
    UnitEntry{{"kg", D::Mass, 1.0}, true},
    UnitEntry{{"g", D::Mass, 1e-3}, true},
    UnitEntry{{"mg", D::Mass, 1e-6}, true},
    // density
    UnitEntry{{"kg/m3", D::Density, 1.0}, true},
    UnitEntry{{"kg/m^3", D::Density, 1.0}, false},
    UnitEntry{{"g/mL", D::Density, 1e3}, true},
    UnitEntry{{"g/ml", D::Density, 1e3}, false},
    UnitEntry{{"g/cm3", D::Density, 1e3}, true},
    UnitEntry{{"g/cm^3", D::Density, 1e3}, false},
    UnitEntry{{"kg/L", D::Density, 1e3}, true},
    UnitEntry{{"kg/l", D::Density, 1e3}, false},
    UnitEntry{{"g/L", D::Density, 1.0}, true},
    UnitEntry{{"g/l", D::Density, 1.0}, false},
    // time
    UnitEntry{{"s", D::Time, 1.0}, true},
    UnitEntry{{"ms", D::Time, 1e-3}, true},
    UnitEntry{{"min", D::Time, 60.0}, true},
    UnitEntry{{"h", D::Time, 3600.0}, true},
    // stress
    UnitEntry{{"Pa", D::Stress, 1.0}, true},
    UnitEntry{{"kPa", D::Stress, 1e3}, true},
    UnitEntry{{"N/m2", D::Stress, 1.0}, true},
    UnitEntry{{"N/m^2", D::Stress, 1.0}, false},
    // viscosity
    UnitEntry{{"Pa.s", D::Viscosity, 1.0}, true},
    UnitEntry{{"Pa s", D::Viscosity, 1.0}, false},
    UnitEntry{{"Pa*s", D::Viscosity, 1.0}, false},
    UnitEntry{{"Pa\xC2\xB7s", D::Viscosity, 1.0}, false},
    UnitEntry{{"mPa.s", D::Viscosity, 1e-3}, true},
    UnitEntry{{"mPa s", D::Viscosity, 1e-3}, false},
    UnitEntry{{"mPa*s", D::Viscosity, 1e-3}, false},
    UnitEntry{{"mPa\xC2\xB7s", D::Viscosity, 1e-3}, false},
    UnitEntry{{"cP", D::Viscosity, 1e-3}, true},
    UnitEntry{{"P", D::Viscosity, 0.1}, true},
    // consistency
    UnitEntry{{"Pa.s^n", D::Consistency, 1.0}, true},
    UnitEntry{{"Pa s^n", D::Consistency, 1.0}, false},
    UnitEntry{{"Pa*s^n", D::Consistency, 1.0}, false},
    UnitEntry{{"Pa\xC2\xB7s^n", D::Consistency, 1.0}, false},
    UnitEntry{{"mPa.s^n", D::Consistency, 1e-3}, true},
    UnitEntry{{"mPa s^n", D::Consistency, 1e-3}, false},
    UnitEntry{{"mPa*s^n", D::Consistency, 1e-3}, false},
    UnitEntry{{"mPa\xC2\xB7s^n", D::Consistency, 1e-3}, false},
    // force
    UnitEntry{{"N", D::Force, 1.0}, true},
    UnitEntry{{"mN", D::Force, 1e-3}, true},
    // temperature
    UnitEntry{{"J/mol", D::MolarEnergy, 1.0}, true},
    UnitEntry{{"kJ/mol", D::MolarEnergy, 1e3}, true},
    UnitEntry{{"K", D::Temperature, 1.0}, true},
    UnitEntry{{"degC", D::Temperature, 1.0, 273.15}, true},
    UnitEntry{{"\xC2\xB0" "C", D::Temperature, 1.0, 273.15}, false},
    // dimensionless
    UnitEntry{{"1", D::Dimensionless, 1.0}, true},
    UnitEntry{{"-", D::Dimensionless, 1.0}, false},
};

/// Runs of blanks inside a unit count as one space ("Pa  s" is "Pa s").
std::string squeeze_blanks(std::string_view s) {
  std::string out;
  bool in_blank = false;
  for (char c : s) {
    if (c == ' ' || c == '\t') {
      in_blank = true;
      continue;
    }
    if (in_blank && !out.empty()) out += ' ';
    in_blank = false;
    out += c;
  }
  return out;
}

std::string expected_units(Dimension d) {
  return "a unit of " + std::string(dimension_name(d)) + ": " + join_names(unit_symbols(d));
}

/// Length of the longest prefix of `s` that from_chars reads as a number (after an optional '+'), or 0.
std::size_t number_prefix(std::string_view s, double& value) {
  std::size_t skip = 0;
  if (!s.empty() && s.front() == '+') {
    skip = 1;
    if (s.size() > 1 && (s[1] == '-' || s[1] == '+')) return 0;
  }
  const char* first = s.data() + skip;
  const char* last = s.data() + s.size();
  const auto [ptr, ec] = std::from_chars(first, last, value, std::chars_format::general);
  if (ec == std::errc::result_out_of_range) {
    value = HUGE_VAL;  // reported as not finite
    return static_cast<std::size_t>(ptr - s.data());
  }
  if (ec != std::errc()) return 0;
  return static_cast<std::size_t>(ptr - s.data());
}

/// Words from_chars takes for numbers that are not finite ones.
bool starts_with_nonfinite_word(std::string_view s) {
  std::string lower;
  for (char c : s.substr(0, 4)) lower += static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  if (!lower.empty() && (lower[0] == '+' || lower[0] == '-')) lower.erase(0, 1);
  return lower.rfind("nan", 0) == 0 || lower.rfind("inf", 0) == 0;
}

/// A typical value to show in messages.
std::string_view example_quantity(Dimension d) {
  switch (d) {
    case D::Dimensionless: return "0.5";
    case D::Length: return "2.9 cm";
    case D::Volume: return "100 mL";
    case D::Mass: return "250 g";
    case D::Density: return "1.10 g/mL";
    case D::Time: return "2 s";
    case D::Stress: return "25 Pa";
    case D::Viscosity: return "1.2 Pa.s";
    case D::Consistency: return "8 Pa.s^n";
    case D::Force: return "2.5 N";
    case D::Temperature: return "21.5 degC";
    case D::MolarEnergy: return "45 kJ/mol";
  }
  return "1";
}

}  // namespace

std::string_view dimension_name(Dimension d) {
  switch (d) {
    case D::Dimensionless: return "dimensionless quantity";
    case D::Length: return "length";
    case D::Volume: return "volume";
    case D::Mass: return "mass";
    case D::Density: return "density";
    case D::Time: return "time";
    case D::Stress: return "stress";
    case D::Viscosity: return "viscosity";
    case D::Consistency: return "consistency";
    case D::Force: return "force";
    case D::Temperature: return "temperature";
    case D::MolarEnergy: return "molar energy";
  }
  return "quantity";
}

std::string_view si_unit_symbol(Dimension d) {
  switch (d) {
    case D::Dimensionless: return "1";
    case D::Length: return "m";
    case D::Volume: return "m3";
    case D::Mass: return "kg";
    case D::Density: return "kg/m3";
    case D::Time: return "s";
    case D::Stress: return "Pa";
    case D::Viscosity: return "Pa.s";
    case D::Consistency: return "Pa.s^n";
    case D::Force: return "N";
    case D::Temperature: return "K";
    case D::MolarEnergy: return "J/mol";
  }
  return "";
}

std::vector<std::string_view> unit_symbols(Dimension d) {
  std::vector<std::string_view> out;
  for (const auto& e : kUnits)
    if (e.listed && e.unit.dimension == d) out.push_back(e.unit.symbol);
  return out;
}

const Unit& find_unit(std::string_view symbol_in, Dimension expected) {
  const std::string symbol = squeeze_blanks(trim(symbol_in));
  if (symbol.size() > 16)
    throw UnitError("unknown unit '" + shorten_for_message(symbol, 16) + "' (expected " + expected_units(expected) +
                    ")");
  const Unit* other = nullptr;
  for (const auto& e : kUnits) {
    if (e.unit.symbol != symbol) continue;
    if (e.unit.dimension == expected) return e.unit;
    if (!other) other = &e.unit;
  }
  if (other)
    throw UnitError("'" + symbol + "' is a unit of " + std::string(dimension_name(other->dimension)) +
                    " (expected " + expected_units(expected) + ")");
  // Suggest among every spelling of the expected dimension, so "Kpa" finds "kPa" and "ML" finds "mL".
  std::vector<std::string_view> spellings;
  for (const auto& e : kUnits)
    if (e.unit.dimension == expected) spellings.push_back(e.unit.symbol);
  if (auto near = nearest_name(symbol, spellings))
    throw UnitError("unknown unit '" + symbol + "'; did you mean '" + *near + "'?");
  throw UnitError("unknown unit '" + symbol + "' (expected " + expected_units(expected) + ")");
}

double convert_to_si(double value, std::string_view symbol, Dimension expected) {
  const Unit& unit = find_unit(symbol, expected);
  if (!std::isfinite(value)) throw UnitError("value is not a finite number");
  return unit.to_si(value);
}

double parse_number(std::string_view text_in) {
  const std::string_view text = trim(text_in);
  const std::string shown = shorten_for_message(text);
  if (text.empty()) throw UnitError("empty value (expected a finite decimal number such as 2.9)");
  if (starts_with_nonfinite_word(text))
    throw UnitError("'" + shown + "' is not a finite number (expected a finite decimal number such as 2.9)");
  double value = 0;
  const std::size_t used = number_prefix(text, value);
  if (used > 0 && used < text.size() && text[used] == ',' && used + 1 < text.size() && text[used + 1] >= '0' &&
      text[used + 1] <= '9')
    throw UnitError("'" + shown + "' has a decimal comma (expected a decimal point, such as 2.9)");
  if (used == 0 || used != text.size())
    throw UnitError("'" + shown + "' is not a number (expected a finite decimal number such as 2.9)");
  if (!std::isfinite(value))
    throw UnitError("'" + shown + "' is out of range (expected a finite decimal number such as 2.9)");
  return value;
}

double parse_quantity(std::string_view text_in, Dimension dimension, Range range) {
  const std::string_view text = trim(text_in);
  const std::string shown = shorten_for_message(text);
  const std::string example(example_quantity(dimension));
  if (text.empty()) throw UnitError("empty quantity (expected a value and a unit, such as \"" + example + "\")");
  if (starts_with_nonfinite_word(text))
    throw UnitError("'" + shown + "' is not a finite number (expected a value and a unit, such as \"" + example +
                    "\")");
  double value = 0;
  const std::size_t used = number_prefix(text, value);
  if (used == 0)
    throw UnitError("'" + shown + "' does not start with a number (expected a value and a unit, such as \"" +
                    example + "\")");
  if (!std::isfinite(value)) throw UnitError("'" + shown + "' is out of range (expected a finite value)");
  const std::string_view unit_text = trim(text.substr(used));
  if (unit_text.size() > 1 && unit_text[0] == ',' && unit_text[1] >= '0' && unit_text[1] <= '9')
    throw UnitError("'" + shown + "' has a decimal comma (expected a decimal point, such as \"" + example + "\")");
  double si = value;
  if (unit_text.empty()) {
    if (dimension != D::Dimensionless)
      throw UnitError("'" + shown + "' has no unit (expected " + expected_units(dimension) +
                      "; a bare TOML number is taken in SI units, " + std::string(si_unit_symbol(dimension)) + ")");
  } else {
    si = find_unit(unit_text, dimension).to_si(value);
  }
  check_range(si, dimension, range, shown);
  return si;
}

void check_range(double si, Dimension dimension, Range range, std::string_view as_written) {
  // Built by appending: GCC 12 gives a false -Wrestrict on "'" + std::string(...).
  std::string shown(1, '\'');
  shown.append(shorten_for_message(as_written)).push_back('\'');
  const std::string name(dimension_name(dimension));
  if (!std::isfinite(si)) throw UnitError(shown + " is not a finite number (expected a finite " + name + ")");
  if (dimension == D::Temperature) {
    if (si <= 0) throw UnitError(shown + " is at or below absolute zero (expected a temperature above 0 K)");
    return;
  }
  if (range == Range::Positive && si <= 0)
    throw UnitError(shown + (si == 0 ? " is zero" : " is negative") + " (expected a " + name + " > 0)");
  if (range == Range::NonNegative && si < 0) throw UnitError(shown + " is negative (expected a " + name + " >= 0)");
}

}  // namespace spreadfit::io
