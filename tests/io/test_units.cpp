// Units and quantities: every accepted symbol against its defining factor, and every way a quantity is refused.
//
// Reference factors (exact by definition):
//   SI prefixes c = 1e-2, m = 1e-3, u = 1e-6, k = 1e3, d = 1e-1 ........ SI Brochure, 9th ed. (2019), Table 7
//   min = 60 s, h = 3600 s, L = 1 dm3 = 1e-3 m3 ......................... SI Brochure, 9th ed., Table 8
//   Pa = N/m2; t/degC = T/K - 273.15 .................................... SI Brochure, 9th ed., Table 4
//   in = 2.54e-2 m; P (poise) = 1e-1 Pa s; cP = 1e-3 Pa s;
//   g/cm3 = 1e3 kg/m3 .................................................... NIST SP 811 (2008), Appendix B.8
#include <doctest/doctest.h>

#include <cmath>
#include <set>
#include <string>
#include <vector>

#include "src/io/input_error.hpp"
#include "src/io/units.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::io::Dimension;
using spreadfit::io::Range;
using spreadfit::io::UnitError;

namespace {

// Products of a decimal value and a decimal factor round once in binary: allow a few ulps.
constexpr double kRelTol = 1e-14;

struct Case {
  const char* text;
  Dimension dimension;
  double si;  // expected SI value, written from the reference factor above
};

// Each main symbol and each alternative spelling, at a value that is not 1 so the factor is visible.
const std::vector<Case> kCases{
    // length [m]
    {"2.5 m", Dimension::Length, 2.5},
    {"2.5 cm", Dimension::Length, 2.5e-2},
    {"2.5 mm", Dimension::Length, 2.5e-3},
    {"2.5 um", Dimension::Length, 2.5e-6},
    {"2.5 \xC2\xB5m", Dimension::Length, 2.5e-6},  // micro sign
    {"2.5 \xCE\xBCm", Dimension::Length, 2.5e-6},  // Greek mu
    {"2.5 in", Dimension::Length, 2.5 * 2.54e-2},
    // volume [m3]
    {"2.5 m3", Dimension::Volume, 2.5},
    {"2.5 m^3", Dimension::Volume, 2.5},
    {"2.5 L", Dimension::Volume, 2.5e-3},
    {"2.5 l", Dimension::Volume, 2.5e-3},
    {"2.5 mL", Dimension::Volume, 2.5e-6},
    {"2.5 ml", Dimension::Volume, 2.5e-6},
    {"2.5 uL", Dimension::Volume, 2.5e-9},
    {"2.5 ul", Dimension::Volume, 2.5e-9},
    {"2.5 \xC2\xB5L", Dimension::Volume, 2.5e-9},
    {"2.5 \xCE\xBCL", Dimension::Volume, 2.5e-9},
    {"2.5 cm3", Dimension::Volume, 2.5e-6},
    {"2.5 cm^3", Dimension::Volume, 2.5e-6},
    {"2.5 mm3", Dimension::Volume, 2.5e-9},
    {"2.5 mm^3", Dimension::Volume, 2.5e-9},
    {"2.5 dm3", Dimension::Volume, 2.5e-3},
    {"2.5 dm^3", Dimension::Volume, 2.5e-3},
    // mass [kg]
    {"2.5 kg", Dimension::Mass, 2.5},
    {"2.5 g", Dimension::Mass, 2.5e-3},
    {"2.5 mg", Dimension::Mass, 2.5e-6},
    // density [kg/m3]
    {"1.1 kg/m3", Dimension::Density, 1.1},
    {"1.1 kg/m^3", Dimension::Density, 1.1},
    {"1.1 g/mL", Dimension::Density, 1.1e3},
    {"1.1 g/ml", Dimension::Density, 1.1e3},
    {"1.1 g/cm3", Dimension::Density, 1.1e3},
    {"1.1 g/cm^3", Dimension::Density, 1.1e3},
    {"1.1 kg/L", Dimension::Density, 1.1e3},
    {"1.1 kg/l", Dimension::Density, 1.1e3},
    {"1.1 g/L", Dimension::Density, 1.1},
    {"1.1 g/l", Dimension::Density, 1.1},
    // time [s]
    {"2.5 s", Dimension::Time, 2.5},
    {"2.5 ms", Dimension::Time, 2.5e-3},
    {"2.5 min", Dimension::Time, 150.0},
    {"2.5 h", Dimension::Time, 9000.0},
    // stress [Pa]
    {"2.5 Pa", Dimension::Stress, 2.5},
    {"2.5 kPa", Dimension::Stress, 2.5e3},
    {"2.5 N/m2", Dimension::Stress, 2.5},
    {"2.5 N/m^2", Dimension::Stress, 2.5},
    // viscosity [Pa s]
    {"2.5 Pa.s", Dimension::Viscosity, 2.5},
    {"2.5 Pa s", Dimension::Viscosity, 2.5},
    {"2.5 Pa*s", Dimension::Viscosity, 2.5},
    {"2.5 Pa\xC2\xB7s", Dimension::Viscosity, 2.5},  // middle dot
    {"2.5 mPa.s", Dimension::Viscosity, 2.5e-3},
    {"2.5 mPa s", Dimension::Viscosity, 2.5e-3},
    {"2.5 mPa*s", Dimension::Viscosity, 2.5e-3},
    {"2.5 mPa\xC2\xB7s", Dimension::Viscosity, 2.5e-3},
    {"2.5 cP", Dimension::Viscosity, 2.5e-3},
    {"2.5 P", Dimension::Viscosity, 2.5e-1},
    // consistency [Pa s^n]
    {"2.5 Pa.s^n", Dimension::Consistency, 2.5},
    {"2.5 Pa s^n", Dimension::Consistency, 2.5},
    {"2.5 Pa*s^n", Dimension::Consistency, 2.5},
    {"2.5 Pa\xC2\xB7s^n", Dimension::Consistency, 2.5},
    {"2.5 mPa.s^n", Dimension::Consistency, 2.5e-3},
    {"2.5 mPa s^n", Dimension::Consistency, 2.5e-3},
    {"2.5 mPa*s^n", Dimension::Consistency, 2.5e-3},
    {"2.5 mPa\xC2\xB7s^n", Dimension::Consistency, 2.5e-3},
    // force [N]
    {"2.5 N", Dimension::Force, 2.5},
    {"2.5 mN", Dimension::Force, 2.5e-3},
    // temperature [K]
    {"294.65 K", Dimension::Temperature, 294.65},
    {"21.5 degC", Dimension::Temperature, 21.5 + 273.15},
    {"21.5 \xC2\xB0" "C", Dimension::Temperature, 21.5 + 273.15},  // degree sign
    {"-18 degC", Dimension::Temperature, 255.15},
    // dimensionless
    {"0.45", Dimension::Dimensionless, 0.45},
    {"0.45 1", Dimension::Dimensionless, 0.45},
    {"0.45 -", Dimension::Dimensionless, 0.45},
};

const std::vector<Dimension> kAllDimensions{
    Dimension::Dimensionless, Dimension::Length, Dimension::Volume,      Dimension::Mass,
    Dimension::Density,       Dimension::Time,   Dimension::Stress,      Dimension::Viscosity,
    Dimension::Consistency,   Dimension::Force,  Dimension::Temperature,
};

std::string unit_error_of(const std::string& text, Dimension d, Range r = Range::Positive) {
  try {
    spreadfit::io::parse_quantity(text, d, r);
  } catch (const UnitError& e) {
    return e.what();
  }
  FAIL("expected a UnitError for '" << text << "'");
  return {};
}

}  // namespace

TEST_CASE("every unit symbol converts to SI by its defining factor") {
  for (const Case& c : kCases) {
    INFO("quantity: " << c.text);
    const double si = spreadfit::io::parse_quantity(c.text, c.dimension, Range::Any);
    CHECK(si == doctest::Approx(c.si).epsilon(kRelTol));
  }
}

TEST_CASE("the conversion test covers every unit listed in messages") {
  std::set<std::string> tested;
  for (const Case& c : kCases) {
    std::string text = c.text;
    const auto blank = text.find(' ');
    tested.insert(blank == std::string::npos ? std::string() : text.substr(blank + 1));
  }
  std::size_t listed = 0;
  for (Dimension d : kAllDimensions)
    for (std::string_view symbol : spreadfit::io::unit_symbols(d)) {
      ++listed;
      INFO("unit: " << symbol << " (" << spreadfit::io::dimension_name(d) << ")");
      CHECK(tested.count(std::string(symbol)) == 1);
    }
  INFO("listed units: " << listed);
  CHECK(listed >= 20);  // the README names at least 20 symbols
}

TEST_CASE("every dimension's SI unit is among its listed units and converts with factor 1") {
  for (Dimension d : kAllDimensions) {
    const std::string_view si = spreadfit::io::si_unit_symbol(d);
    INFO("dimension: " << spreadfit::io::dimension_name(d) << ", SI unit: " << si);
    const auto symbols = spreadfit::io::unit_symbols(d);
    REQUIRE_FALSE(symbols.empty());
    CHECK(symbols.front() == si);
    CHECK(spreadfit::io::find_unit(si, d).factor == 1.0);
    CHECK(spreadfit::io::find_unit(si, d).offset == 0.0);
  }
}

TEST_CASE("convert_to_si applies a named unit, as CSV columns need") {
  CHECK(spreadfit::io::convert_to_si(3.1, "cm", Dimension::Length) == doctest::Approx(0.031).epsilon(kRelTol));
  CHECK(spreadfit::io::convert_to_si(1.5, "min", Dimension::Time) == 90.0);
  CHECK(spreadfit::io::convert_to_si(0.0, "degC", Dimension::Temperature) == 273.15);
  CHECK_THROWS_WITH_AS(spreadfit::io::convert_to_si(3.1, "cn", Dimension::Length),
                       "unknown unit 'cn'; did you mean 'cm'?", UnitError);
  CHECK_THROWS_WITH_AS(spreadfit::io::convert_to_si(NAN, "cm", Dimension::Length), "value is not a finite number",
                       UnitError);
}

TEST_CASE("quantity spelling: blanks and the space before the unit") {
  SUBCASE("no blank between value and unit") {
    CHECK(spreadfit::io::parse_quantity("5cm", Dimension::Length) == doctest::Approx(0.05).epsilon(kRelTol));
  }
  SUBCASE("surrounding and repeated blanks") {
    CHECK(spreadfit::io::parse_quantity("  2 Pa   s ", Dimension::Viscosity) == 2.0);
  }
  SUBCASE("explicit plus sign and exponent") {
    CHECK(spreadfit::io::parse_quantity("+4e-1 mm", Dimension::Length) == doctest::Approx(4e-4).epsilon(kRelTol));
  }
}

TEST_CASE("a unit of the wrong dimension is refused, naming the expected dimension") {
  CHECK(unit_error_of("5 Pa", Dimension::Length) ==
        "'Pa' is a unit of stress (expected a unit of length: m, cm, mm, um, in)");
  CHECK(unit_error_of("100 g", Dimension::Volume) ==
        "'g' is a unit of mass (expected a unit of volume: m3, L, mL, uL, cm3, mm3, dm3)");
  CHECK(unit_error_of("8 Pa.s", Dimension::Consistency) ==
        "'Pa.s' is a unit of viscosity (expected a unit of consistency: Pa.s^n, mPa.s^n)");
  CHECK(unit_error_of("2 N", Dimension::Mass) == "'N' is a unit of force (expected a unit of mass: kg, g, mg)");
}

TEST_CASE("an unknown unit is refused with the nearest valid symbol, or the list when none is near") {
  CHECK(unit_error_of("5 cn", Dimension::Length) == "unknown unit 'cn'; did you mean 'cm'?");
  SUBCASE("case counts, but the suggestion ignores it") {
    CHECK(unit_error_of("5 Kpa", Dimension::Stress) == "unknown unit 'Kpa'; did you mean 'kPa'?");
    CHECK(unit_error_of("5 MPa.s", Dimension::Viscosity) == "unknown unit 'MPa.s'; did you mean 'mPa.s'?");
    CHECK(unit_error_of("5 CP", Dimension::Viscosity) == "unknown unit 'CP'; did you mean 'cP'?");
  }
  SUBCASE("a temperature in a letter that is not a unit here") {
    CHECK(unit_error_of("21 C", Dimension::Temperature) ==
          "unknown unit 'C' (expected a unit of temperature: K, degC)");
  }
  SUBCASE("nothing near") {
    CHECK(unit_error_of("5 furlong", Dimension::Length) ==
          "unknown unit 'furlong' (expected a unit of length: m, cm, mm, um, in)");
  }
}

TEST_CASE("a quantity string without a unit is refused except when dimensionless") {
  CHECK(unit_error_of("5", Dimension::Length) ==
        "'5' has no unit (expected a unit of length: m, cm, mm, um, in; a bare TOML number is taken in SI units, m)");
  CHECK(spreadfit::io::parse_quantity("0.5", Dimension::Dimensionless) == 0.5);
}

TEST_CASE("non-finite and malformed values are refused") {
  CHECK(unit_error_of("nan cm", Dimension::Length) ==
        "'nan cm' is not a finite number (expected a value and a unit, such as \"2.9 cm\")");
  CHECK(unit_error_of("-inf Pa", Dimension::Stress, Range::Any) ==
        "'-inf Pa' is not a finite number (expected a value and a unit, such as \"25 Pa\")");
  CHECK(unit_error_of("cm 5", Dimension::Length) ==
        "'cm 5' does not start with a number (expected a value and a unit, such as \"2.9 cm\")");
  CHECK(unit_error_of("", Dimension::Length) == "empty quantity (expected a value and a unit, such as \"2.9 cm\")");
  CHECK(unit_error_of("1e999 m", Dimension::Length) == "'1e999 m' is out of range (expected a finite value)");
  CHECK(unit_error_of("2,9 cm", Dimension::Length) ==
        "'2,9 cm' has a decimal comma (expected a decimal point, such as \"2.9 cm\")");
}

TEST_CASE("sign ranges are checked on the SI value") {
  SUBCASE("positive") {
    CHECK(unit_error_of("-5 cm", Dimension::Length) == "'-5 cm' is negative (expected a length > 0)");
    CHECK(unit_error_of("0 mL", Dimension::Volume) == "'0 mL' is zero (expected a volume > 0)");
  }
  SUBCASE("non-negative") {
    CHECK(spreadfit::io::parse_quantity("0 cm", Dimension::Length, Range::NonNegative) == 0.0);
    CHECK(unit_error_of("-2 s", Dimension::Time, Range::NonNegative) == "'-2 s' is negative (expected a time >= 0)");
  }
  SUBCASE("any") { CHECK(spreadfit::io::parse_quantity("-2 s", Dimension::Time, Range::Any) == -2.0); }
  SUBCASE("a temperature must lie above absolute zero whatever the range") {
    CHECK(unit_error_of("-300 degC", Dimension::Temperature, Range::Any) ==
          "'-300 degC' is at or below absolute zero (expected a temperature above 0 K)");
    CHECK(unit_error_of("0 K", Dimension::Temperature) ==
          "'0 K' is at or below absolute zero (expected a temperature above 0 K)");
  }
}

TEST_CASE("parse_number takes a whole finite decimal number and nothing else") {
  CHECK(spreadfit::io::parse_number(" 2.5 ") == 2.5);
  CHECK(spreadfit::io::parse_number("+4") == 4.0);
  CHECK(spreadfit::io::parse_number("-1e-3") == -1e-3);
  CHECK(spreadfit::io::parse_number(".5") == 0.5);
  CHECK_THROWS_WITH_AS(spreadfit::io::parse_number("2,5"),
                       "'2,5' has a decimal comma (expected a decimal point, such as 2.9)", UnitError);
  CHECK_THROWS_WITH_AS(spreadfit::io::parse_number("1.2.3"),
                       "'1.2.3' is not a number (expected a finite decimal number such as 2.9)", UnitError);
  CHECK_THROWS_WITH_AS(spreadfit::io::parse_number("+-1"),
                       "'+-1' is not a number (expected a finite decimal number such as 2.9)", UnitError);
  CHECK_THROWS_WITH_AS(spreadfit::io::parse_number("NaN"),
                       "'NaN' is not a finite number (expected a finite decimal number such as 2.9)", UnitError);
  CHECK_THROWS_WITH_AS(spreadfit::io::parse_number("Infinity"),
                       "'Infinity' is not a finite number (expected a finite decimal number such as 2.9)", UnitError);
  CHECK_THROWS_WITH_AS(spreadfit::io::parse_number(""), "empty value (expected a finite decimal number such as 2.9)",
                       UnitError);
}

TEST_CASE("edit distance counts insertions, deletions, substitutions and adjacent swaps") {
  using spreadfit::io::edit_distance;
  CHECK(edit_distance("", "") == 0);
  CHECK(edit_distance("", "abc") == 3);
  CHECK(edit_distance("volme", "volume") == 1);      // insertion
  CHECK(edit_distance("volumee", "volume") == 1);    // deletion
  CHECK(edit_distance("volune", "volume") == 1);     // substitution
  CHECK(edit_distance("reservior", "reservoir") == 1);  // adjacent swap
  CHECK(edit_distance("kitten", "sitting") == 3);    // the textbook pair: k->s, e->i, +g
  CHECK(edit_distance("front", "radius") == edit_distance("radius", "front"));  // symmetric
}

TEST_CASE("nearest_name suggests only close names") {
  using spreadfit::io::nearest_name;
  const std::vector<std::string_view> keys{"width", "reservoir_length", "volume", "fill_height"};
  CHECK(nearest_name("volme", keys) == "volume");
  CHECK(nearest_name("reservior_lenght", keys) == "reservoir_length");
  CHECK(nearest_name("WIDTH", keys) == "width");
  CHECK_FALSE(nearest_name("colour", keys).has_value());
  CHECK_FALSE(nearest_name("x", std::vector<std::string_view>{"m"}).has_value());  // one letter is no typo of another
  CHECK(spreadfit::io::did_you_mean("volme", keys) == "; did you mean 'volume'?");
  CHECK(spreadfit::io::did_you_mean("colour", keys) ==
        " (expected one of: width, reservoir_length, volume, fill_height)");
}

TEST_CASE("InputError's what() is one line with the parts that are known") {
  using spreadfit::io::InputError;
  CHECK(std::string(InputError("a.toml", 9, "rig.volme", "unknown key").what()) == "a.toml:9: rig.volme: unknown key");
  CHECK(std::string(InputError("a.csv", 4, "front [cm]", "bad", 7).what()) == "a.csv:4:7: front [cm]: bad");
  CHECK(std::string(InputError("a.csv", 0, "", "file is empty").what()) == "a.csv: file is empty");
  CHECK(std::string(InputError("a.toml", 3, "", "two\nlines").what()) == "a.toml:3: two lines");
  const InputError e("a.csv", 4, "front [cm]", "bad", 7);
  CHECK(e.file() == "a.csv");
  CHECK(e.line() == 4);
  CHECK(e.column() == 7);
  CHECK(e.field() == "front [cm]");
  CHECK(e.message() == "bad");
}
