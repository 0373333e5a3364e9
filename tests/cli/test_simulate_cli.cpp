// The spreadfit command end to end: the binary is run on test descriptions written to a scratch folder, and its
// output, messages and exit codes are checked against the README and against published closed forms.
// Sample ids and rigs are invented.
//
// References:
//   Huppert, H. E. (1982). The propagation of two-dimensional and axisymmetric viscous gravity currents over a
//     rigid horizontal surface. J. Fluid Mech. 121, 43-58: a Newtonian drop of volume V spreads as
//     r_N = 0.894 (rho g V^3 t / (3 mu))^(1/8) once it has forgotten its initial shape.
//   Engmann, J., Servais, C. & Burbidge, A. S. (2005). Squeeze flow theory and applications to rheometry: a review.
//     J. Non-Newtonian Fluid Mech. 132, 1-27: Stefan's law at constant volume V under a constant force F,
//     1/h^4 - 1/h0^4 = 8 pi F t / (3 mu V^2).
#include <doctest/doctest.h>
#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <iterator>
#include <numbers>
#include <sstream>
#include <string>
#include <vector>

#include "src/version.hpp"
#include "tests/cli/cli_test_support.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::io::test::TempDir;

namespace {

constexpr double kGravity = 9.80665;  // m/s^2, standard gravity (3rd CGPM, 1901), as the test descriptions use

/// The simulate CSV split into its header and numeric rows; fails the test on anything malformed.
struct SimulatedCsv {
  std::string header;
  std::vector<double> times, readings;
};

/// The CSV of a run that must have succeeded.
SimulatedCsv simulated(const Run& run) {
  INFO("command: " << run.command);
  INFO("stderr: " << run.err);
  REQUIRE(run.exit_code == 0);
  SimulatedCsv csv;
  std::istringstream in(run.out);
  std::string line;
  REQUIRE(std::getline(in, csv.header));
  while (std::getline(in, line)) {
    const std::size_t comma = line.find(',');
    REQUIRE_MESSAGE(comma != std::string::npos, "row without a comma: " << line);
    std::size_t used_time = 0, used_reading = 0;
    const std::string time_text = line.substr(0, comma), reading_text = line.substr(comma + 1);
    csv.times.push_back(std::stod(time_text, &used_time));
    csv.readings.push_back(std::stod(reading_text, &used_reading));
    REQUIRE_MESSAGE((used_time == time_text.size() && used_reading == reading_text.size()),
                    "row with more than two numbers: " << line);
  }
  return csv;
}

const std::string kSample =
    "[sample]\n"
    "id = \"DEMO-0001\"\n"
    "density = 1000\n";

/// A channel 5 cm wide with a 5 cm reservoir of 100 mL (4 cm deep at the start).
const std::string kChannel = kSample +
                             "[rig]\n"
                             "kind = \"channel\"\n"
                             "width = \"5 cm\"\n"
                             "reservoir_length = \"5 cm\"\n"
                             "volume = \"100 mL\"\n";

/// The test description `toml`, written as test.toml in `dir`, quoted for the shell.
std::string test_file(const TempDir& dir, const std::string& toml) {
  return quoted(dir.write("test.toml", toml).string());
}

/// The one-line message of a refused run: exit 2, nothing on stdout, "spreadfit: ..." on stderr.
std::string refusal(const Run& run) {
  INFO("command: " << run.command);
  CHECK(run.exit_code == 2);
  CHECK(run.out.empty());
  REQUIRE(!run.err.empty());
  CHECK(run.err.rfind("spreadfit: ", 0) == 0);
  return run.err;
}

}  // namespace

TEST_CASE("--version prints the software's name and version") {
  TempDir dir;
  const Run run = run_spreadfit(dir, "--version");
  CHECK(run.exit_code == 0);
  CHECK(run.out == "spreadfit " + std::string(spreadfit::software_version()) + "\n");
  CHECK(run.err.empty());
}

TEST_CASE("every subcommand has --help") {
  TempDir dir;
  for (const char* subcommand : {"simulate", "fit"}) {
    INFO("subcommand: " << subcommand);
    const Run run = run_spreadfit(dir, std::string(subcommand) + " --help");
    CHECK(run.exit_code == 0);
    CHECK(run.out.find("--model") != std::string::npos);
    CHECK(run.out.find("TEST.toml") != std::string::npos);
  }
}

TEST_CASE("usage errors exit 2 with the parser's message and a pointer to --help") {
  TempDir dir;
  const std::string test = test_file(dir, kChannel);
  SUBCASE("no subcommand") {
    const std::string err = refusal(run_spreadfit(dir, ""));
    CHECK(err.find("Run 'spreadfit --help' for usage.") != std::string::npos);
  }
  SUBCASE("simulate without --model") {
    const std::string err = refusal(run_spreadfit(dir, "simulate " + test + " --set viscosity=1"));
    CHECK(err.find("--model") != std::string::npos);
    CHECK(err.find("Run 'spreadfit simulate --help' for usage.") != std::string::npos);
  }
  SUBCASE("an unknown option") {
    const std::string err = refusal(run_spreadfit(dir, "simulate " + test + " --model newtonian --sett x=1"));
    CHECK(err.find("--sett") != std::string::npos);
  }
}

TEST_CASE("simulate writes the interface's header and one row per requested time") {
  TempDir dir;
  const std::string test = test_file(dir, kChannel);
  const Run run = run_spreadfit(dir, "simulate " + test + " --model newtonian --set viscosity=10 --times 1,2,5,10");
  const SimulatedCsv csv = simulated(run);
  CHECK(csv.header == "time [s],front [m]");
  CHECK(csv.times == std::vector<double>{1, 2, 5, 10});
  REQUIRE(csv.readings.size() == 4);
  // The front travels past the gate and never back.
  CHECK(csv.readings.front() > 0);
  for (std::size_t i = 1; i < csv.readings.size(); ++i) CHECK(csv.readings[i] > csv.readings[i - 1]);
}

TEST_CASE("without --times, simulate uses the readings' times, else a default set") {
  TempDir dir;
  SUBCASE("a plate with a readings file: its times, and the reading its column names") {
    dir.write("DEMO-0001.csv", "time [s],diameter [cm]\n0,6\n5,7.5\n20,9\n");
    const std::string test = test_file(dir, kSample +
                                                "[rig]\n"
                                                "kind = \"plate\"\n"
                                                "ring_radius = \"3 cm\"\n"
                                                "volume = \"50 mL\"\n"
                                                "[readings]\n"
                                                "file = \"DEMO-0001.csv\"\n");
    const Run run = run_spreadfit(dir, "simulate " + test + " --model newtonian --set viscosity=\"5 Pa.s\"");
    const SimulatedCsv csv = simulated(run);
    CHECK(csv.header == "time [s],diameter [m]");
    CHECK(csv.times == std::vector<double>{0, 5, 20});
  }
  SUBCASE("no readings: 25 times spaced evenly in log t from 0.5 s to 300 s") {
    const std::string test = test_file(dir, kChannel);
    const Run run = run_spreadfit(dir, "simulate " + test +
                                           " --model power-law --set consistency=\"8 Pa.s^n\" "
                                           "--set flow_index=0.5");
    const SimulatedCsv csv = simulated(run);
    CHECK(csv.header == "time [s],front [m]");
    REQUIRE(csv.times.size() == 25);
    CHECK(csv.times.front() == 0.5);
    CHECK(csv.times.back() == 300.0);
    constexpr double kRatioTol = 1e-12;  // a few roundings of pow()
    const double step = std::pow(300.0 / 0.5, 1.0 / 24.0);
    for (std::size_t i = 1; i < csv.times.size(); ++i)
      CHECK(csv.times[i] / csv.times[i - 1] == doctest::Approx(step).epsilon(kRatioTol));
  }
}

TEST_CASE("a simulated Newtonian plate spreads as Huppert's (1982) similarity solution at late times") {
  // 50 mL from a 3 cm ring, 1 Pa s: by 1e5 s the radius is about 25 cm, eight times the ring, and the drop has
  // long forgotten its initial shape (its virtual time origin is of order 0.01 s).
  constexpr double kRelTol = 0.01;  // brief's limit; the constant 0.894 alone is rounded to 0.06%
  constexpr double kDensity = 1000, kViscosity = 1, kVolume = 50e-6, kTime = 1e5;
  const double huppert_radius =
      0.894 * std::pow(kDensity * kGravity * std::pow(kVolume, 3) * kTime / (3 * kViscosity), 1.0 / 8.0);
  TempDir dir;
  std::string reading = "radius";
  double factor = 1;
  SUBCASE("radius") {}
  SUBCASE("diameter") {
    reading = "diameter";
    factor = 2;
  }
  const std::string test = test_file(dir, kSample +
                                              "[rig]\n"
                                              "kind = \"plate\"\n"
                                              "ring_radius = \"3 cm\"\n"
                                              "volume = \"50 mL\"\n"
                                              "[readings]\n"
                                              "reading = \"" +
                                              reading + "\"\n");
  const Run run = run_spreadfit(dir, "simulate " + test + " --model newtonian --set viscosity=1 --times 1e5");
  const SimulatedCsv csv = simulated(run);
  CHECK(csv.header == "time [s]," + reading + " [m]");
  REQUIRE(csv.readings.size() == 1);
  INFO("simulated " << csv.readings[0] << " m, Huppert " << factor * huppert_radius << " m");
  CHECK(csv.readings[0] == doctest::Approx(factor * huppert_radius).epsilon(kRelTol));
}

TEST_CASE("a simulated Newtonian squeeze follows Stefan's law at constant volume") {
  // 1 mL under 1 N from a 5 mm gap, 1 Pa s (Engmann, Servais & Burbidge 2005): the gap falls to about 0.3 mm
  // within 10 s.
  constexpr double kRelTol = 0.005;
  constexpr double kViscosity = 1, kForce = 1, kVolume = 1e-6, kInitialGap = 5e-3;
  TempDir dir;
  const std::string test = test_file(dir, kSample +
                                              "[rig]\n"
                                              "kind = \"squeeze\"\n"
                                              "volume = \"1 mL\"\n"
                                              "force = \"1 N\"\n"
                                              "initial_gap = \"5 mm\"\n");
  const Run run =
      run_spreadfit(dir, "simulate " + test + " --model newtonian --set viscosity=\"1 Pa.s\" --times 0,0.01,0.1,1,10");
  const SimulatedCsv csv = simulated(run);
  CHECK(csv.header == "time [s],gap [m]");
  REQUIRE(csv.readings.size() == 5);
  for (std::size_t i = 0; i < csv.times.size(); ++i) {
    const double rate = 8 * std::numbers::pi * kForce / (3 * kViscosity * kVolume * kVolume);
    const double stefan_gap = std::pow(1 / std::pow(kInitialGap, 4) + rate * csv.times[i], -0.25);
    INFO("t = " << csv.times[i] << " s: simulated " << csv.readings[i] << " m, Stefan " << stefan_gap << " m");
    CHECK(csv.readings[i] == doctest::Approx(stefan_gap).epsilon(kRelTol));
  }
}

TEST_CASE("a slump test is simulated at one time and slumps no more than its height") {
  TempDir dir;
  const std::string test = test_file(dir, kSample +
                                              "[rig]\n"
                                              "kind = \"slump\"\n"
                                              "radius = \"5 cm\"\n"
                                              "height = \"10 cm\"\n");
  const Run run = run_spreadfit(dir, "simulate " + test +
                                         " --model bingham --set yield_stress=\"50 Pa\" "
                                         "--set viscosity=2");
  const SimulatedCsv csv = simulated(run);
  CHECK(csv.header == "time [s],slump [m]");
  REQUIRE(csv.readings.size() == 1);
  CHECK(csv.readings[0] >= 0);
  CHECK(csv.readings[0] <= 0.1);
}

TEST_CASE("time_origin shifts the release: the model runs at max(t - t0, 0)") {
  TempDir dir;
  const std::string test = test_file(dir, kChannel);
  const std::string material = " --model bingham --set yield_stress=5 --set viscosity=2";
  const Run unshifted = run_spreadfit(dir, "simulate " + test + material + " --times 0,1,5,10");
  const SimulatedCsv reference = simulated(unshifted);

  SUBCASE("a later release, given in seconds with a unit") {
    const Run run =
        run_spreadfit(dir, "simulate " + test + material + " --set time_origin=\"2 s\" --times \"2 s,3 s,7 s,12 s\"");
    const SimulatedCsv csv = simulated(run);
    CHECK(csv.times == std::vector<double>{2, 3, 7, 12});
    CHECK(csv.readings == reference.readings);  // the same solve at the same model times: the same numbers
  }
  SUBCASE("a release before the clock's zero") {
    const Run run = run_spreadfit(dir, "simulate " + test + material + " --set time_origin=-1 --times 0,4,9");
    const SimulatedCsv csv = simulated(run);
    REQUIRE(csv.readings.size() == 3);
    CHECK(csv.readings[0] == reference.readings[1]);
    CHECK(csv.readings[1] == reference.readings[2]);
    CHECK(csv.readings[2] == reference.readings[3]);
  }
  SUBCASE("times before the release read as at the release") {
    const Run run = run_spreadfit(dir, "simulate " + test + material + " --set time_origin=5 --times 1,3,5");
    const SimulatedCsv csv = simulated(run);
    CHECK(csv.readings == std::vector<double>(3, reference.readings[0]));
  }
}

TEST_CASE("bad simulate input exits 2 naming the place and what was expected") {
  TempDir dir;
  const std::string test = test_file(dir, kChannel);
  const std::string simulate = "simulate " + test + " ";

  SUBCASE("an unknown model, with the nearest name") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonain --set viscosity=1")) ==
          "spreadfit: command line: --model: unknown model 'newtonain'; did you mean 'newtonian'?\n");
  }
  SUBCASE("auto, which needs readings to choose") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model auto --set viscosity=1")) ==
          "spreadfit: command line: --model: 'auto' chooses a model by fitting readings, which simulate does not "
          "do (expected one of: newtonian, power-law, bingham, herschel-bulkley)\n");
  }
  SUBCASE("a dimensionless parameter the model needs is missing") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model power-law --set consistency=8")) ==
          "spreadfit: command line: --set: missing parameter 'flow_index' for model power-law (it takes "
          "consistency, flow_index and optionally time_origin; expected --set flow_index=VALUE, such as "
          "flow_index=0.5)\n");
  }
  SUBCASE("a parameter the model needs is missing") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model bingham --set viscosity=1")) ==
          "spreadfit: command line: --set: missing parameter 'yield_stress' for model bingham (it takes "
          "yield_stress, viscosity and optionally time_origin; expected --set yield_stress=VALUE, such as "
          "yield_stress=\"25 Pa\" or a number in Pa)\n");
  }
  SUBCASE("a parameter the model does not have") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set viscosity=1 --set \"yield_stress=5 Pa\"")) ==
          "spreadfit: command line: --set yield_stress=5 Pa: model newtonian has no parameter 'yield_stress' (it "
          "takes viscosity and optionally time_origin)\n");
  }
  SUBCASE("a viscosity given to a power law, with what stands for it") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model power-law --set viscosity=1 --set flow_index=0.5")) ==
          "spreadfit: command line: --set viscosity=1: model power-law has no parameter 'viscosity' (it takes "
          "consistency, flow_index and optionally time_origin); for model power-law give K as 'consistency' (the "
          "viscosity when flow_index = 1)\n");
  }
  SUBCASE("a mistyped parameter, with the nearest name") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set viscocity=1")) ==
          "spreadfit: command line: --set viscocity=1: unknown parameter 'viscocity'; did you mean 'viscosity'?\n");
  }
  SUBCASE("a parameter set twice") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set viscosity=1 viscosity=2")) ==
          "spreadfit: command line: --set viscosity=2: 'viscosity' is set twice (expected each parameter once)\n");
  }
  SUBCASE("an assignment without '='") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set viscosity")) ==
          "spreadfit: command line: --set viscosity: expected PARAM=VALUE, such as viscosity=\"1.2 Pa.s\" "
          "(parameters of model newtonian: viscosity and optionally time_origin)\n");
  }
  SUBCASE("an unknown unit") {
    const std::string err = refusal(run_spreadfit(dir, simulate + "--model newtonian --set \"viscosity=2 Pas\""));
    CHECK(err.rfind("spreadfit: command line: --set viscosity=2 Pas: unknown unit 'Pas'", 0) == 0);
  }
  SUBCASE("a unit of another dimension") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set \"viscosity=2 Pa\"")) ==
          "spreadfit: command line: --set viscosity=2 Pa: 'Pa' is a unit of stress (expected a unit of viscosity: "
          "Pa.s, mPa.s, cP, P)\n");
  }
  SUBCASE("a value out of the law's range") {
    const std::string err = refusal(
        run_spreadfit(dir, simulate + "--model herschel-bulkley --set yield_stress=1 consistency=1 flow_index=3"));
    CHECK(err.rfind("spreadfit: command line: --set flow_index=3: flow_index", 0) == 0);
  }
  SUBCASE("times not increasing") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set viscosity=1 --times 1,5,5")) ==
          "spreadfit: command line: --times: entry 3: '5' is not after the entry before it, 5 s (expected "
          "strictly increasing times)\n");
  }
  SUBCASE("a negative time") {
    CHECK(refusal(run_spreadfit(dir, simulate + "--model newtonian --set viscosity=1 --times=-1,5")) ==
          "spreadfit: command line: --times: entry 1: '-1' is negative (expected a time >= 0)\n");
  }
  SUBCASE("a missing test description") {
    const std::string missing = (dir.path() / "nowhere.toml").string();
    CHECK(refusal(run_spreadfit(dir, "simulate " + quoted(missing) + " --model newtonian --set viscosity=1")) ==
          "spreadfit: " + missing + ": test description not found\n");
  }
  SUBCASE("a test description with a mistyped key: its file, line and field") {
    const std::string bad = test_file(dir, kSample +
                                               "[rig]\n"
                                               "kind = \"channel\"\n"
                                               "width = \"5 cm\"\n"
                                               "reservoir_length = \"5 cm\"\n"
                                               "volme = \"100 mL\"\n");
    const std::string err = refusal(run_spreadfit(dir, "simulate " + bad + " --model newtonian --set viscosity=1"));
    CHECK(err.rfind("spreadfit: " + (dir.path() / "test.toml").string() + ":8: rig.volme: ", 0) == 0);
    CHECK(err.find("did you mean 'volume'?") != std::string::npos);
  }
}
