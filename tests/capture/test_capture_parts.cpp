// The capture's parts on their own: the board homography against a pinhole camera, frame timing, the release
// detector, the area sum with fractional edges.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <opencv2/imgproc.hpp>
#include <opencv2/videoio.hpp>
#include <vector>

#include "src/capture/board_homography.hpp"
#include "src/capture/measurement.hpp"
#include "src/capture/video_reader.hpp"
#include "tests/capture/synthetic_video.hpp"
#include "tests/io/io_test_support.hpp"

namespace {

using namespace spreadfit::capture;

cv::Point2d apply(const cv::Matx33d& h, cv::Point2d p) {
  const cv::Vec3d v = h * cv::Vec3d(p.x, p.y, 1);
  return {v[0] / v[2], v[1] / v[2]};
}

}  // namespace

TEST_CASE("capture: the board's homography measures the plane as the pinhole camera that took the picture") {
  // The picture: one frame of a rendered scene, a 9x6 board of 8 mm squares seen by a pinhole camera
  // x = K [r1 r2 t] X (Hartley & Zisserman 2004, eq. 6.1 and sec. 8.1.1) tilted 0 to 15 degrees. Lengths and
  // areas on the plane recovered from the image must match the plane's own.
  for (double tilt : {0.0, 8.0, 15.0}) {
    CAPTURE(tilt);
    spreadfit::io::test::TempDir dir;
    test::SceneOptions o;
    o.tilt_deg = tilt;
    o.duration = 1.0 / o.fps;
    o.ring = false;
    o.noise = 2;
    o.fourcc = "MJPG";
    o.spread = [](double) { return 50.0; };
    const auto file = dir.path() / "board.avi";
    test::render_video(file, o);
    VideoReader video(file);
    REQUIRE(video.grab());
    cv::Mat gray;
    cv::cvtColor(video.retrieve(), gray, cv::COLOR_BGR2GRAY);
    const auto board = find_board(gray, o.board_columns, o.board_rows, o.square_mm);
    REQUIRE(board.has_value());
    const cv::Matx33d camera = test::plane_to_image(o);
    // Pairs of plane points across the view, through the camera into the image and back through the board's map.
    double worst_length = 0, worst_area = 0;
    for (double x = -100; x <= 100; x += 25)
      for (double y = -60; y <= 60; y += 30) {
        const cv::Point2d a(x, y), b(x + 40, y + 15);
        const double measured = cv::norm(board->map.to_plane(apply(camera, a)) - board->map.to_plane(apply(camera, b)));
        worst_length = std::max(worst_length, std::abs(measured - cv::norm(a - b)));
        // Area of one image pixel on the plane, against the camera's: |det| of the inverse map's Jacobian.
        const cv::Point2d pixel = apply(camera, a);
        const cv::Matx33d inverse = camera.inv();
        const double eps = 0.5;
        const cv::Point2d dx =
            (apply(inverse, pixel + cv::Point2d(eps, 0)) - apply(inverse, pixel - cv::Point2d(eps, 0))) / (2 * eps);
        const cv::Point2d dy =
            (apply(inverse, pixel + cv::Point2d(0, eps)) - apply(inverse, pixel - cv::Point2d(0, eps))) / (2 * eps);
        const double true_area = std::abs(dx.x * dy.y - dx.y * dy.x);
        worst_area = std::max(worst_area, std::abs(board->map.pixel_area(pixel) / true_area - 1));
      }
    MESSAGE("worst length error " << worst_length << " mm over 40 mm; worst pixel-area error " << worst_area
                                  << "; corner RMS " << board->rms_mm << " mm");
    // Tolerances: a tenth of a pixel on the corners is about 0.04 mm here; over the view, a little more.
    CHECK(worst_length <= 0.15);
    CHECK(worst_area <= 0.01);
    CHECK(board->rms_mm <= 0.1);
  }
}

TEST_CASE("capture: frame timing counts the frames a variable-rate video dropped") {
  // 30 frames/s with jitter of a tenth of a frame, two frames missing after 1 s and one after 2 s.
  std::vector<double> times;
  for (int i = 0; i < 90; ++i) {
    if (i == 31 || i == 32 || i == 62) continue;
    times.push_back(i / 30.0 + ((i * 7) % 3 - 1) * 0.0033);
  }
  const FrameTiming t = analyse_timing(times);
  CHECK(t.median_interval == doctest::Approx(1 / 30.0).epsilon(0.15));
  CHECK(t.dropped == 3);
  CHECK(t.longest_gap == doctest::Approx(3 / 30.0).epsilon(0.15));
  SUBCASE("a steady video drops none") {
    std::vector<double> steady;
    for (int i = 0; i < 60; ++i) steady.push_back(i / 25.0);
    CHECK(analyse_timing(steady).dropped == 0);
  }
}

TEST_CASE("capture: the area with fractional edges is exact for a blurred disc") {
  // A disc of radius 40.3 px drawn with its exact pixel coverage, blurred (which keeps the integral), on a plane
  // of 0.25 mm^2 pixels: the area pi r^2 to a fraction of a pixel's width along the outline.
  const double r = 40.3;
  cv::Mat coverage(120, 120, CV_32F);
  for (int y = 0; y < coverage.rows; ++y)
    for (int x = 0; x < coverage.cols; ++x)
      coverage.at<float>(y, x) = static_cast<float>(std::clamp(r - std::hypot(x - 60.2, y - 59.7) + 0.5, 0.0, 1.0));
  cv::GaussianBlur(coverage, coverage, cv::Size(), 1.0);
  const cv::Mat mask = coverage > 0.5;
  const cv::Mat area(coverage.size(), CV_32F, cv::Scalar(0.25));
  const double measured = outline_area(mask, coverage, area);
  const double exact = std::numbers::pi * r * r * 0.25;
  INFO("measured " << measured << " mm^2, exact " << exact << " mm^2");
  // A tenth of a pixel along the outline (2 pi r x 0.1 px x 0.25 mm^2/px) bounds the error.
  CHECK(std::abs(measured - exact) <= 2 * std::numbers::pi * r * 0.1 * 0.25);
  CHECK(equivalent_diameter(std::numbers::pi * 25.0) == doctest::Approx(10.0));
}
