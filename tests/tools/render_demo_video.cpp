// Renders the demo's video batch (invented scenario): LT3-2213, a lotion of the fictional Larkspur Cream Lab on
// the plate (3 cm ring, 60 mL), filmed from above with a 9x6 board of 8 mm squares beside it. The spread is the
// project's forward model for an invented Herschel-Bulkley lotion (12.5 Pa, 6 Pa.s^n, n 0.5), drawn by the test
// renderer (tests/capture/synthetic_video.hpp). Demo data only, never a check value.
// Usage: spreadfit_demo_video OUT.mp4
#include <cstdio>
#include <exception>

#include "tests/capture/capture_test_support.hpp"
#include "tests/capture/synthetic_video.hpp"

int main(int argc, char** argv) {
  if (argc != 2) {
    std::fprintf(stderr, "usage: spreadfit_demo_video OUT.mp4\n");
    return 2;
  }
  try {
    using namespace spreadfit;
    TestSetup setup;
    setup.rig = PlateRig{0.03, 6e-5};
    setup.density = 980;
    setup.reading = Reading::Diameter;
    const capture::test::TruthCurve truth(setup, Material{12.5, 6.0, 0.5}, 50.0);
    capture::test::SceneOptions o;
    o.spread = truth.function();
    o.ring_radius_mm = 30;
    o.duration = 43;
    o.release = 2.37;
    o.view_mm = 270;
    o.board_origin_mm = {-128, -78};
    o.sample_centre_mm = {30, 8};
    o.plate_bgr = {95, 80, 70};      // a slate-blue plate
    o.sample_bgr = {205, 228, 240};  // a cream-white lotion
    o.seed = 2213;
    capture::test::render_video(argv[1], o);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "spreadfit_demo_video: %s\n", e.what());
    return 3;
  }
  return 0;
}
