// `spreadfit translate` end to end: parameter limits to reading limits and back, and the SVG map, checked against
// the Pashias et al. (1996) slump relation; bad options exit 2 naming the option. Rigs are invented.
#include <doctest/doctest.h>

#include <cmath>
#include <sstream>
#include <string>

#include "tests/cli/cli_test_support.hpp"
#include "tests/report/svg_test_support.hpp"

namespace {

const std::string slump_rig =
    "[sample]\nid = \"S\"\ndensity = \"1.1 g/mL\"\n[rig]\nkind = \"slump\"\n"
    "radius = \"5 cm\"\nheight = \"10 cm\"\n";

// Slump of a cylinder with H0 = D (Pashias, Boger, Summers & Glenister 1996, J. Rheol. 40):
// s/H0 = 1 - 2 tau'(1 - ln 2 tau'), tau' = tau_y / (rho g H0), here rho = 1100 kg/m^3, H0 = 0.1 m.
double pashias(double tau) {
  const double t = tau / (1100 * 9.80665 * 0.1);
  return 0.1 * (1 - 2 * t * (1 - std::log(2 * t)));
}

// The numbers after `prefix` on the line that starts with it, split at commas (empty fields as NaN).
std::vector<double> csv_after(const std::string& out, const std::string& prefix) {
  const auto at = out.find(prefix);
  REQUIRE(at != std::string::npos);
  std::istringstream line(out.substr(at + prefix.size(), out.find('\n', at) - at - prefix.size()));
  std::vector<double> values;
  std::string field;
  while (std::getline(line, field, ',')) values.push_back(field.empty() ? NAN : std::stod(field));
  return values;
}

}  // namespace

TEST_CASE("translate: yield-stress limits become slump limits by Pashias et al. (1996)") {
  // Slump of a cylinder with H0 = D (Pashias, Boger, Summers & Glenister 1996, J. Rheol. 40):
  // s/H0 = 1 - 2 tau'(1 - ln 2 tau'), tau' = tau_y / (rho g H0); the slump falls as tau_y rises, so the limits
  // [100 Pa, 500 Pa] give slumps between s(500 Pa) and s(100 Pa).
  TempDir dir;
  const auto rig = dir.write("slump.toml", slump_rig);
  const Run run = run_spreadfit(dir, "translate " + quoted(rig.string()) +
                                         " --model bingham --vary 'yield_stress=100 Pa:500 Pa' --set viscosity=5 "
                                         "--at 300");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  auto pashias = [](double tau) {
    const double t = tau / (1100 * 9.80665 * 0.1);
    return 0.1 * (1 - 2 * t * (1 - std::log(2 * t)));
  };
  const auto line = run.out.substr(run.out.find("slump,m,300,") + 12);
  const double low = std::stod(line.substr(0, line.find(',')));
  const double high = std::stod(line.substr(line.find(',') + 1));
  CHECK(low == doctest::Approx(pashias(500)).epsilon(1e-6));
  CHECK(high == doctest::Approx(pashias(100)).epsilon(1e-6));
  SUBCASE("a parameter neither set nor varied is bad input") {
    const Run bad = run_spreadfit(
        dir, "translate " + quoted(rig.string()) + " --model bingham --vary 'yield_stress=100:500' --at 300");
    CHECK(bad.exit_code == 2);
    CHECK(bad.err.find("viscosity") != std::string::npos);
  }
}

TEST_CASE("translate --grid: every grid point's slump is that of Pashias et al. (1996)") {
  TempDir dir;
  const auto rig = dir.write("slump.toml", slump_rig);
  const auto grid = dir.path() / "grid.csv";
  const Run run = run_spreadfit(dir, "translate " + quoted(rig.string()) +
                                         " --model bingham --vary 'yield_stress=100 Pa:500 Pa' --vary viscosity=1:20 "
                                         "--at 300 --points 4 --grid " +
                                         quoted(grid.string()));
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  std::istringstream table(read_text(grid));
  std::string line;
  std::getline(table, line);
  CHECK(line == "yield_stress [Pa],viscosity [Pa.s],slump [m]");
  int rows = 0;
  while (std::getline(table, line)) {
    double tau = 0, viscosity = 0, slump = 0;
    char comma = 0;
    std::istringstream row(line);
    REQUIRE(bool(row >> tau >> comma >> viscosity >> comma >> slump));
    CHECK(slump == doctest::Approx(pashias(tau)).epsilon(1e-6));
    ++rows;
  }
  CHECK(rows == 16);
  const Run both = run_spreadfit(dir, "translate " + quoted(rig.string()) +
                                          " --model bingham --vary 'yield_stress=10:500' --set viscosity=5 --at 300 "
                                          "--between 1cm:2cm --grid " +
                                          quoted((dir.path() / "g2.csv").string()));
  CHECK(both.exit_code == 2);
  CHECK(both.err.find("--grid") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(dir.path() / "g2.csv"));
}

TEST_CASE("translate --between: slump limits become the yield-stress limits of Pashias et al. (1996), with a map") {
  // Slumps between s(500 Pa) and s(100 Pa) mean a yield stress of 100 to 500 Pa; the viscosity plays no part in a
  // static slump, so the possible and assured ranges coincide whatever its range.
  TempDir dir;
  const auto rig = dir.write("slump.toml", slump_rig);
  const auto map = dir.path() / "map.svg";
  std::ostringstream limits;
  limits.precision(17);
  limits << pashias(500) << ":" << pashias(100);
  const std::string between = limits.str();
  const Run run = run_spreadfit(dir, "translate " + quoted(rig.string()) +
                                         " --model bingham --vary 'yield_stress=10 Pa:2000 Pa' --vary "
                                         "'viscosity=1:20' --at 300 --points 3 --between " +
                                         between + " --map " + quoted(map.string()) + " --map-points 11");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  const std::vector<double> v = csv_after(run.out, "yield_stress,Pa,300,");
  REQUIRE(v.size() == 4);
  CHECK(v[0] == doctest::Approx(100).epsilon(1e-4));
  CHECK(v[1] == doctest::Approx(500).epsilon(1e-4));
  CHECK(v[2] == doctest::Approx(100).epsilon(1e-4));
  CHECK(v[3] == doctest::Approx(500).epsilon(1e-4));
  const std::string svg = read_text(map);
  const spreadfit::svg_test::XmlReader xml(svg);
  CHECK(spreadfit::svg_test::with_class(xml, "limit-contour").size() >= 1);
  CHECK(spreadfit::svg_test::with_class(xml, "in-limits").size() >= 1);
  CHECK(spreadfit::svg_test::with_class(xml, "param-box").size() == 1);
  CHECK(svg.find("nan") == std::string::npos);
  spreadfit::svg_test::check_renders(svg, 900, "translate-map");

  SUBCASE("limits no yield stress in the search range can give: exit 3, no numbers") {
    const Run none = run_spreadfit(dir, "translate " + quoted(rig.string()) +
                                            " --model bingham --vary 'yield_stress=600 Pa:2000 Pa' --set viscosity=5 "
                                            "--at 300 --between " +
                                            between);
    CHECK(none.exit_code == 3);
    CHECK(none.out.empty());
    CHECK(none.err.find("yield_stress") != std::string::npos);
  }
}

TEST_CASE("translate --map: units as a reader writes them, Pa\u00b7s\u207f for a consistency, never a caret") {
  // The interface writes the consistency's unit "Pa.s^n" (README, "Units"); a picture shows it with a middle dot
  // and a superscript n, as the fit report does (svg::unit_text). The static slump depends on the yield stress alone
  // (Pashias et al. 1996), so the map is of a real reading whatever the consistency.
  TempDir dir;
  const auto rig = dir.write("slump.toml", slump_rig);
  const auto map = dir.path() / "map.svg";
  const Run run = run_spreadfit(dir, "translate " + quoted(rig.string()) +
                                         " --model herschel-bulkley --vary 'yield_stress=100 Pa:500 Pa' --vary "
                                         "'consistency=2 Pa.s^n:20 Pa.s^n' --vary flow_index=0.3:0.6 --at 300 "
                                         "--points 2 --map " +
                                         quoted(map.string()) + " --map-points 5");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  const std::string svg = read_text(map);
  CHECK(svg.find("consistency [Pa\u00b7s\u207f]") != std::string::npos);
  CHECK(svg.find("^") == std::string::npos);
  spreadfit::svg_test::check_renders(svg, 900, "translate-map-consistency");
}

TEST_CASE("translate: bad --at, --between, --solve, --map and --map-points exit 2 naming the option") {
  TempDir dir;
  const auto rig = dir.write("slump.toml", slump_rig);
  const std::string base = "translate " + quoted(rig.string()) + " --model bingham --vary 'yield_stress=10:500'";
  const std::string map = " --map " + quoted((dir.path() / "m.svg").string());
  const struct {
    std::string extra, field;
  } cases[] = {
      {"--set viscosity=5 --at 300 --between 5cm", "--between"},
      {"--set viscosity=5 --at 300 --between '3 Pa:5 cm'", "--between"},
      {"--set viscosity=5 --at 300 --between '5 cm:3 cm'", "--between"},
      {"--set viscosity=5 --at 300 --between '3 cm:5 cm' --solve viscosity", "--solve viscosity"},
      {"--set viscosity=5 --at 300 --solve yield_stress", "--solve"},
      {"--set viscosity=5 --at 300" + map, "--map"},
      {"--vary viscosity=1:5 --at 300 --map-points 3" + map, "--map-points"},
      {"--set viscosity=5 --at -3", "--at"},
      {"--set viscosity=5 --at '3 x'", "--at"},
      {"--set viscosity=5 --at 10,20", "--at"},
  };
  for (const auto& c : cases) {
    const Run bad = run_spreadfit(dir, base + " " + c.extra);
    INFO(bad.command << "\n" << bad.err);
    CHECK(bad.exit_code == 2);
    CHECK(bad.err.find(c.field) != std::string::npos);
    CHECK(bad.err.find("--times") == std::string::npos);  // the option given, not simulate's
    CHECK(bad.out.empty());
  }
  CHECK_FALSE(std::filesystem::exists(dir.path() / "m.svg"));
}
