// Readers under input that once passed, crashed or gave a baffling message: the readings CSV's limits and
// spreadsheet quirks, several row errors at once, and messages safe to print. Expected behaviour is the input
// contract (README "Readings CSV", exit code 2) and src/io/plausible_ranges.hpp.
#include <doctest/doctest.h>

#include <sstream>
#include <string>

#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/readings_csv.hpp"
#include "src/io/units.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::io::InputError;
using spreadfit::io::parse_readings_csv;
using spreadfit::io::test::input_error_of;

TEST_CASE("readings: column names in any case, units as written") {
  const auto s = parse_readings_csv("Time [s],FRONT [mm]\n1,2\n2,3\n", "run.csv");
  CHECK(s.kind == spreadfit::Reading::Front);
  CHECK(s.values[1] == doctest::Approx(3e-3));  // 3 mm (SI Brochure prefix milli = 1e-3)
  // Units keep their case: 'MM' is no unit (SI Brochure: symbols are case-sensitive).
  CHECK(input_error_of([] { parse_readings_csv("time [s],front [MM]\n1,2\n", "run.csv"); }).field() == "front [MM]");
}

TEST_CASE("readings: CR-only line ends are lines") {
  const auto s = parse_readings_csv("# logger\rtime [s],front [cm]\r1,2\r2,3\r", "run.csv");
  REQUIRE(s.times.size() == 2);
  CHECK(s.lines == std::vector<int>{3, 4});
}

TEST_CASE("readings: up to ten row errors are reported together") {
  std::string csv = "time [s],front [cm]\n";
  for (int i = 1; i <= 12; ++i) csv += std::to_string(i) + ",x\n";
  const InputError e = input_error_of([&] { parse_readings_csv(csv, "run.csv"); });
  CHECK(e.line() == 2);
  CHECK(e.further().size() == InputError::max_reported - 1);
  CHECK(e.truncated());
  std::ostringstream printed;
  spreadfit::io::print_input_error(printed, e);
  CHECK(printed.str().find("run.csv:11:4: front [cm]: 'x' is not a number") != std::string::npos);
  CHECK(printed.str().find("stopped after 10 errors") != std::string::npos);
}

TEST_CASE("readings: a reading time over a day is refused, over an hour warned, a lone jump warned") {
  // 1e300 s once corrupted the heap in the fit's global start; 4294967296 s (a typo for 300) passed.
  for (const char* t : {"1e300", "4294967296", "86401"}) {
    const InputError e =
        input_error_of([&] { parse_readings_csv(std::string("time [s],front [cm]\n1,2\n") + t + ",3\n", "run.csv"); });
    CHECK(e.line() == 3);
    CHECK(e.field() == "time [s]");
  }
  const auto long_test = parse_readings_csv("time [s],front [cm]\n1,2\n4000,3\n", "run.csv");
  REQUIRE(long_test.warnings.size() == 1);
  CHECK(long_test.warnings[0].find("run.csv:3: time [s]") == 0);
  std::string csv = "time [s],front [cm]\n";
  for (int i = 1; i <= 10; ++i) csv += std::to_string(2 * i) + ",5\n";
  csv += "3000,5.1\n";  // 300 typed as 3000 after readings every 2 s
  const auto slip = parse_readings_csv(csv, "run.csv");
  REQUIRE(slip.warnings.size() == 1);
  CHECK(slip.warnings[0].find("typing slip") != std::string::npos);
}

TEST_CASE("readings: UTF-16 and NUL bytes are named, not read as one column") {
  CHECK(input_error_of([] { parse_readings_csv(std::string("\xFF\xFEt\0", 4), "run.csv"); }).message().find("UTF-16") !=
        std::string::npos);
  const InputError nul = input_error_of([] { parse_readings_csv(std::string("time [s],front [cm]\n1,\0", 23), "run.csv"); });
  CHECK(nul.line() == 2);
  CHECK(nul.column() == 3);
}

TEST_CASE("messages: control characters and NUL are shown as \\xNN, long values shortened") {
  const InputError e("run.csv", 3, "id", std::string("bad \x1b[2J and \0 here", 19));
  const std::string what = e.what();
  CHECK(what == "run.csv:3: id: bad \\x1B[2J and \\x00 here");
  const InputError long_cell = input_error_of(
      [] { parse_readings_csv("time [s],front [cm]\n1," + std::string(1000000, '9') + "x\n", "run.csv"); });
  CHECK(std::string(long_cell.what()).size() < 300);
  // A command-line option has no file: no "<input>" placeholder.
  CHECK(std::string(InputError("", 0, "--model", "unknown model 'bingam'").what()) == "--model: unknown model 'bingam'");
}

TEST_CASE("plausible ranges: refuse outside the possible, warn outside the usual") {
  using spreadfit::io::check_plausible;
  namespace plausible = spreadfit::io::plausible;
  CHECK_THROWS_AS(check_plausible(1e-30, plausible::channel_width, "1e-30 m"), spreadfit::io::UnitError);
  CHECK_THROWS_AS(check_plausible(100.0, plausible::sample_volume, "100"), spreadfit::io::UnitError);
  CHECK_THROWS_AS(check_plausible(1e12, plausible::activation_energy, "1e9 kJ/mol"), spreadfit::io::UnitError);
  CHECK_THROWS_AS(check_plausible(0.1, plausible::resolution, "0.1"), spreadfit::io::UnitError);
  CHECK(check_plausible(0.05, plausible::channel_width, "5 cm") == std::nullopt);
  const auto wide = check_plausible(0.6, plausible::channel_width, "60 cm");
  REQUIRE(wide);
  CHECK(wide->find("unusual for a channel width") != std::string::npos);
  // Water's viscosity, 1.0 mPa.s at 20 degC (CRC Handbook, from memory), is inside the usual range.
  CHECK(check_plausible(1.0e-3, plausible::viscosity, "1 mPa.s") == std::nullopt);
}

TEST_CASE("atomic file: a temporary file left by a killed process is removed by the next write") {
  spreadfit::io::test::TempDir dir;
  // PID 2^22 + 1 is above Linux's largest pid_max (2^22, proc(5)), so no process has it.
  const auto leftover = dir.write(".r.json.tmp-4194305-0", "");
  spreadfit::io::write_file_atomically(dir.path() / "r.json", "{}\n");
  CHECK_FALSE(std::filesystem::exists(leftover));
  CHECK(std::filesystem::exists(dir.path() / "r.json"));
}
