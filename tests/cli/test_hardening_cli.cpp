// End-to-end checks of the hardened command line: warnings of unusual values, no "nan" or "inf" printed as a
// result, --require-spec on a batch with limits. Rigs and ids are invented.
#include <doctest/doctest.h>

#include <string>

#include "tests/cli/cli_test_support.hpp"

TEST_CASE("fit: a final-only slump writes no nan or inf in its table, JSON or CSV") {
  // The slump result has no residual: its rmse is not a number and must not be printed as one.
  TempDir dir;
  const auto test = dir.write("s.toml",
                              "[sample]\nid = \"SL-1\"\ndensity = \"1.0 g/mL\"\n[rig]\nkind = \"slump\"\n"
                              "radius = \"5 cm\"\nheight = \"10 cm\"\n[readings]\nfinal = \"3 cm\"\n");
  const auto json = dir.path() / "r.json";
  const auto csv = dir.path() / "r.csv";
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json.string()) + " --csv " +
                                         quoted(csv.string()));
  INFO(run.err);
  REQUIRE(run.exit_code == 0);
  for (const std::string& text : {run.out, read_text(json), read_text(csv)}) {
    CHECK(text.find("nan") == std::string::npos);
    CHECK(text.find("inf") == std::string::npos);
  }
}

TEST_CASE("fit: an unusual but possible value is fitted with a warning naming the file and field") {
  TempDir dir;
  dir.write("run.csv", "time [s],front [cm]\n2,5.7\n4,5.9\n6,6.1\n8,6.3\n10,6.4\n");
  const auto test = dir.write("t.toml",
                              "[sample]\nid = \"W-1\"\ndensity = \"1.10 g/mL\"\n[rig]\nkind = \"channel\"\n"
                              "width = \"60 cm\"\nreservoir_length = \"5 cm\"\nvolume = \"1 L\"\n[readings]\n"
                              "file = \"run.csv\"\n[fit]\nmodel = \"bingham\"\n");
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()));
  CHECK(run.exit_code != 2);
  CHECK(run.err.find("warning: " + test.string() + ":6: rig.width: '60 cm' is unusual for a channel width") !=
        std::string::npos);
}

TEST_CASE("fit --require-spec: a material with catalogue limits is fitted and judged") {
  TempDir dir;
  dir.write("run.csv", "time [s],front [cm]\n2,5.7\n4,5.9\n6,6.1\n8,6.3\n10,6.4\n");
  dir.write("specs.toml", "[TS12]\nyield_stress = [\"0 Pa\", \"1000 Pa\"]\n");
  const auto test = dir.write("t.toml",
                              "[sample]\nid = \"R-1\"\nproduct = \"TS12\"\ndensity = \"1.10 g/mL\"\n[rig]\n"
                              "kind = \"channel\"\nwidth = \"5 cm\"\nreservoir_length = \"5 cm\"\nvolume = \"100 mL\"\n"
                              "[readings]\nfile = \"run.csv\"\n[fit]\nmodel = \"bingham\"\n");
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --require-spec");
  INFO(run.err);
  CHECK(run.exit_code != 2);
  CHECK(run.out.find("verdict: ") != std::string::npos);
  CHECK(run.out.find("verdict: none") == std::string::npos);
}

TEST_CASE("cli: a mistyped command is named with the nearest one") {
  TempDir dir;
  const Run run = run_spreadfit(dir, "fitt x.toml");
  CHECK(run.exit_code == 2);
  CHECK(run.err.find("unknown command 'fitt'; did you mean 'fit'?") != std::string::npos);
  // Every command is a candidate, capture too (README, "Commands"). was: "expected one of" without capture.
  const Run capture = run_spreadfit(dir, "captur x.toml");
  CHECK(capture.exit_code == 2);
  CHECK(capture.err.find("unknown command 'captur'; did you mean 'capture'?") != std::string::npos);
}

TEST_CASE("simulate: a material no sauce has, or times without bound, are refused before any solve") {
  // Viscosity range: src/io/plausible_ranges.hpp; latest time: max_simulated_time (1e7 s).
  TempDir dir;
  const auto test = dir.write("t.toml",
                              "[sample]\nid = \"S-1\"\ndensity = \"1.0 g/mL\"\n[rig]\nkind = \"plate\"\n"
                              "ring_radius = \"3 cm\"\nvolume = \"50 mL\"\n");
  // was: exit 0 on a viscosity of 1e-300 Pa.s.
  const Run tiny = run_spreadfit(dir, "simulate " + quoted(test.string()) + " --model newtonian --set viscosity=1e-300");
  CHECK(tiny.exit_code == 2);
  CHECK(tiny.err.find("--set viscosity=1e-300") != std::string::npos);
  CHECK(tiny.out.empty());
  const Run late = run_spreadfit(dir, "simulate " + quoted(test.string()) +
                                          " --model newtonian --set viscosity=1 --times 1,1e12");
  CHECK(late.exit_code == 2);
  CHECK(late.err.find("--times") != std::string::npos);
}

TEST_CASE("plan: a reading interval that would make millions of readings is refused") {
  // was: memory growing by 400 MB/s with --every 1e-9.
  TempDir dir;
  const auto test = dir.write("t.toml",
                              "[sample]\nid = \"S-1\"\ndensity = \"1.0 g/mL\"\n[rig]\nkind = \"plate\"\n"
                              "ring_radius = \"3 cm\"\nvolume = \"50 mL\"\n");
  const Run run = run_spreadfit(dir, "plan " + quoted(test.string()) +
                                         " --model newtonian --set viscosity=1 --every 1e-9");
  CHECK(run.exit_code == 2);
  CHECK(run.err.find("--every/--until") != std::string::npos);
}

namespace {

/// Runs `spreadfit ARGUMENTS` with stderr on a terminal (a pseudo-terminal from util-linux `script`), as a person
/// runs it; stdout goes to a file. Returns the terminal's text.
std::string run_at_terminal(const TempDir& dir, const std::string& arguments) {
  const auto out = dir.path() / "terminal-stdout.txt";
  const auto screen = dir.path() / "terminal.txt";
  const std::string inner = quoted(SPREADFIT_BINARY) + " " + arguments + " >" + quoted(out.string());
  REQUIRE(inner.find('"') == std::string::npos);
  const std::string command = "script -qec \"" + inner + "\" " + quoted(screen.string()) + " >/dev/null 2>&1";
  const int status = std::system(command.c_str());
  REQUIRE(WIFEXITED(status));
  CHECK(WEXITSTATUS(status) == 0);
  return read_text(screen);
}

}  // namespace

TEST_CASE("progress: runs that can take a while say what they do on a terminal, and nothing in a pipe") {
  // Common practice, no source: progress for a person watching, never in logs a plant system reads.
  TempDir dir;
  const auto slump = dir.write("slump.toml",
                               "[sample]\nid = \"S\"\ndensity = \"1.1 g/mL\"\n[rig]\nkind = \"slump\"\n"
                               "radius = \"5 cm\"\nheight = \"10 cm\"\n");
  const std::string translate = "translate " + quoted(slump.string()) +
                                " --model bingham --vary 'yield_stress=10 Pa:200 Pa' --vary 'viscosity=1:20' --at 300"
                                " --points 3 --map " + quoted((dir.path() / "m.svg").string()) + " --map-points 5";
  // 5 x 5 map points (--map-points 5 on each of the two axes). was: no word at all.
  const std::string screen = run_at_terminal(dir, translate);
  CHECK(screen.find("translate --map: solving the") != std::string::npos);
  CHECK(screen.find("at 25 points") != std::string::npos);
  const Run piped = run_spreadfit(dir, translate);
  CHECK(piped.exit_code == 0);
  CHECK(piped.err.find("solving") == std::string::npos);

  const auto plate = dir.write("plate.toml",
                               "[sample]\nid = \"P\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"plate\"\n"
                               "ring_radius = \"3 cm\"\nvolume = \"150 mL\"\n");
  const std::string plan = "plan " + quoted(plate.string()) +
                           " --model bingham --set 'yield_stress=20 Pa' --set viscosity=50 --every 5 --until 120 "
                           "--check 2";
  const std::string planned = run_at_terminal(dir, plan);
  CHECK(planned.find("plan: candidate 1/1 (plate.toml)") != std::string::npos);
  CHECK(planned.find("plan --check: refitting 2 simulated reading sets of plate.toml") != std::string::npos);
}
