// Bench section: `capture` of a 60 s, 1280x720, 30 frames/s plate video to readings every second (the speed
// target is at most 5 s on 2 cores), and the readings' error against the curve the video was rendered from.
// The video is rendered once (tests/capture/synthetic_video.hpp, about a minute) and kept next to the bench.
#pragma once

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <vector>

#include "src/capture/capture.hpp"
#include "tests/capture/capture_test_support.hpp"
#include "tests/capture/synthetic_video.hpp"

namespace spreadfit::bench {

inline void bench_capture(const std::filesystem::path& folder, bool quick) {
  namespace ct = spreadfit::capture::test;
  const TestSetup setup = ct::plate_test_setup();
  const ct::TruthCurve truth(setup, Material{30.0, 20.0, 1.0}, 65.0);
  ct::SceneOptions o;
  o.width = 1280;
  o.height = 720;
  o.fps = 30;
  o.duration = 61.5;
  o.release = 1.03;
  o.ring_radius_mm = 25;
  o.view_mm = 300;
  o.supersample = false;
  o.spread = truth.function();
  const auto video = folder / "bench-capture-1280x720-60s-v1.mp4";
  std::printf("\nCapture: 60 s plate video, 1280x720, 30 frames/s (H.264), readings every 1 s\n");
  if (!std::filesystem::exists(video)) {
    std::printf("  rendering %s once ...\n", video.string().c_str());
    std::fflush(stdout);
    ct::render_video(video, o);
  }
  io::CaptureSettings s;
  s.video = video;
  s.video_as_written = video.filename().string();
  s.board_columns = o.board_columns;
  s.board_rows = o.board_rows;
  s.square = o.square_mm / 1000;
  s.every = 1.0;
  std::vector<double> seconds;
  capture::CaptureResult r;
  for (int i = 0; i < (quick ? 1 : 3); ++i) {
    const auto a = std::chrono::steady_clock::now();
    r = capture::capture_readings(s, setup.rig);
    seconds.push_back(std::chrono::duration<double>(std::chrono::steady_clock::now() - a).count());
  }
  std::sort(seconds.begin(), seconds.end());
  std::vector<double> errors;
  for (const auto& reading : r.readings)
    errors.push_back(std::abs(reading.value - truth(reading.time + r.release_time - o.release)));
  std::sort(errors.begin(), errors.end());
  std::printf("  capture time (median of %zu): %.2f s for %d frames, %zu readings\n", seconds.size(),
              seconds[seconds.size() / 2], r.frames, r.readings.size());
  std::printf("  release found at %.4f s (rendered at %.4f s: %.2f frames off)\n", r.release_time, o.release,
              (r.release_time - o.release) * o.fps);
  if (!errors.empty())
    std::printf("  diameter error against the rendered curve: median %.3f mm, worst %.3f mm\n",
                errors[errors.size() / 2], errors.back());
}

}  // namespace spreadfit::bench
