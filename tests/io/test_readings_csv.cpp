// Readings CSV: what a good file gives, and the exact place and words of every refusal.
// Unit factors: SI Brochure, 9th ed. (2019), Tables 7 (prefixes) and 8 (minute).
#include <doctest/doctest.h>

#include <string>

#include "src/io/readings_csv.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::Reading;
using spreadfit::io::InputError;
using spreadfit::io::parse_readings_csv;
using spreadfit::io::read_readings_csv;
using spreadfit::io::test::input_error_of;
using spreadfit::io::test::TempDir;

namespace {

constexpr double kRelTol = 1e-14;  // one rounding of value * decimal factor

InputError csv_error(const std::string& text) {
  return input_error_of([&] { parse_readings_csv(text, "run.csv"); });
}

}  // namespace

TEST_CASE("a readings CSV gives SI times and readings with the line of each row") {
  const std::string text =
      "# invented demo readings, channel test\n"
      "time [min],front [cm]\n"
      "0,0\n"
      "\n"
      "0.5, 3.1\n"
      "# a comment between rows\n"
      "  1 ,4.25  \n";
  const auto s = parse_readings_csv(text, "run.csv");
  CHECK(s.source == "run.csv");
  CHECK(s.kind == Reading::Front);
  CHECK(s.time_unit == "min");
  CHECK(s.value_unit == "cm");
  REQUIRE(s.times.size() == 3);
  REQUIRE(s.values.size() == 3);
  REQUIRE(s.lines.size() == 3);
  CHECK(s.times[0] == 0.0);
  CHECK(s.times[1] == 30.0);  // 1 min = 60 s
  CHECK(s.times[2] == 60.0);
  CHECK(s.values[1] == doctest::Approx(0.031).epsilon(kRelTol));
  CHECK(s.values[2] == doctest::Approx(0.0425).epsilon(kRelTol));
  CHECK(s.lines == std::vector<int>{3, 5, 7});
}

TEST_CASE("every reading name maps to its kind") {
  const std::pair<const char*, Reading> names[] = {{"front", Reading::Front},
                                                   {"radius", Reading::Radius},
                                                   {"diameter", Reading::Diameter},
                                                   {"gap", Reading::Gap},
                                                   {"slump", Reading::Slump}};
  for (const auto& entry : names) {
    const auto& name = entry.first;  // not a structured binding: clang 14 cannot capture one in INFO
    const auto& kind = entry.second;
    INFO("reading: " << name);
    const auto s = parse_readings_csv(std::string("time [s],") + name + " [mm]\n1,2\n", "run.csv");
    CHECK(s.kind == kind);
    CHECK(s.values.front() == doctest::Approx(2e-3).epsilon(kRelTol));
    CHECK(spreadfit::io::reading_from_name(name) == kind);
  }
  CHECK_FALSE(spreadfit::io::reading_from_name("Front").has_value());
}

TEST_CASE("spreadsheet exports: quoted cells, CRLF line ends and a byte-order mark are read") {
  TempDir dir;
  const auto file = dir.write("export.csv",
                              "\xEF\xBB\xBF\"time [s]\",\"front [mm]\"\r\n"
                              "\"0\",\"0\"\r\n"
                              "2.5,\"12\"\r\n");
  const auto s = read_readings_csv(file);
  CHECK(s.source == file.string());
  CHECK(s.times == std::vector<double>{0.0, 2.5});
  CHECK(s.values[1] == doctest::Approx(0.012).epsilon(kRelTol));
  CHECK(s.lines == std::vector<int>{2, 3});
}

TEST_CASE("a file that cannot be read is an error naming it") {
  TempDir dir;
  const auto missing = dir.path() / "none.csv";
  const auto e = input_error_of([&] { read_readings_csv(missing); });
  CHECK(e.file() == missing.string());
  CHECK(e.line() == 0);
  CHECK(e.message() == "cannot open readings file: No such file or directory");
  const auto d = input_error_of([&] { read_readings_csv(dir.path()); });
  CHECK(d.message() == "is a directory (expected a readings CSV file)");
}

TEST_CASE("empty files and files without a header are refused") {
  SUBCASE("empty") {
    CHECK(std::string(csv_error("").what()) ==
          "run.csv: file is empty (expected a header row such as 'time [s],front [cm]' and rows of readings)");
    CHECK(csv_error(" \n\r\n").line() == 0);
  }
  SUBCASE("only comments") {
    CHECK(std::string(csv_error("# nothing yet\n\n# still nothing\n").what()) ==
          "run.csv: no header row, only comments (expected a header row such as 'time [s],front [cm]')");
  }
  SUBCASE("data without a header") {
    CHECK(std::string(csv_error("# operator: invented\n0,0\n5,3.1\n").what()) ==
          "run.csv:2:1: missing header row (expected a header row such as 'time [s],front [cm]' before the data)");
  }
  SUBCASE("header without data") {
    CHECK(std::string(csv_error("time [s],front [cm]\n# no readings taken\n").what()) ==
          "run.csv:1: no readings below the header (expected rows of time and reading, such as '5,3.1')");
  }
}

TEST_CASE("header cells must be 'name [unit]' with known names and units") {
  SUBCASE("no unit") {
    CHECK(std::string(csv_error("time [s],front\n").what()) ==
          "run.csv:1:10: front: column header has no unit in brackets (expected 'name [unit]', such as 'time [s]' "
          "or 'front [cm]')");
  }
  SUBCASE("empty unit") {
    CHECK(std::string(csv_error("time [],front [cm]\n").what()) ==
          "run.csv:1:7: time []: empty unit in brackets (expected a unit, such as [s] or [cm])");
  }
  SUBCASE("text after the unit") {
    CHECK(std::string(csv_error("time [s],front [cm] left\n").what()) ==
          "run.csv:1:20: front [cm] left: text after the unit's closing ']' (expected 'name [unit]')");
  }
  SUBCASE("unknown reading name, with a suggestion") {
    CHECK(std::string(csv_error("time [s],frnt [cm]\n").what()) ==
          "run.csv:1:10: frnt [cm]: unknown reading 'frnt'; did you mean 'front'?");
  }
  SUBCASE("unknown reading name, nothing near") {
    CHECK(std::string(csv_error("time [s],height [cm]\n").what()) ==
          "run.csv:1:10: height [cm]: unknown reading 'height' (expected one of: front, radius, diameter, gap, "
          "slump)");
  }
  SUBCASE("misspelt time column") {
    CHECK(std::string(csv_error("tme [s],front [cm]\n").what()) ==
          "run.csv:1:1: tme [s]: unknown column 'tme'; did you mean 'time'?");
  }
  SUBCASE("columns swapped") {
    CHECK(std::string(csv_error("front [cm],time [s]\n").what()) ==
          "run.csv:1:1: front [cm]: first column is 'front' (expected 'time [unit]' first, then the reading)");
  }
  SUBCASE("unknown unit, located at the unit") {
    const auto e = csv_error("time [s],front [cn]\n1,2\n");
    CHECK(std::string(e.what()) == "run.csv:1:17: front [cn]: unknown unit 'cn'; did you mean 'cm'?");
    CHECK(e.column() == 17);
    CHECK(e.field() == "front [cn]");
  }
  SUBCASE("unit of the wrong dimension") {
    CHECK(std::string(csv_error("time [cm],front [cm]\n").what()) ==
          "run.csv:1:7: time [cm]: 'cm' is a unit of length (expected a unit of time: s, ms, min, h)");
  }
  SUBCASE("semicolons instead of commas") {
    CHECK(std::string(csv_error("time [s];front [cm]\n").what()) ==
          "run.csv:1:1: header has one column; cells must be separated by ',' not ';' or tabs (expected a header "
          "row such as 'time [s],front [cm]')");
  }
  SUBCASE("a third column") {
    CHECK(std::string(csv_error("time [s],front [cm],note [cm]\n").what()) ==
          "run.csv:1:21: note [cm]: unexpected third column (expected 2 columns: time and one reading; put "
          "replicates in files of their own and list them in [readings] files = [...])");
  }
  SUBCASE("an unclosed quote") {
    CHECK(std::string(csv_error("time [s],\"front [cm]\n").what()) ==
          "run.csv:1:10: quote opened here is not closed (expected a closing \")");
  }
}

TEST_CASE("data cells must be finite numbers, located by line and column") {
  const std::string header = "# invented\ntime [s],front [cm]\n0,0\n";
  SUBCASE("text") {
    const auto e = csv_error(header + "5,abc\n");
    CHECK(std::string(e.what()) ==
          "run.csv:4:3: front [cm]: 'abc' is not a number (expected a finite decimal number such as 2.9)");
    CHECK(e.line() == 4);
    CHECK(e.column() == 3);
  }
  SUBCASE("not a number") {
    CHECK(std::string(csv_error(header + "5,nan\n").what()) ==
          "run.csv:4:3: front [cm]: 'nan' is not a finite number (expected a finite decimal number such as 2.9)");
  }
  SUBCASE("infinite") {
    CHECK(std::string(csv_error(header + "inf,3\n").what()) ==
          "run.csv:4:1: time [s]: 'inf' is not a finite number (expected a finite decimal number such as 2.9)");
  }
  SUBCASE("empty cell") {
    CHECK(std::string(csv_error(header + "5, \n").what()) ==
          "run.csv:4:4: front [cm]: empty value (expected a finite decimal number such as 2.9)");
  }
  SUBCASE("a decimal comma makes a third cell") {
    CHECK(std::string(csv_error(header + "5,3,1\n").what()) ==
          "run.csv:4:5: row has 3 cells (expected 2: time [s], front [cm]); a decimal comma? write numbers with a "
            "decimal point, such as 2.9");
  }
  SUBCASE("a row with one cell") {
    CHECK(std::string(csv_error(header + "5\n").what()) ==
          "run.csv:4:2: row has 1 cell (expected 2: time [s], front [cm])");
  }
}

TEST_CASE("times increase strictly, and neither times nor readings are negative") {
  const std::string header = "time [s],front [cm]\n0,0\n5,3.1\n";
  SUBCASE("repeated time") {
    CHECK(std::string(csv_error(header + "\n5,3.4\n").what()) ==
          "run.csv:5:1: time [s]: time '5' is not after '5' on line 3 (expected strictly increasing times)");
  }
  SUBCASE("time going back") {
    const auto e = csv_error(header + "4.5,3.4\n");
    CHECK(e.line() == 4);
    CHECK(e.message() == "time '4.5' is not after '5' on line 3 (expected strictly increasing times)");
  }
  SUBCASE("negative reading") {
    CHECK(std::string(csv_error(header + "10, -0.2\n").what()) ==
          "run.csv:4:5: front [cm]: '-0.2' is negative (expected a reading >= 0)");
  }
  SUBCASE("negative time") {
    CHECK(std::string(csv_error("time [s],front [cm]\n-1,0\n").what()) ==
          "run.csv:2:1: time [s]: '-1' is negative (expected a time >= 0)");
  }
}
