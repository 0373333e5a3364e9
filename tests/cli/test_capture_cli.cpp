// `spreadfit capture` end to end: videos rendered here from a known curve (tests/capture/synthetic_video.hpp),
// captured by the binary, and the readings fitted; every bad input and every thing a video can fail to show.
#include <doctest/doctest.h>
#include <fmt/format.h>

#include <cmath>
#include <nlohmann/json.hpp>
#include <string>

#include "tests/capture/capture_test_support.hpp"
#include "tests/capture/synthetic_video.hpp"
#include "tests/cli/cli_test_support.hpp"

namespace {

using namespace spreadfit;
namespace ct = spreadfit::capture::test;

/// A plate test description whose [capture] table is `capture` (video plate.mp4 unless it says otherwise).
std::string plate_toml(const std::string& capture, const std::string& readings = "file = \"CAP-1.csv\"") {
  return fmt::format(R"([sample]
id = "CAP-1"
density = "1.1 g/mL"
[rig]
kind = "plate"
ring_radius = "25 mm"
volume = "60 mL"
[readings]
{}
resolution = "0.2 mm"
[fit]
model = "bingham"
[capture]
{}
)",
                     readings, capture);
}

const char* const kBoard = "video = \"plate.mp4\"\nboard = \"9x6\"\nsquare = \"8 mm\"\n";

/// A short plate video (2.5 s at 15 frames/s) of the Bingham paste below, with the scene's changes applied.
ct::SceneOptions short_scene() {
  static const ct::TruthCurve truth(ct::plate_test_setup(), Material{30.0, 20.0, 1.0}, 30.0);
  ct::SceneOptions o;
  o.spread = truth.function();
  o.ring_radius_mm = 25;
  o.fps = 15;
  o.duration = 2.5;
  o.release = 1.03;
  return o;
}

struct Captured {
  Run run;
  bool csv_written = false;
  std::string csv;
};

Captured capture_with(const TempDir& dir, const std::string& toml, const ct::SceneOptions* scene,
                      const std::string& extra = "") {
  if (scene) ct::render_video(dir.path() / "plate.mp4", *scene);
  const auto test = dir.write("CAP-1.toml", toml);
  Captured c;
  c.run = run_spreadfit(dir, "capture " + quoted(test.string()) + " " + extra);
  c.csv_written = std::filesystem::exists(dir.path() / "CAP-1.csv");
  if (c.csv_written) c.csv = read_text(dir.path() / "CAP-1.csv");
  return c;
}

}  // namespace

TEST_CASE("capture cli: video -> capture -> fit recovers the material the video was rendered from") {
  // Bingham paste on the plate; the truth is the forward model (verified against Huppert 1982 and Roussel &
  // Coussot 2005 in tests/models), rendered with a 12 degree tilt, lighting, noise, blur and H.264.
  const TestSetup setup = ct::plate_test_setup();
  const Material truth_material{30.0, 20.0, 1.0};
  const ct::TruthCurve truth(setup, truth_material, 30.0);
  TempDir dir;
  ct::SceneOptions o;
  o.spread = truth.function();
  o.ring_radius_mm = 25;
  o.fps = 15;
  o.duration = 22;
  o.release = 1.03;
  ct::render_video(dir.path() / "plate.mp4", o);
  const auto test = dir.write("CAP-1.toml", plate_toml(kBoard));
  const Run captured =
      run_spreadfit(dir, "capture " + quoted(test.string()) + " --check " + quoted((dir.path() / "check").string()));
  INFO(captured.err);
  REQUIRE(captured.exit_code == 0);
  const std::string csv = read_text(dir.path() / "CAP-1.csv");
  CHECK(csv.find("time [s],diameter [mm]\n") != std::string::npos);
  CHECK(csv.find("# release: ") != std::string::npos);
  CHECK(csv.find("# scale: ") != std::string::npos);
  CHECK(csv.find("frames/s (container timestamps") != std::string::npos);
  // Audit images: six frames, the contact sheet and the curve, each a PNG.
  int pngs = 0;
  for (const auto& entry : std::filesystem::directory_iterator(dir.path() / "check")) {
    CHECK(entry.path().extension() == ".png");
    CHECK(read_text(entry.path()).substr(1, 3) == "PNG");
    ++pngs;
  }
  CHECK(pngs == 8);

  // The same test with the true readings at the captured times: the reference fit.
  std::string true_csv = "time [s],diameter [mm]\n";
  std::istringstream lines(csv);
  std::string line;
  double release_in_video = 0;
  while (std::getline(lines, line))
    if (line.rfind("# release: ", 0) == 0) release_in_video = std::stod(line.substr(11));
  lines = std::istringstream(csv);
  int rows = 0;
  while (std::getline(lines, line)) {
    if (line.empty() || line[0] == '#' || line[0] == 't') continue;
    const double t = std::stod(line.substr(0, line.find(',')));
    true_csv += fmt::format("{},{}\n", t, truth(t + release_in_video - o.release));
    ++rows;
  }
  CHECK(rows >= 20);
  dir.write("TRUE.csv", true_csv);
  const auto true_test = dir.write("TRUE.toml", plate_toml(kBoard, "file = \"TRUE.csv\""));

  auto fit = [&](const std::filesystem::path& toml, const std::string& name) {
    const auto json = dir.path() / (name + ".json");
    const Run r = run_spreadfit(dir, "fit " + quoted(toml.string()) + " --json " + quoted(json.string()));
    INFO(r.out << r.err);
    REQUIRE(r.exit_code == 0);
    auto j = nlohmann::json::parse(read_text(json));
    return j.is_array() ? j[0] : j;
  };
  const auto from_video = fit(test, "video");
  const auto from_truth = fit(true_test, "truth");
  for (const auto& [name, value] :
       {std::pair{"yield_stress", truth_material.yield_stress}, std::pair{"viscosity", truth_material.consistency}}) {
    const auto& v = from_video["parameters"][name];
    const auto& t = from_truth["parameters"][name];
    MESSAGE(std::string(name) << ": video " << v.dump() << ", true readings " << t.dump());
    // The material the video was rendered from lies within the 95% interval of the fit to the captured readings,
    // and the two fits agree within each other's intervals.
    CHECK(v["ci95"][0].get<double>() <= value);
    CHECK(v["ci95"][1].get<double>() >= value);
    CHECK(v["ci95"][0].get<double>() <= t["value"].get<double>());
    CHECK(v["ci95"][1].get<double>() >= t["value"].get<double>());
    CHECK(t["ci95"][0].get<double>() <= v["value"].get<double>());
    CHECK(t["ci95"][1].get<double>() >= v["value"].get<double>());
  }
}

TEST_CASE("capture cli: every bad input is one line, exit 2, and no readings file") {
  TempDir dir;
  SUBCASE("a missing video") {
    const Captured c =
        capture_with(dir, plate_toml("video = \"nothere.mp4\"\nboard = \"9x6\"\nsquare = \"8 mm\"\n"), nullptr);
    CHECK(c.run.exit_code == 2);
    CHECK(c.run.err.find("CAP-1.toml:14: capture.video: video 'nothere.mp4' not found") != std::string::npos);
    CHECK(!c.csv_written);
  }
  SUBCASE("a file that is no video") {
    dir.write("plate.mp4", "this is text, not a video\n");
    const Captured c = capture_with(dir, plate_toml(kBoard), nullptr);
    CHECK(c.run.exit_code == 2);
    CHECK(c.run.err.find("capture.video: 'plate.mp4' cannot be read as a video") != std::string::npos);
    CHECK(!c.csv_written);
  }
  SUBCASE("a mistyped [capture] key suggests the nearest") {
    const Captured c = capture_with(dir, plate_toml("vidoe = \"plate.mp4\"\n"), nullptr);
    CHECK(c.run.exit_code == 2);
    CHECK(c.run.err.find("capture.vidoe: unknown key 'vidoe' in [capture]; did you mean 'video'?") !=
          std::string::npos);
    CHECK(!c.csv_written);
  }
  SUBCASE("a mistyped scale, board size and release") {
    const Captured scale = capture_with(dir, plate_toml("video = \"plate.mp4\"\nscale = \"borad\"\n"), nullptr);
    CHECK(scale.run.err.find("capture.scale: unknown scale 'borad'; did you mean 'board'?") != std::string::npos);
    const Captured board =
        capture_with(dir, plate_toml("video = \"plate.mp4\"\nboard = \"9 by 6\"\nsquare = \"8 mm\"\n"), nullptr);
    CHECK(board.run.err.find("capture.board: '9 by 6' is not a board size") != std::string::npos);
    const Captured release = capture_with(dir, plate_toml(std::string(kBoard) + "release = \"atuo\"\n"), nullptr);
    CHECK(release.run.err.find("capture.release: unknown release 'atuo'; did you mean 'auto'?") != std::string::npos);
    for (const Captured* c : {&scale, &board, &release}) {
      CHECK(c->run.exit_code == 2);
      CHECK(!c->csv_written);
    }
  }
  SUBCASE("scale = channel on a plate, and every with times") {
    const Captured c = capture_with(dir, plate_toml("video = \"plate.mp4\"\nscale = \"channel\"\n"), nullptr);
    CHECK(c.run.exit_code == 2);
    CHECK(c.run.err.find("scale = 'channel' needs a channel rig") != std::string::npos);
    const Captured both =
        capture_with(dir, plate_toml(std::string(kBoard) + "every = \"1 s\"\ntimes = [1, 2]\n"), nullptr);
    CHECK(both.run.exit_code == 2);
    CHECK(both.run.err.find("capture.times: give every or times, not both") != std::string::npos);
  }
  SUBCASE("no readings file to write") {
    const Captured c = capture_with(dir, plate_toml(kBoard, "reading = \"diameter\""), nullptr);
    CHECK(c.run.exit_code == 2);
    CHECK(c.run.err.find("readings.file: no readings file to write") != std::string::npos);
  }
  SUBCASE("a release given after the video's end") {
    const ct::SceneOptions o = short_scene();
    const Captured c = capture_with(dir, plate_toml(std::string(kBoard) + "release = \"9 s\"\n"), &o);
    CHECK(c.run.exit_code == 2);
    CHECK(c.run.err.find("capture.release: 9.00 s is after the video's end") != std::string::npos);
    CHECK(!c.csv_written);
  }
  INFO(dir.path());
}

TEST_CASE("capture cli: what a video does not show is one line, exit 3, and no readings file") {
  TempDir dir;
  ct::SceneOptions o = short_scene();
  std::string expected;
  SUBCASE("no board in view") {
    o.board = false;
    expected = "plate.mp4: board not found";
  }
  SUBCASE("the sample the colour of the plate") {
    o.sample_bgr = o.plate_bgr;
    expected = "plate.mp4: sample not found";
  }
  SUBCASE("nothing moves") {
    o.ring = false;
    o.spread = [](double) { return 50.0; };
    expected = "plate.mp4: no release found: nothing moves in the video";
  }
  SUBCASE("moving from the first frame") {
    o.release = 0.1;
    expected = "plate.mp4: release not detectable: the video does not start still";
  }
  const Captured c = capture_with(dir, plate_toml(kBoard), &o);
  INFO(c.run.err);
  CHECK(c.run.exit_code == 3);
  CHECK(c.run.err.find(expected) != std::string::npos);
  CHECK(std::count(c.run.err.begin(), c.run.err.end(), '\n') == 1);
  CHECK(!c.csv_written);
}

TEST_CASE("capture cli: warnings in plain words, in the CSV and on stderr") {
  TempDir dir;
  ct::SceneOptions o = short_scene();
  std::string expected;
  SUBCASE("an uneven spread is not round") {
    o.stretch = 1.06;  // axes 1.06 / (1 / 1.06): 11% apart
    expected = "the outline is not round: its axes differ by 11%";
  }
  std::string capture = kBoard;
  SUBCASE("a spread that leaves the frame") {
    o.sample_centre_mm = {88, 0};
    capture += "every = \"0.2 s\"\n";
    expected = "the sample reached the frame's edge";
  }
  SUBCASE("glare on the sample") {
    o.glare = 400;
    expected = "glare: ";
  }
  SUBCASE("little contrast between sample and plate") {
    o.sample_bgr = o.plate_bgr - cv::Vec3d(9, 9, 9);
    expected = "low contrast: the sample differs from the plate by";
  }
  SUBCASE("a board whose outer squares leave the frame") {
    o.board_origin_mm = {-131, -70};
    expected = "the board is only partly seen";
  }
  const Captured c = capture_with(dir, plate_toml(capture), &o);
  INFO(c.run.err);
  REQUIRE(c.run.exit_code == 0);
  CHECK(c.run.err.find("spreadfit: warning: plate.mp4: " + expected) != std::string::npos);
  CHECK(c.csv.find("# warning: " + expected) != std::string::npos);
}
