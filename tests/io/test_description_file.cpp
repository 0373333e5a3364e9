// Test descriptions: every field into SI, derived values, readings files found relative to the TOML file, and
// the exact place and words of refusals. Sample ids, products and readings are invented.
// Factors: SI Brochure, 9th ed. (2019), Tables 4, 7, 8; standard gravity 9.80665 m/s^2 (3rd CGPM, 1901).
#include <doctest/doctest.h>

#include <numbers>
#include <string>
#include <variant>

#include "src/io/description_file.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::ChannelRig;
using spreadfit::Law;
using spreadfit::PlateRig;
using spreadfit::Reading;
using spreadfit::SlumpRig;
using spreadfit::SqueezeRig;
using spreadfit::io::InputError;
using spreadfit::io::load_test_description;
using spreadfit::io::test::input_error_of;
using spreadfit::io::test::TempDir;

namespace {

constexpr double kRelTol = 1e-14;  // a product of a few decimal factors

const char* const kChannelCsv =
    "# invented demo readings\n"
    "time [s],front [cm]\n"
    "0,0\n"
    "5,3.1\n"
    "10,4.2\n";

// A minimal valid description; tests append to or replace parts of it.
const std::string kSample =
    "[sample]\n"
    "id = \"DEMO-0001\"\n"
    "density = \"1.10 g/mL\"\n";
const std::string kChannelRig =
    "[rig]\n"
    "kind = \"channel\"\n"
    "width = \"5 cm\"\n"
    "reservoir_length = \"5 cm\"\n"
    "volume = \"100 mL\"\n";

/// The message of the error loading `toml` (written as test.toml in `dir`) gives, with the file name in front.
std::string load_error(const TempDir& dir, const std::string& toml) {
  const auto file = dir.write("test.toml", toml);
  return input_error_of([&] { load_test_description(file); }).what();
}

}  // namespace

TEST_CASE("a full channel description is read into SI units") {
  TempDir dir;
  dir.write("DEMO-0001.csv", kChannelCsv);
  const auto file = dir.write("test.toml",
                              "# invented demo test\n"
                              "[sample]\n"
                              "id = \"DEMO-0001\"\n"
                              "product = \"DEMO\"\n"
                              "density = \"1.10 g/mL\"\n"
                              "temperature = \"21.5 degC\"\n"
                              "[rig]\n"
                              "kind = \"channel\"\n"
                              "width = \"5 cm\"\n"
                              "reservoir_length = 0.04\n"
                              "volume = \"100 mL\"\n"
                              "side_wall_drag = false\n"
                              "[readings]\n"
                              "file = \"DEMO-0001.csv\"\n"
                              "resolution = \"1 mm\"\n"
                              "[fit]\n"
                              "model = \"herschel-bulkley\"\n"
                              "time_origin = \"zero\"\n"
                              "ignore_before = \"2 s\"\n"
                              "[spec]\n"
                              "yield_stress = [\"20 Pa\", \"35 Pa\"]\n"
                              "flow_index = [0.3, 0.6]\n");
  const auto d = load_test_description(file);
  CHECK(d.path == file);
  CHECK(d.sample_id == "DEMO-0001");
  CHECK(d.product == "DEMO");
  CHECK(d.density == doctest::Approx(1100.0).epsilon(kRelTol));
  REQUIRE(d.temperature.has_value());
  CHECK(*d.temperature == doctest::Approx(294.65).epsilon(kRelTol));

  REQUIRE(std::holds_alternative<ChannelRig>(d.setup.rig));
  const auto& rig = std::get<ChannelRig>(d.setup.rig);
  CHECK(rig.width == doctest::Approx(0.05).epsilon(kRelTol));
  CHECK(rig.reservoir_length == 0.04);
  CHECK(rig.volume == doctest::Approx(1e-4).epsilon(kRelTol));
  CHECK_FALSE(rig.side_wall_drag);
  CHECK(d.setup.density == d.density);
  CHECK(d.setup.reading == Reading::Front);

  REQUIRE(d.series.size() == 1);
  CHECK(d.series[0].source == (dir.path() / "DEMO-0001.csv").string());
  CHECK(d.series[0].times == std::vector<double>{0.0, 5.0, 10.0});
  CHECK(d.series[0].values[2] == doctest::Approx(0.042).epsilon(kRelTol));
  CHECK(d.series[0].lines == std::vector<int>{3, 4, 5});
  CHECK_FALSE(d.final_reading.has_value());
  REQUIRE(d.resolution.has_value());
  CHECK(*d.resolution == doctest::Approx(1e-3).epsilon(kRelTol));

  CHECK(d.fit.model == Law::HerschelBulkley);
  CHECK_FALSE(d.fit.fit_time_origin);
  CHECK(d.fit.ignore_before == 2.0);

  REQUIRE(d.spec.size() == 2);
  CHECK(d.spec[0].parameter == "yield_stress");
  CHECK(d.spec[0].low == 20.0);
  CHECK(d.spec[0].high == 35.0);
  CHECK(d.spec[0].line == 21);
  CHECK(d.spec[1].parameter == "flow_index");
  CHECK(d.spec[1].low == 0.3);
  CHECK(d.spec[1].high == 0.6);
}

TEST_CASE("defaults: no readings, no fit, no spec") {
  TempDir dir;
  const auto d = load_test_description(dir.write("test.toml", kSample + kChannelRig));
  CHECK(d.product.empty());
  CHECK_FALSE(d.temperature.has_value());
  CHECK(std::get<ChannelRig>(d.setup.rig).side_wall_drag);
  CHECK(d.setup.reading == Reading::Front);
  CHECK(d.series.empty());
  CHECK_FALSE(d.final_reading.has_value());
  CHECK_FALSE(d.resolution.has_value());
  CHECK_FALSE(d.fit.model.has_value());  // auto
  CHECK(d.fit.fit_time_origin);
  CHECK(d.fit.ignore_before == 0.0);
  CHECK(d.spec.empty());
}

TEST_CASE("fill_height gives the volume from the rig's footprint") {
  TempDir dir;
  SUBCASE("channel: fill_height * width * reservoir_length") {
    const auto d = load_test_description(dir.write("test.toml", kSample +
                                                                    "[rig]\n"
                                                                    "kind = \"channel\"\n"
                                                                    "width = \"5 cm\"\n"
                                                                    "reservoir_length = \"8 cm\"\n"
                                                                    "fill_height = \"2.5 cm\"\n"));
    CHECK(std::get<ChannelRig>(d.setup.rig).volume == doctest::Approx(0.025 * 0.05 * 0.08).epsilon(kRelTol));
  }
  SUBCASE("plate: fill_height * pi * ring_radius^2") {
    const auto d = load_test_description(dir.write("test.toml", kSample +
                                                                    "[rig]\n"
                                                                    "kind = \"plate\"\n"
                                                                    "ring_radius = \"3 cm\"\n"
                                                                    "fill_height = \"2 cm\"\n"));
    const auto& rig = std::get<PlateRig>(d.setup.rig);
    CHECK(rig.ring_radius == doctest::Approx(0.03).epsilon(kRelTol));
    CHECK(rig.volume == doctest::Approx(0.02 * std::numbers::pi * 0.03 * 0.03).epsilon(kRelTol));
    CHECK(d.setup.reading == Reading::Radius);
  }
  SUBCASE("volume and fill_height together are refused") {
    CHECK(load_error(dir, kSample + kChannelRig + "fill_height = \"2 cm\"\n") ==
          (dir.path() / "test.toml").string() + ":9: rig.fill_height: give volume or fill_height, not both");
  }
  SUBCASE("neither is refused at the [rig] header") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\n") ==
          (dir.path() / "test.toml").string() +
              ":4: rig.volume: missing required key in [rig] (expected volume, such as \"100 mL\", or fill_height: "
              "the sample's depth in the ring)");
  }
}

TEST_CASE("squeeze: a load is a mass under standard gravity, a force is taken as is") {
  TempDir dir;
  const std::string rig = "[rig]\nkind = \"squeeze\"\nvolume = \"2 mL\"\n";
  SUBCASE("load") {
    const auto d = load_test_description(dir.write("test.toml", kSample + rig + "load = \"250 g\"\n"));
    const auto& s = std::get<SqueezeRig>(d.setup.rig);
    CHECK(s.volume == doctest::Approx(2e-6).epsilon(kRelTol));
    CHECK(s.force == doctest::Approx(0.25 * 9.80665).epsilon(kRelTol));
    CHECK(s.initial_gap == 0.0);  // default selected by the model
    CHECK(d.setup.reading == Reading::Gap);
  }
  SUBCASE("force and initial gap") {
    const auto d =
        load_test_description(dir.write("test.toml", kSample + rig + "force = \"2.5 N\"\ninitial_gap = \"8 mm\"\n"));
    const auto& s = std::get<SqueezeRig>(d.setup.rig);
    CHECK(s.force == 2.5);
    CHECK(s.initial_gap == doctest::Approx(0.008).epsilon(kRelTol));
  }
  SUBCASE("both are refused") {
    CHECK(load_error(dir, kSample + rig + "load = \"250 g\"\nforce = \"2.5 N\"\n") ==
          (dir.path() / "test.toml").string() + ":8: rig.force: give load (a mass) or force, not both");
  }
  SUBCASE("a load written as a force names the mass it expected") {
    CHECK(load_error(dir, kSample + rig + "load = \"2.5 N\"\n") ==
          (dir.path() / "test.toml").string() +
              ":7: rig.load: 'N' is a unit of force (expected a unit of mass: kg, g, mg)");
  }
}

TEST_CASE("replicates: files = [...] gives one series per file") {
  TempDir dir;
  dir.write("runs/a.csv", "time [s],diameter [cm]\n0,6\n10,9.5\n");
  dir.write("runs/b.csv", "# second replicate\ntime [s],diameter [mm]\n0,60\n12,97\n20,101\n");
  const std::string plate = "[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\nvolume = \"50 mL\"\n";
  SUBCASE("read") {
    const auto d = load_test_description(
        dir.write("test.toml", kSample + plate + "[readings]\nfiles = [\"runs/a.csv\", \"runs/b.csv\"]\n"));
    REQUIRE(d.series.size() == 2);
    CHECK(d.setup.reading == Reading::Diameter);
    CHECK(d.series[0].times.size() == 2);
    CHECK(d.series[1].times == std::vector<double>{0.0, 12.0, 20.0});
    CHECK(d.series[1].values[1] == doctest::Approx(0.097).epsilon(kRelTol));
    CHECK(d.series[1].lines == std::vector<int>{3, 4, 5});
  }
  SUBCASE("a file listed twice") {
    CHECK(load_error(dir, kSample + plate + "[readings]\nfiles = [\"runs/a.csv\", \"runs/../runs/a.csv\"]\n") ==
          (dir.path() / "test.toml").string() +
              ":9: readings.files: 'runs/../runs/a.csv' is listed twice (expected each replicate once)");
  }
  SUBCASE("replicates of different readings") {
    dir.write("runs/c.csv", "time [s],radius [cm]\n0,3\n10,4.6\n");
    CHECK(load_error(dir, kSample + plate + "[readings]\nfiles = [\n  \"runs/a.csv\",\n  \"runs/c.csv\",\n]\n") ==
          (dir.path() / "test.toml").string() +
              ":11: readings.files: 'runs/c.csv' has a radius column but 'runs/a.csv' has diameter (expected every "
              "replicate to give the same reading)");
  }
  SUBCASE("an empty list") {
    CHECK(load_error(dir, kSample + plate + "[readings]\nfiles = []\n") ==
          (dir.path() / "test.toml").string() +
              ":9: readings.files: empty array (expected at least one readings file)");
  }
}

TEST_CASE("readings files are found relative to the TOML file, not the working directory") {
  TempDir dir;
  dir.write("lab/batch7/data/run.csv", kChannelCsv);
  const auto file = dir.write("lab/batch7/test.toml", kSample + kChannelRig + "[readings]\nfile = \"data/run.csv\"\n");
  REQUIRE(std::filesystem::current_path() != file.parent_path());
  const auto d = load_test_description(file);
  REQUIRE(d.series.size() == 1);
  CHECK(d.series[0].source == (dir.path() / "lab/batch7/data/run.csv").string());
  CHECK(d.series[0].values.size() == 3);
}

TEST_CASE("a missing readings file names the TOML file, line and field, and where it looked") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  CHECK(load_error(dir, kSample + kChannelRig + "[readings]\nfile = \"DEMO-0002.csv\"\n") ==
        toml + ":10: readings.file: readings file 'DEMO-0002.csv' not found (looked for '" +
            (dir.path() / "DEMO-0002.csv").string() + "')");
}

TEST_CASE("an error inside a readings file is reported against the CSV") {
  TempDir dir;
  const auto csv = dir.write("run.csv", "time [s],front [cm]\n0,0\n5,x\n");
  const auto toml = dir.write("test.toml", kSample + kChannelRig + "[readings]\nfile = \"run.csv\"\n");
  const auto e = input_error_of([&] { load_test_description(toml); });
  CHECK(std::string(e.what()) ==
        csv.string() + ":3:3: front [cm]: 'x' is not a number (expected a finite decimal number such as 2.9)");
}

TEST_CASE("final-only tests") {
  TempDir dir;
  SUBCASE("channel: the rig's own reading") {
    const auto d =
        load_test_description(dir.write("test.toml", kSample + kChannelRig + "[readings]\nfinal = \"2.9 cm\"\n"));
    REQUIRE(d.final_reading.has_value());
    CHECK(*d.final_reading == doctest::Approx(0.029).epsilon(kRelTol));
    CHECK(d.series.empty());
    CHECK(d.setup.reading == Reading::Front);
  }
  SUBCASE("plate: reading = \"diameter\" selects the kind") {
    const auto d = load_test_description(dir.write(
        "test.toml", kSample + "[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\nvolume = \"50 mL\"\n"
                               "[readings]\nfinal = \"11.2 cm\"\nreading = \"diameter\"\n"));
    CHECK(d.setup.reading == Reading::Diameter);
    CHECK(*d.final_reading == doctest::Approx(0.112).epsilon(kRelTol));
  }
  SUBCASE("slump") {
    const std::string slump = "[rig]\nkind = \"slump\"\nradius = \"2.5 cm\"\nheight = \"5 cm\"\n";
    const auto d = load_test_description(dir.write("test.toml", kSample + slump + "[readings]\nfinal = \"18 mm\"\n"));
    const auto& rig = std::get<SlumpRig>(d.setup.rig);
    CHECK(rig.radius == doctest::Approx(0.025).epsilon(kRelTol));
    CHECK(rig.height == doctest::Approx(0.05).epsilon(kRelTol));
    CHECK(d.setup.reading == Reading::Slump);
    CHECK(*d.final_reading == doctest::Approx(0.018).epsilon(kRelTol));
    SUBCASE("a slump above the cylinder's height is refused") {
      CHECK(load_error(dir, kSample + slump + "[readings]\nfinal = \"6 cm\"\n") ==
            (dir.path() / "test.toml").string() +
                ":9: readings.final: slump '6 cm' is more than the cylinder's height 0.05 m (expected 0 to the "
                "height)");
    }
    SUBCASE("a slump rig has no time series") {
      dir.write("run.csv", "time [s],slump [cm]\n0,0\n");
      CHECK(load_error(dir, kSample + slump + "[readings]\nfile = \"run.csv\"\n") ==
            (dir.path() / "test.toml").string() +
                ":9: readings.file: a slump rig has only a final reading (expected final = \"...\" instead of a "
                "readings file)");
    }
  }
  SUBCASE("a final reading and a file together are refused") {
    CHECK(load_error(dir, kSample + kChannelRig + "[readings]\nfile = \"a.csv\"\nfinal = \"2.9 cm\"\n") ==
          (dir.path() / "test.toml").string() + ":11: readings.final: give one of file, files and final, not several");
  }
}

TEST_CASE("the reading must be one the rig gives") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  SUBCASE("a CSV column the rig does not read") {
    dir.write("run.csv", "time [s],radius [cm]\n0,3\n");
    CHECK(load_error(dir, kSample + kChannelRig + "[readings]\nfile = \"run.csv\"\n") ==
          toml + ":10: readings.file: 'run.csv' has a radius column, which a channel rig does not read (expected "
                 "front)");
  }
  SUBCASE("reading = ... the rig does not have") {
    CHECK(load_error(dir, kSample + kChannelRig + "[readings]\nfinal = \"3 cm\"\nreading = \"gap\"\n") ==
          toml + ":11: readings.reading: a channel rig has no gap reading (expected front)");
  }
  SUBCASE("reading = ... disagreeing with the CSV column") {
    dir.write("run.csv", "time [s],gap [mm]\n0,8\n30,3.2\n");
    const std::string squeeze = "[rig]\nkind = \"squeeze\"\nvolume = \"2 mL\"\nforce = \"2.5 N\"\n";
    CHECK(load_error(dir, kSample + squeeze + "[readings]\nfile = \"run.csv\"\nreading = \"diameter\"\n") ==
          toml + ":10: readings.reading: reading = 'diameter' but 'run.csv' has a gap column (expected them to "
                 "agree; or leave reading out)");
  }
  SUBCASE("a misspelt reading name") {
    CHECK(load_error(dir, kSample + kChannelRig + "[readings]\nfinal = \"3 cm\"\nreading = \"diamter\"\n") ==
          toml + ":11: readings.reading: unknown reading 'diamter'; did you mean 'diameter'?");
  }
}

TEST_CASE("unknown tables and keys are refused with the nearest valid name") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  SUBCASE("a typo in a rig key") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"channel\"\nwidth = \"5 cm\"\nreservoir_length = \"5 cm\"\n"
                                    "volme = \"100 mL\"\n") ==
          toml + ":8: rig.volme: unknown key 'volme' in [rig]; did you mean 'volume'?");
  }
  SUBCASE("a typo in a sample key") {
    CHECK(load_error(dir, "[sample]\nid = \"DEMO-0001\"\ndensty = \"1.1 g/mL\"\n" + kChannelRig) ==
          toml + ":3: sample.densty: unknown key 'densty' in [sample]; did you mean 'density'?");
  }
  SUBCASE("a key of another rig kind") {
    CHECK(load_error(dir, kSample + kChannelRig + "ring_radius = \"3 cm\"\n") ==
          toml + ":9: rig.ring_radius: key 'ring_radius' does not apply to a channel rig (expected: kind, width, "
                 "reservoir_length, volume, fill_height, side_wall_drag)");
  }
  SUBCASE("a misspelt table") {
    CHECK(load_error(dir, kSample + kChannelRig + "[fitt]\nmodel = \"auto\"\n") ==
          toml + ":9: fitt: unknown table [fitt]; did you mean 'fit'?");
  }
  SUBCASE("a key that lost its table header") {
    CHECK(load_error(dir, "id = \"DEMO-0001\"\n" + kSample + kChannelRig) ==
          toml + ":1: id: key 'id' is outside any table (expected it under [sample])");
  }
  SUBCASE("of several unknown keys, the first written is cited (not the first in name order)") {
    CHECK(load_error(dir, kSample + kChannelRig + "zz_colour = \"red\"\naa_colour = \"blue\"\n") ==
          toml + ":9: rig.zz_colour: unknown key 'zz_colour' in [rig] (expected one of: kind, width, "
                 "reservoir_length, volume, fill_height, side_wall_drag)");
  }
  SUBCASE("a nothing-like key lists the valid ones") {
    CHECK(load_error(dir, kSample + kChannelRig + "[fit]\ncolour = \"red\"\n") ==
          toml + ":10: fit.colour: unknown key 'colour' in [fit] (expected one of: model, time_origin, "
                 "ignore_before)");
  }
  SUBCASE("an unknown rig kind") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"chanel\"\n") ==
          toml + ":5: rig.kind: unknown rig kind 'chanel'; did you mean 'channel'?");
  }
  SUBCASE("an unknown model") {
    CHECK(load_error(dir, kSample + kChannelRig + "[fit]\nmodel = \"herschel-bulkly\"\n") ==
          toml + ":10: fit.model: unknown model 'herschel-bulkly'; did you mean 'herschel-bulkley'?");
  }
  SUBCASE("an unknown time origin") {
    CHECK(load_error(dir, kSample + kChannelRig + "[fit]\ntime_origin = \"zeor\"\n") ==
          toml + ":10: fit.time_origin: unknown time_origin 'zeor'; did you mean 'zero'?");
  }
}

TEST_CASE("wrong types and wrong units name the field and what was expected") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  SUBCASE("a boolean for a length") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"slump\"\nradius = true\nheight = \"5 cm\"\n") ==
          toml + ":6: rig.radius: expected a length, such as \"2.9 cm\" or a number in m, got a boolean");
  }
  SUBCASE("a stress for a length") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"slump\"\nradius = \"5 Pa\"\nheight = \"5 cm\"\n") ==
          toml + ":6: rig.radius: 'Pa' is a unit of stress (expected a unit of length: m, cm, mm, um, in)");
  }
  SUBCASE("an unknown unit") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"slump\"\nradius = \"5 cn\"\nheight = \"5 cm\"\n") ==
          toml + ":6: rig.radius: unknown unit 'cn'; did you mean 'cm'?");
  }
  SUBCASE("a string for a boolean") {
    CHECK(load_error(dir, kSample + kChannelRig + "side_wall_drag = \"no\"\n") ==
          toml + ":9: rig.side_wall_drag: expected true or false, got a string");
  }
  SUBCASE("a number for the id") {
    CHECK(load_error(dir, "[sample]\nid = 412\ndensity = 1100\n" + kChannelRig) ==
          toml + ":2: sample.id: expected a string, got an integer");
  }
  SUBCASE("a table where a key belongs") {
    CHECK(load_error(dir, "rig = 3\n" + kSample) == toml + ":1: rig: expected a table [rig], got an integer");
  }
  SUBCASE("TOML's nan for a length") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"slump\"\nradius = nan\nheight = \"5 cm\"\n") ==
          toml + ":6: rig.radius: 'nan' is not a finite number (expected a finite length)");
  }
  SUBCASE("a negative bare number") {
    CHECK(load_error(dir, kSample + "[rig]\nkind = \"slump\"\nradius = -0.02\nheight = \"5 cm\"\n") ==
          toml + ":6: rig.radius: '-0.02' is negative (expected a length > 0)");
  }
}

TEST_CASE("missing required tables and keys") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  CHECK(load_error(dir, kChannelRig) == toml + ": sample: missing table [sample] (expected at least id and density)");
  CHECK(load_error(dir, kSample) ==
        toml + ": rig: missing table [rig] (expected kind = channel | plate | squeeze | slump and its sizes)");
  CHECK(load_error(dir, "\n[sample]\nid = \"DEMO-0001\"\n" + kChannelRig) ==
        toml + ":2: sample.density: missing required key in [sample] (expected a density, such as \"1.10 g/mL\" or a "
               "number in kg/m3)");
  CHECK(load_error(dir, kSample + "[rig]\nkind = \"channel\"\nreservoir_length = \"5 cm\"\nvolume = \"1 L\"\n") ==
        toml + ":4: rig.width: missing required key in [rig] (expected a length, such as \"2.9 cm\" or a number in m: "
               "the channel's width)");
}

TEST_CASE("plausibility limits catch a missing unit on density and temperature") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  CHECK(load_error(dir, "[sample]\nid = \"DEMO-0001\"\ndensity = 1.1\n" + kChannelRig) ==
        toml + ":3: sample.density: '1.1' is 1.1 kg/m3, outside any sauce or cream (expected 100 to 3000 kg/m3; "
               "write a unit, such as \"1.10 g/mL\")");
  CHECK(load_error(dir, kSample + "temperature = 21.5\n" + kChannelRig) ==
        toml + ":4: sample.temperature: '21.5' is 21.5 K, outside -50 to 150 degC (a bare number is in K; write a "
               "unit, such as \"21.5 degC\")");
  const auto d = load_test_description(dir.write("test.toml", kSample + "temperature = 294.65\n" + kChannelRig));
  CHECK(*d.temperature == 294.65);
}

TEST_CASE("fit settings are checked against the readings") {
  TempDir dir;
  dir.write("run.csv", kChannelCsv);
  const std::string base = kSample + kChannelRig + "[readings]\nfile = \"run.csv\"\n";
  SUBCASE("model auto is no model") {
    const auto d = load_test_description(dir.write("test.toml", base + "[fit]\nmodel = \"auto\"\n"));
    CHECK_FALSE(d.fit.model.has_value());
  }
  SUBCASE("each model name") {
    const std::pair<const char*, Law> models[] = {{"newtonian", Law::Newtonian},
                                                  {"power-law", Law::PowerLaw},
                                                  {"bingham", Law::Bingham},
                                                  {"herschel-bulkley", Law::HerschelBulkley}};
    for (const auto& entry : models) {
      const auto& name = entry.first;  // not a structured binding: clang 14 cannot capture one in INFO
      const auto& law = entry.second;
      INFO("model: " << name);
      const auto d =
          load_test_description(dir.write("test.toml", base + "[fit]\nmodel = \"" + std::string(name) + "\"\n"));
      CHECK(d.fit.model == law);
    }
  }
  SUBCASE("ignore_before past the last reading") {
    CHECK(load_error(dir, base + "[fit]\nignore_before = \"1 min\"\n") ==
          (dir.path() / "test.toml").string() + ":12: fit.ignore_before: '1 min' leaves no readings of '" +
              (dir.path() / "run.csv").string() + "' to fit (its last is at 10 s; expected a time before it)");
  }
}

TEST_CASE("spec limits are [low, high] quantities of the parameter's dimension") {
  TempDir dir;
  const std::string toml = (dir.path() / "test.toml").string();
  const std::string base = kSample + kChannelRig + "[spec]\n";
  SUBCASE("every parameter") {
    const auto d = load_test_description(dir.write(
        "test.toml", base + "viscosity = [\"800 mPa.s\", \"1.5 Pa.s\"]\nyield_stress = [0, \"0.1 kPa\"]\n"
                            "consistency = [\"2 Pa.s^n\", 12]\nflow_index = [\"0.3\", 0.6]\n"));
    REQUIRE(d.spec.size() == 4);
    CHECK(d.spec[0].parameter == "viscosity");
    CHECK(d.spec[0].low == doctest::Approx(0.8).epsilon(kRelTol));
    CHECK(d.spec[0].high == 1.5);
    CHECK(d.spec[0].line == 10);
    CHECK(d.spec[1].low == 0.0);
    CHECK(d.spec[1].high == doctest::Approx(100.0).epsilon(kRelTol));
    CHECK(d.spec[2].low == 2.0);
    CHECK(d.spec[2].high == 12.0);
    CHECK(d.spec[3].low == 0.3);
    CHECK(d.spec[3].line == 13);
  }
  SUBCASE("low above high") {
    CHECK(load_error(dir, base + "yield_stress = [\"35 Pa\", \"20 Pa\"]\n") ==
          toml + ":10: spec.yield_stress: low bound '35 Pa' is above high bound '20 Pa' (expected [low, high] with "
                 "low <= high)");
  }
  SUBCASE("one bound only") {
    CHECK(load_error(dir, base + "yield_stress = [\"35 Pa\"]\n") ==
          toml + ":10: spec.yield_stress: expected [low, high], two values such as [\"20 Pa\", \"35 Pa\"], got 1 "
                 "value");
  }
  SUBCASE("a viscosity unit for a stress") {
    CHECK(load_error(dir, base + "yield_stress = [\"20 Pa\", \"35 Pa.s\"]\n") ==
          toml + ":10: spec.yield_stress: 'Pa.s' is a unit of viscosity (expected a unit of stress: Pa, kPa, N/m2)");
  }
  SUBCASE("an unknown parameter") {
    CHECK(load_error(dir, base + "yield = [\"20 Pa\", \"35 Pa\"]\n") ==
          toml + ":10: spec.yield: unknown key 'yield' in [spec] (expected one of: viscosity, yield_stress, "
                 "consistency, flow_index)");
  }
}

TEST_CASE("files that are not readable TOML") {
  TempDir dir;
  SUBCASE("no such file") {
    const auto missing = dir.path() / "none.toml";
    CHECK(std::string(input_error_of([&] { load_test_description(missing); }).what()) ==
          missing.string() + ": test description not found");
  }
  SUBCASE("a syntax error is located") {
    const auto e = input_error_of([&] { load_test_description(dir.write("test.toml", kSample + "[rig\n")); });
    CHECK(e.file() == (dir.path() / "test.toml").string());
    CHECK(e.line() == 4);
    CHECK(e.message().rfind("TOML syntax: ", 0) == 0);
    CHECK(std::string(e.what()).find('\n') == std::string::npos);
  }
}

TEST_CASE("io: a reading larger than the sample's volume allows is refused with its line") {
  // 50 mL on a plate cannot spread to a radius of 80 cm: a disc of 0.56 m radius is already 0.05 mm thick
  // (V / (pi r^2), arithmetic).
  spreadfit::io::test::TempDir dir;
  dir.write("run.csv", "time [s],radius [cm]\n1,5.2\n2,80\n");
  const auto file = dir.write("t.toml",
                              "[sample]\nid = \"X1\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\n"
                              "volume = \"50 mL\"\n[readings]\nfile = \"run.csv\"\n");
  try {
    spreadfit::io::load_test_description(file);
    FAIL("expected an InputError");
  } catch (const spreadfit::io::InputError& e) {
    const std::string what = e.what();
    CHECK(what.find("run.csv:3") != std::string::npos);
    CHECK(what.find("larger than the rig allows") != std::string::npos);
  }
}

TEST_CASE("capture follows a plate's diameter and a channel's front; a squeeze or slump rig has no outline") {
  // The readings a video can give (README, "capture"): the defining property of each rig kind, one answer each.
  using spreadfit::io::captured_outline;
  using spreadfit::io::CapturedOutline;
  CHECK(captured_outline(PlateRig{}) == CapturedOutline::PlateDiameter);
  CHECK(captured_outline(ChannelRig{}) == CapturedOutline::ChannelFront);
  CHECK(captured_outline(SqueezeRig{}) == CapturedOutline::None);
  CHECK(captured_outline(SlumpRig{}) == CapturedOutline::None);
}

TEST_CASE("io: squeeze readings the starting disc rules out are refused with their line") {
  // 2 mL loaded at an 8 mm gap starts as a disc of diameter 2 sqrt(V / (pi h0)) = 17.84 mm (arithmetic): the gap
  // only closes and the disc only widens, beyond the reading error (3 resolutions, at least 2%).
  spreadfit::io::test::TempDir dir;
  const std::string rig = "[sample]\nid = \"X1\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"squeeze\"\nvolume = \"2 mL\"\n"
                          "load = \"500 g\"\ninitial_gap = \"8 mm\"\n[readings]\nfile = \"run.csv\"\n"
                          "resolution = \"0.1 mm\"\n";
  auto error_of = [&](const std::string& csv, const std::string& reading) -> std::string {
    dir.write("run.csv", csv);
    try {
      spreadfit::io::load_test_description(dir.write("t.toml", rig + "reading = \"" + reading + "\"\n"));
    } catch (const spreadfit::io::InputError& e) {
      return e.what();
    }
    return "";
  };
  SUBCASE("a gap above the initial gap") {
    const std::string what = error_of("time [s],gap [mm]\n1,7.9\n2,9.5\n", "gap");
    CHECK(what.find("run.csv:3") != std::string::npos);
    CHECK(what.find("gap the load is applied at") != std::string::npos);
  }
  SUBCASE("a gap at the initial gap within the reading error is kept") {
    CHECK(error_of("time [s],gap [mm]\n0,8.1\n2,6.5\n", "gap").empty());
  }
  SUBCASE("a diameter below the starting disc") {
    const std::string what = error_of("time [s],diameter [mm]\n1,16.0\n2,19.5\n", "diameter");
    CHECK(what.find("run.csv:2") != std::string::npos);
    CHECK(what.find("smaller than the disc the sample starts as (0.01784 m") != std::string::npos);
  }
  SUBCASE("a diameter at the starting disc within the reading error is kept") {
    CHECK(error_of("time [s],diameter [mm]\n0,17.6\n2,19.5\n", "diameter").empty());
  }
}

TEST_CASE("io: a front that recedes beyond the reading error is kept with a warning citing its line") {
  // A spreading front only advances (common practice, no source): 45 mm typed as 4.5 falls 40 mm below the
  // reading before it, far beyond six resolutions (3 mm); noise of a few tenths of a millimetre does not warn.
  spreadfit::io::test::TempDir dir;
  const std::string toml = "[sample]\nid = \"X1\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"channel\"\nwidth = \"5 cm\"\n"
                           "reservoir_length = \"5 cm\"\nvolume = \"100 mL\"\n[readings]\nfile = \"run.csv\"\n"
                           "resolution = \"0.5 mm\"\n";
  dir.write("run.csv", "time [s],front [mm]\n2,30.0\n4,44.6\n6,4.5\n8,46.1\n");
  const auto slip = spreadfit::io::load_test_description(dir.write("t.toml", toml));
  REQUIRE(slip.warnings.size() == 1);
  CHECK(slip.warnings[0].find("run.csv:4") != std::string::npos);
  CHECK(slip.warnings[0].find("does not recede") != std::string::npos);
  dir.write("run.csv", "time [s],front [mm]\n2,30.0\n4,44.6\n6,44.1\n8,44.9\n");
  CHECK(spreadfit::io::load_test_description(dir.write("t.toml", toml)).warnings.empty());
}
