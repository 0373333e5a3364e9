// The [capture] table of a test description: read into SI only when asked, with defaults, and left alone by the
// other commands. Sample ids and files are invented. Factors: SI Brochure, 9th ed. (2019), Tables 7 and 8.
#include <doctest/doctest.h>

#include <string>

#include "src/io/description_file.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::io::CaptureSettings;
using spreadfit::io::load_test_description;
using spreadfit::io::LoadOptions;
using spreadfit::io::test::input_error_of;
using spreadfit::io::test::TempDir;

namespace {

const std::string kPlate =
    "[sample]\nid = \"DEMO-0002\"\ndensity = \"1.10 g/mL\"\n"
    "[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\nvolume = \"60 mL\"\n"
    "[readings]\nfile = \"out/DEMO-0002.csv\"\n";

LoadOptions for_capture() {
  LoadOptions o;
  o.read_readings_files = false;
  o.read_capture = true;
  return o;
}

}  // namespace

TEST_CASE("capture table: every key into SI, the video and the readings file resolved beside the TOML") {
  TempDir dir;
  const auto toml = dir.write("tests/DEMO-0002.toml",
                              kPlate +
                                  "[capture]\nvideo = \"clips/DEMO-0002.mp4\"\nscale = \"board\"\nboard = \"9x6\"\n"
                                  "square = \"10 mm\"\nrelease = \"2400 ms\"\ntimes = [\"1 s\", 2, \"0.1 min\"]\n");
  const auto d = load_test_description(toml, for_capture());
  REQUIRE(d.capture.has_value());
  const CaptureSettings& c = *d.capture;
  CHECK(c.video == (dir.path() / "tests/clips/DEMO-0002.mp4").lexically_normal());
  CHECK(c.video_as_written == "clips/DEMO-0002.mp4");
  CHECK(c.video_line == 11);
  CHECK(c.scale == CaptureSettings::Scale::Board);
  CHECK(c.board_columns == 9);
  CHECK(c.board_rows == 6);
  CHECK(c.square == doctest::Approx(0.010));  // 10 mm
  REQUIRE(c.release.has_value());
  CHECK(*c.release == doctest::Approx(2.4));  // 2400 ms
  REQUIRE(c.times.size() == 3);
  CHECK(c.times[2] == doctest::Approx(6.0));  // 0.1 min = 6 s
  // The readings file is listed, not opened: capture writes it.
  REQUIRE(d.readings_files.size() == 1);
  CHECK(d.readings_files[0] == (dir.path() / "tests/out/DEMO-0002.csv").lexically_normal());
  CHECK(d.series.empty());
}

TEST_CASE("capture table: defaults are board scale, auto release and a reading every second") {
  TempDir dir;
  const auto toml =
      dir.write("DEMO-0002.toml", kPlate + "[capture]\nvideo = \"a.mp4\"\nboard = \"7x5\"\nsquare = \"12 mm\"\n");
  const auto d = load_test_description(toml, for_capture());
  CHECK(d.capture->scale == CaptureSettings::Scale::Board);
  CHECK_FALSE(d.capture->release.has_value());
  CHECK(d.capture->every == 1.0);
  CHECK(d.capture->times.empty());
  SUBCASE("fit and simulate accept the table and do not read it") {
    const auto toml2 = dir.write("DEMO-0003.toml", kPlate + "[capture]\nvidoe = \"typo, unread\"\n");
    LoadOptions no_files;
    no_files.read_readings_files = false;
    CHECK_FALSE(load_test_description(toml2, no_files).capture.has_value());
  }
}

TEST_CASE("capture table: refusals name the line and the field") {
  TempDir dir;
  auto error = [&](const std::string& capture) {
    const auto toml = dir.write("DEMO-0002.toml", kPlate + "[capture]\n" + capture);
    return std::string(input_error_of([&] { load_test_description(toml, for_capture()); }).what());
  };
  const std::string at = (dir.path() / "DEMO-0002.toml").string();
  CHECK(error("video = \"a.mp4\"\nscale = \"ring\"\nsquare = \"1 cm\"\n") ==
        at + ":13: capture.square: applies to scale = 'board' only (this test's scale is 'ring')");
  CHECK(error("video = \"a.mp4\"\nboard = \"9x6\"\n") ==
        at + ":10: capture.square: missing required key in [capture] (expected a length, such as \"2.9 cm\" or a "
             "number in m: the side of one board square)");
  CHECK(error("video = \"a.mp4\"\nboard = \"2x6\"\nsquare = \"1 cm\"\n")
            .find("capture.board: '2x6' is not a board size (expected inner corners as columns x rows, each 3 to 60") !=
        std::string::npos);
  CHECK(error("video = \"a.mp4\"\nscale = \"ring\"\nevery = \"0 s\"\n").find(":13: capture.every: ") !=
        std::string::npos);
  CHECK(error("video = \"a.mp4\"\nscale = \"ring\"\ntimes = [2, 1]\n") ==
        at + ":13: capture.times: '1' is not after the time before it (expected times strictly increasing)");
  CHECK(error("scale = \"ring\"\n") ==
        at + ":10: capture.video: missing required key in [capture] (expected the video's file name, such as "
             "\"TS12-0412.mp4\")");
}
