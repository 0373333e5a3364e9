// Test videos rendered here with OpenCV from a known spread curve: a top view of a plate (or a channel) with a
// printed chessboard lying beside the sample, seen by a pinhole camera tilted by a known angle (Hartley &
// Zisserman 2004, Multiple View Geometry, eq. 6.1 and sec. 8.1.1: x = K [r1 r2 t] X for points X on the plane
// z = 0), with a lighting gradient, exposure drift, blur, sensor noise and a lossy codec (H.264 or MPEG-4).
//
// The sample's outline is drawn exactly: each plane pixel takes the fraction of it the disc (or the rectangle past
// the gate) covers, and the plane is rendered at twice the video's resolution and area-averaged down, so the truth
// is the curve given, not a drawing of it. The curve comes from the caller: the project's forward model
// (models/forward.hpp, itself verified against Huppert 1982 and the similarity solutions in tests/models) or a
// closed form.
#pragma once

#include <cmath>
#include <filesystem>
#include <functional>
#include <numbers>
#include <opencv2/core.hpp>
#include <opencv2/imgproc.hpp>
#include <opencv2/videoio.hpp>
#include <stdexcept>
#include <string>
#include <vector>

namespace spreadfit::capture::test {

struct SceneOptions {
  int width = 640, height = 480;  ///< video frame [px]
  double fps = 30;
  double duration = 6;            ///< [s]
  double release = 1.01;          ///< [s] video time of the release (between two frames)
  bool channel = false;           ///< channel scene instead of a plate
  double tilt_deg = 12;           ///< camera tilt about the image's x axis
  double roll_deg = 8;            ///< camera turn about its optical axis
  double view_mm = 250;           ///< plane width seen at the image's centre row
  double noise = 3;               ///< [grey levels] sensor noise standard deviation
  double blur = 0.8;              ///< [px] Gaussian blur standard deviation (focus)
  bool lighting_gradient = true;  ///< light falls off across the frame (factor 0.7 to 1.1)
  double exposure_drift = 0.03;   ///< relative exposure swing over the video
  bool board = true;
  int board_columns = 9, board_rows = 6;  ///< inner corners
  double square_mm = 8;
  cv::Point2d board_origin_mm{-118, -70};  ///< board's top-left outer corner on the plane (sample at 0, 0)
  bool ring = true;            ///< plate: a dark ring around the sample before the release, lifted away after
  bool gate = true;            ///< channel: a dark gate in front of the sample before the release, lifted away
  double ring_radius_mm = 30;  ///< plate: the sample's radius at the release
  double ring_wall_mm = 3;
  double stretch = 1.0;  ///< plate: the outline's x axis times this (an uneven spread), area kept
  cv::Point2d sample_centre_mm{20, 0};
  double channel_width_mm = 50, reservoir_mm = 50;  ///< channel
  cv::Vec3d plate_bgr{215, 222, 225};               ///< plate (or channel floor) colour
  cv::Vec3d sample_bgr{40, 70, 185};                ///< sauce
  cv::Vec3d ring_bgr{70, 70, 75};
  double glare = 0;             ///< peak extra brightness of a glare spot on the sample (grey levels)
  std::string fourcc = "avc1";  ///< avc1 (H.264) | mp4v | MJPG
  int seed = 7;
  std::vector<double> frame_times;  ///< [s] each frame's content time when not empty (a variable rate; the file
                                    ///< itself is written at `fps`: retime it, vfr_remux.hpp, to match)
  bool supersample = true;          ///< render at twice the size and area-average down (false: faster, for the bench)
  /// Diameter (plate) or front past the gate (channel) [mm] at a time since the release [s], t >= 0.
  std::function<double(double)> spread;
};

/// The camera of a scene: plane (mm) -> image (px).
inline cv::Matx33d plane_to_image(const SceneOptions& o) {
  const double f = o.width * 400.0 / o.view_mm;  // the camera 400 mm above the plane's centre
  const cv::Matx33d k(f, 0, o.width / 2.0, 0, f, o.height / 2.0, 0, 0, 1);
  const double a = o.tilt_deg * std::numbers::pi / 180, b = o.roll_deg * std::numbers::pi / 180;
  const cv::Matx33d rx(1, 0, 0, 0, std::cos(a), -std::sin(a), 0, std::sin(a), std::cos(a));
  const cv::Matx33d rz(std::cos(b), -std::sin(b), 0, std::sin(b), std::cos(b), 0, 0, 0, 1);
  const cv::Matx33d r = rx * rz;
  const cv::Vec3d t(0, 0, 400);
  // [r1 r2 t]
  const cv::Matx33d rt(r(0, 0), r(0, 1), t[0], r(1, 0), r(1, 1), t[1], r(2, 0), r(2, 1), t[2]);
  return k * rt;
}

/// Renders the video; returns the video times of its frames.
inline std::vector<double> render_video(const std::filesystem::path& file, const SceneOptions& o) {
  const int ext = cv::VideoWriter::fourcc(o.fourcc[0], o.fourcc[1], o.fourcc[2], o.fourcc[3]);
  cv::VideoWriter writer(file.string(), cv::CAP_FFMPEG, ext, o.fps, cv::Size(o.width, o.height));
  if (!writer.isOpened()) throw std::runtime_error("cannot open a video writer for " + file.string());
  // The plane texture: 4 px/mm over a region that covers the view, then warped at twice the video's size.
  const double ppmm = 4;
  const cv::Rect2d extent(-200, -170, 400, 340);  // mm
  const cv::Size tex_size(static_cast<int>(extent.width * ppmm), static_cast<int>(extent.height * ppmm));
  auto tex = [&](cv::Point2d mm) { return cv::Point2d((mm.x - extent.x) * ppmm, (mm.y - extent.y) * ppmm); };
  cv::Mat base(tex_size, CV_32FC3, cv::Scalar(o.plate_bgr[0], o.plate_bgr[1], o.plate_bgr[2]));
  if (o.channel) {  // walls either side of the channel floor, an end wall behind the reservoir
    const double w = o.channel_width_mm, x0 = o.sample_centre_mm.x - 80;
    const cv::Scalar wall(120, 125, 130);
    cv::rectangle(base, tex({x0 - 10, -w / 2 - 8}), tex({x0 + 400, -w / 2}), wall, cv::FILLED);
    cv::rectangle(base, tex({x0 - 10, w / 2}), tex({x0 + 400, w / 2 + 8}), wall, cv::FILLED);
    cv::rectangle(base, tex({x0 - 10, -w / 2 - 8}), tex({x0, w / 2 + 8}), wall, cv::FILLED);
  }
  if (o.board) {
    const double s = o.square_mm;
    const int cols = o.board_columns + 1, rows = o.board_rows + 1;
    cv::rectangle(base, tex(o.board_origin_mm - cv::Point2d(s / 2, s / 2)),
                  tex(o.board_origin_mm + cv::Point2d(cols * s + s / 2, rows * s + s / 2)), cv::Scalar(250, 250, 250),
                  cv::FILLED);
    for (int r = 0; r < rows; ++r)
      for (int c = 0; c < cols; ++c)
        if ((r + c) % 2 == 0)
          cv::rectangle(base, tex(o.board_origin_mm + cv::Point2d(c * s, r * s)),
                        tex(o.board_origin_mm + cv::Point2d((c + 1) * s, (r + 1) * s)) - cv::Point2d(1, 1),
                        cv::Scalar(25, 25, 25), cv::FILLED);
  }
  const cv::Matx33d to_tex(1 / ppmm, 0, extent.x, 0, 1 / ppmm, extent.y, 0, 0, 1);  // texture px -> mm
  const double ss = o.supersample ? 2.0 : 1.0;
  const cv::Matx33d twice(ss, 0, 0.5 * (ss - 1), 0, ss, 0.5 * (ss - 1), 0, 0, 1);  // video px -> ss x px (centres)
  const cv::Matx33d warp = twice * plane_to_image(o) * to_tex;
  cv::Mat light(o.height, o.width, CV_32FC3);
  for (int y = 0; y < o.height; ++y)
    for (int x = 0; x < o.width; ++x) {
      const double g = o.lighting_gradient ? 0.7 + 0.4 * x / o.width - 0.08 * y / o.height : 1.0;
      light.at<cv::Vec3f>(y, x) = cv::Vec3f(float(g), float(g), float(g));
    }
  cv::RNG rng(static_cast<uint64_t>(o.seed));
  std::vector<double> times;
  const int frames = o.frame_times.empty() ? static_cast<int>(std::lround(o.duration * o.fps))
                                           : static_cast<int>(o.frame_times.size());
  const double w = o.channel_width_mm;
  const double x_gate = o.sample_centre_mm.x - 80 + o.reservoir_mm;
  for (int i = 0; i < frames; ++i) {
    const double t = o.frame_times.empty() ? i / o.fps : o.frame_times[static_cast<std::size_t>(i)];
    const double since = t - o.release;
    times.push_back(t);
    cv::Mat plane = base.clone();
    const double value = o.spread(std::max(since, 0.0));
    const cv::Vec3f sample(float(o.sample_bgr[0]), float(o.sample_bgr[1]), float(o.sample_bgr[2]));
    if (!o.channel) {
      // Disc of the diameter `value`, stretched along x by `stretch` and squeezed along y (same area).
      const double r = value / 2, sx = o.stretch, sy = 1 / o.stretch;
      const cv::Point2d c = o.sample_centre_mm;
      const cv::Point2d lo = tex(c - cv::Point2d(r * sx + 2, r * sy + 2)),
                        hi = tex(c + cv::Point2d(r * sx + 2, r * sy + 2));
      for (int y = std::max(0, int(lo.y)); y < std::min(tex_size.height, int(hi.y) + 1); ++y)
        for (int x = std::max(0, int(lo.x)); x < std::min(tex_size.width, int(hi.x) + 1); ++x) {
          const double mx = (x + 0.5) / ppmm + extent.x - c.x, my = (y + 0.5) / ppmm + extent.y - c.y;
          // distance to the outline, in texture px, along the radius (exact for a circle, close for a stretch)
          const double rho = std::hypot(mx / sx, my / sy);
          const double scale = rho > 0 ? std::hypot(mx, my) / rho : 1.0;
          const double cover = std::clamp((r - rho) * scale * ppmm + 0.5, 0.0, 1.0);
          if (cover <= 0) continue;
          cv::Vec3f& p = plane.at<cv::Vec3f>(y, x);
          cv::Vec3f s = sample;
          if (o.glare > 0) {
            const double g = o.glare * std::exp(-(std::pow(mx + 0.3 * r, 2) + std::pow(my + 0.3 * r, 2)) / 150.0);
            s += cv::Vec3f(float(g), float(g), float(g));
          }
          p = p * float(1 - cover) + s * float(cover);
        }
      if (o.ring) {  // before the release around the sample; after, lifted away towards -y at 300 mm/s
        // Drawn exactly like the disc: each pixel takes the fraction of it the annulus covers.
        const cv::Point2d rc = c + cv::Point2d(0, since > 0 ? -300 * since : 0);
        const double inner = o.ring_radius_mm, outer = o.ring_radius_mm + o.ring_wall_mm;
        const cv::Vec3f ring(float(o.ring_bgr[0]), float(o.ring_bgr[1]), float(o.ring_bgr[2]));
        const cv::Point2d rlo = tex(rc - cv::Point2d(outer + 1, outer + 1)),
                          rhi = tex(rc + cv::Point2d(outer + 1, outer + 1));
        for (int y = std::max(0, int(rlo.y)); y < std::min(tex_size.height, int(rhi.y) + 1); ++y)
          for (int x = std::max(0, int(rlo.x)); x < std::min(tex_size.width, int(rhi.x) + 1); ++x) {
            const double d = std::hypot((x + 0.5) / ppmm + extent.x - rc.x, (y + 0.5) / ppmm + extent.y - rc.y);
            const double cover =
                std::clamp((d - inner) * ppmm + 0.5, 0.0, 1.0) * std::clamp((outer - d) * ppmm + 0.5, 0.0, 1.0);
            if (cover <= 0) continue;
            cv::Vec3f& p = plane.at<cv::Vec3f>(y, x);
            p = p * float(1 - cover) + ring * float(cover);
          }
      }
    } else {
      // Block behind the gate, then a straight front `value` past it, across the channel's width.
      const double x0 = o.sample_centre_mm.x - 80, front = x_gate + value;
      for (int y = int(tex({0, -w / 2}).y); y < int(tex({0, w / 2}).y); ++y)
        for (int x = int(tex({x0, 0}).x); x < std::min(tex_size.width, int(tex({front + 1, 0}).x) + 1); ++x) {
          const double mx = (x + 0.5) / ppmm + extent.x;
          const double cover = std::clamp((front - mx) * ppmm + 0.5, 0.0, 1.0);
          if (cover <= 0) continue;
          cv::Vec3f& p = plane.at<cv::Vec3f>(y, x);
          p = p * float(1 - cover) + sample * float(cover);
        }
      // The gate: a dark bar across the channel at the reservoir's end, lifted away (towards -y) at release.
      const double lift = since > 0 ? 300 * since : 0;
      if (o.gate)
        cv::rectangle(plane, tex({x_gate, -w / 2 - 12 - lift}), tex({x_gate + 3, w / 2 + 12 - lift}),
                      cv::Scalar(o.ring_bgr[0], o.ring_bgr[1], o.ring_bgr[2]), cv::FILLED);
    }
    cv::Mat big, frame;
    const int sw = static_cast<int>(ss) * o.width, sh = static_cast<int>(ss) * o.height;
    cv::warpPerspective(plane, big, cv::Mat(warp), cv::Size(sw, sh), cv::INTER_LINEAR, cv::BORDER_CONSTANT,
                        cv::Scalar(60, 80, 100));
    if (o.supersample)
      cv::resize(big, frame, cv::Size(o.width, o.height), 0, 0, cv::INTER_AREA);
    else
      frame = big;
    const double exposure = 1 + o.exposure_drift * std::sin(2 * std::numbers::pi * t / o.duration);
    frame = frame.mul(light) * exposure;
    if (o.blur > 0) cv::GaussianBlur(frame, frame, cv::Size(), o.blur);
    cv::Mat noise(frame.size(), CV_32FC3);
    rng.fill(noise, cv::RNG::NORMAL, 0, o.noise);
    frame += noise;
    cv::Mat out;
    frame.convertTo(out, CV_8UC3);
    writer.write(out);
  }
  return times;
}

}  // namespace spreadfit::capture::test
