// `spreadfit plan` end to end over a range of guesses (--vary, --points) and with its Monte Carlo check (--check):
// the ranking, the reasons it prints, the check's refits against the planned ratio, and bad input (exit 2 naming
// the option). Rigs and sample ids are invented; readings files are simulated by the binary itself.
#include <doctest/doctest.h>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "src/cli/parameter_ranges.hpp"
#include "tests/cli/cli_test_support.hpp"

namespace {

const char* plate_head =
    "[sample]\nid = \"P\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\n"
    "volume = \"150 mL\"\n";

/// Two candidates on the same plate: `short.toml` read every 2 s for 20 s (its readings file simulated by the
/// binary), `long.toml` with no readings file, so read every --every up to --until.
struct Candidates {
  std::filesystem::path short_test, long_test;
};

Candidates short_and_long(const TempDir& dir) {
  const auto bare = dir.write("bare.toml", std::string(plate_head) + "[readings]\nresolution = \"0.5 mm\"\n");
  const Run sim = run_spreadfit(dir, "simulate " + quoted(bare.string()) +
                                         " --model bingham --set yield_stress=20 --set viscosity=5"
                                         " --times 2,4,6,8,10,12,14,16,18,20");
  REQUIRE(sim.exit_code == 0);
  dir.write("short.csv", sim.out);
  return {
      dir.write("short.toml", std::string(plate_head) + "[readings]\nfile = \"short.csv\"\nresolution = \"0.5 mm\"\n"),
      dir.write("long.toml", std::string(plate_head) + "[readings]\nresolution = \"0.5 mm\"\n")};
}

std::string plan_args(const Candidates& c) {
  return "plan " + quoted(c.short_test.string()) + " " + quoted(c.long_test.string()) + " --model bingham";
}

/// The rows of the check's table: candidate, parameter, planned ratio, refits' ratio, converged/replicates.
struct CheckRow {
  std::string candidate, parameter;
  double planned = 0, refits = 0;
  int converged = 0, replicates = 0;
};

std::vector<CheckRow> check_rows(const std::string& out) {
  std::vector<CheckRow> rows;
  std::istringstream lines(out.substr(out.find("\ncheck:") + 1));
  std::string line;
  std::getline(lines, line);  // the sentence
  std::getline(lines, line);  // the column heads
  while (std::getline(lines, line)) {
    std::istringstream words(line);
    CheckRow r;
    std::string planned, refits, count;
    if (!(words >> r.candidate >> r.parameter >> planned >> refits >> count)) continue;
    r.planned = std::stod(planned);  // stod stops at the trailing 'x'
    r.refits = std::stod(refits);
    r.converged = std::stoi(count.substr(0, count.find('/')));
    r.replicates = std::stoi(count.substr(count.find('/') + 1));
    rows.push_back(r);
  }
  return rows;
}

}  // namespace

TEST_CASE("plan --vary: over a range of yield stresses the longer plate test is recommended on its worst case") {
  // The approach to arrest is slow (Matson & Hogg 2007, J. Non-Newt. Fluid Mech. 142: perturbations decay like
  // t^-n) and the arrested spread is what fixes the yield stress (Roussel & Coussot 2005, J. Rheol. 49), so over
  // 5-40 Pa the 180 s test must beat the 20 s one read at the same interval; the reasons name the duration.
  TempDir dir;
  const Candidates c = short_and_long(dir);
  const Run run =
      run_spreadfit(dir, plan_args(c) + " --vary 'yield_stress=5 Pa:40 Pa' --set viscosity=5 --every 2 --until 180");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  CHECK(run.out.find("worst case over 3 guesses") != std::string::npos);
  CHECK(run.out.find("recommended: long.toml") != std::string::npos);
  CHECK(run.out.find("the sample stops within the test for ") != std::string::npos);
  CHECK(run.out.find("against the runner-up short.toml: narrower for yield_stress") != std::string::npos);
  CHECK(run.out.find("duration 180 s vs 20 s") != std::string::npos);
  // Each worst case names its guess.
  const auto row = run.out.find("\n  short.toml");
  REQUIRE(row != std::string::npos);
  CHECK(run.out.find(" @", row) < run.out.find('\n', row + 1));

  SUBCASE("the ends of a range convert as for --set") {
    // 1 kPa = 1000 Pa (SI Brochure, 9th ed., 2019): the same range in kPa gives the same table.
    const Run kpa = run_spreadfit(
        dir, plan_args(c) + " --vary 'yield_stress=0.005 kPa:0.04 kPa' --set viscosity=5 --every 2 --until 180");
    REQUIRE(kpa.exit_code == 0);
    const auto table = [](const std::string& out) { return out.substr(out.find("  candidate")); };
    CHECK(table(kpa.out) == table(run.out));
  }
}

TEST_CASE("plan --check: refits of simulated readings agree with the planned yield-stress interval") {
  // Cramer-Rao: the estimates of a well-determined parameter scatter as the Fisher information says, so with k
  // converged refits (k-1) s^2 / sd^2 follows chi-square with k-1 degrees of freedom (Cochran's theorem). For 5
  // refits the 0.1% and 99.9% points of chi-square(4) are 0.0908 and 18.47 (Abramowitz & Stegun 1964, Table
  // 26.8), so the refits' log-width over the planned one lies in [sqrt(0.0908/4), sqrt(18.47/4)] = [0.151, 2.149].
  TempDir dir;
  const Candidates c = short_and_long(dir);
  const Run run = run_spreadfit(
      dir, plan_args(c) + " --vary 'yield_stress=5 Pa:40 Pa' --set viscosity=5 --every 2 --until 180 --check 5");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  CHECK(run.out.find("check: 5 simulated reading sets") != std::string::npos);
  const std::vector<CheckRow> rows = check_rows(run.out);
  REQUIRE(rows.size() == 4);  // recommended and runner-up, two parameters each
  for (const CheckRow& r : rows) {
    INFO(r.candidate << " " << r.parameter << ": planned " << r.planned << ", refits " << r.refits << ", "
                     << r.converged << "/" << r.replicates);
    CHECK(r.replicates == 5);
    CHECK(r.converged >= 4);  // the Monte Carlo coverage test allows 5% failures (common practice, no source)
    CHECK(r.planned > 1);
    CHECK(r.refits > 1);
    if (r.candidate == "long.toml" && r.parameter == "yield_stress") {
      const double width_ratio = std::log(r.refits) / std::log(r.planned);
      CHECK(width_ratio > 0.151);
      CHECK(width_ratio < 2.149);
    }
  }
  CHECK(rows.front().candidate == "long.toml");
}

TEST_CASE("plan: bad --vary, --points and --check input exits 2 naming the option") {
  // README, exit codes: bad input is 2 with a message naming the field; nothing on stdout.
  TempDir dir;
  const auto test = dir.write("p.toml", std::string(plate_head) + "[readings]\nresolution = \"0.5 mm\"\n");
  const std::string base = "plan " + quoted(test.string()) + " --model bingham ";
  struct Case {
    const char* arguments;
    const char* named;
  };
  const Case cases[] = {
      {"--set viscosity=5 --vary yield_stress=20", "--vary yield_stress=20"},
      {"--set viscosity=5 --vary yield_stress=40:10", "low is above high"},
      {"--set viscosity=5 --vary 'yield_stress=5 m:40 Pa'", "--vary yield_stress=5 m:40 Pa"},
      {"--set viscosity=5 --vary flow_index=0.5:1", "--vary flow_index=0.5:1"},
      {"--set viscosity=5 --vary time_origin=0:1", "--vary time_origin=0:1"},
      {"--set yield_stress=20 --set viscosity=5 --vary yield_stress=5:40", "set twice"},
      {"--set viscosity=5 --vary yield_stress=5:40 --points 1", "--points"},
      {"--set viscosity=5 --vary yield_stress=5:40 --points 26", "--points"},
      {"--set viscosity=5 --vary yield_stress=5:40 --points three", "--points"},
      {"--set yield_stress=20 --set viscosity=5 --points 3", "--points"},
      {"--set yield_stress=20 --set viscosity=5 --check -1", "--check"},
      {"--set yield_stress=20 --set viscosity=5 --check 1001", "--check"},
      {"--set yield_stress=20 --set viscosity=5 --every 0", "--every"},
  };
  for (const Case& k : cases) {
    const Run run = run_spreadfit(dir, base + k.arguments);
    INFO(k.arguments << ": " << run.err);
    CHECK(run.exit_code == 2);
    CHECK(run.err.find(k.named) != std::string::npos);
    CHECK(run.out.empty());
  }
}

TEST_CASE("plan's guess grid: log-spaced ranges, a linear flow index, every combination once") {
  // Log spacing is a geometric progression lo (hi/lo)^(i/(N-1)); the flow index is spaced linearly
  // (src/cli/parameter_ranges.hpp; common practice, no source). 5..40 Pa in 4 points doubles each step.
  using namespace spreadfit;
  const std::vector<cli::ParameterRange> ranges = cli::parse_parameter_ranges(
      Law::HerschelBulkley, {"consistency=3"}, {"yield_stress=5 Pa:40 Pa", "flow_index=0.4:0.8"});
  REQUIRE(ranges.size() == 2);
  const std::vector<cli::GridPoint> grid = cli::parameter_grid(Material{5, 3, 0.4}, ranges, 4);
  REQUIRE(grid.size() == 16);
  constexpr double rounding = 1e-12;  // a few ulps of pow and the linear step
  for (const cli::GridPoint& g : grid) {
    CHECK(g.material.yield_stress == doctest::Approx(5 * std::pow(2.0, g.index[0])).epsilon(rounding));
    CHECK(g.material.flow_index == doctest::Approx(0.4 + 0.4 * g.index[1] / 3.0).epsilon(rounding));
    CHECK(g.material.consistency == 3);
  }
  // The first range varies fastest, and no combination repeats.
  CHECK(grid[1].index == std::vector<int>{1, 0});
  for (std::size_t i = 0; i < grid.size(); ++i)
    for (std::size_t j = i + 1; j < grid.size(); ++j) CHECK(grid[i].index != grid[j].index);
}
