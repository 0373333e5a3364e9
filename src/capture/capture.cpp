#include "src/capture/capture.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <opencv2/imgproc.hpp>
#include <optional>
#include <stdexcept>

#include "src/capture/board_homography.hpp"
#include "src/capture/capture_error.hpp"
#include "src/capture/frame_selection.hpp"
#include "src/capture/measurement.hpp"
#include "src/capture/segmentation.hpp"

namespace spreadfit::capture {

namespace {

using Scale = io::CaptureSettings::Scale;

double quantile(std::vector<double> v, double q) {
  if (v.empty()) return 0;
  const auto k = static_cast<std::size_t>(std::clamp(q, 0.0, 1.0) * static_cast<double>(v.size() - 1));
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(k), v.end());
  return v[k];
}

/// Every pixel of a frame-sized mask that is non-zero, subsampled to about `limit` points.
std::vector<cv::Point> mask_points(const cv::Mat& mask, std::size_t limit = 20000) {
  std::vector<cv::Point> points;
  cv::findNonZero(mask, points);
  if (points.size() <= limit) return points;
  std::vector<cv::Point> thinned;
  const std::size_t stride = points.size() / limit + 1;
  for (std::size_t i = 0; i < points.size(); i += stride) thinned.push_back(points[i]);
  return thinned;
}

cv::Rect grown(const cv::Rect& r, double fraction, int pixels, cv::Size frame) {
  const int dx = static_cast<int>(r.width * fraction) + pixels, dy = static_cast<int>(r.height * fraction) + pixels;
  return cv::Rect(r.x - dx, r.y - dy, r.width + 2 * dx, r.height + 2 * dy) & cv::Rect(cv::Point(0, 0), frame);
}

bool touches_frame_edge(const cv::Mat& roi_mask, const cv::Rect& roi, cv::Size frame) {
  auto any = [](const cv::Mat& m) { return cv::countNonZero(m) > 0; };
  return (roi.x == 0 && any(roi_mask.col(0))) || (roi.y == 0 && any(roi_mask.row(0))) ||
         (roi.x + roi.width == frame.width && any(roi_mask.col(roi_mask.cols - 1))) ||
         (roi.y + roi.height == frame.height && any(roi_mask.row(roi_mask.rows - 1)));
}

cv::Mat disc_kernel(int radius) {
  return cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(2 * radius + 1, 2 * radius + 1));
}

/// The scale from an outline known to be a circle of `radius_mm` on the plane, camera roughly square above:
/// the affine map that takes the outline's least-squares ellipse to that circle (a small tilt is corrected to
/// first order). The ellipse's shape comes from the outline; its size from the region's pixel count, since an
/// outline traced through the edge pixels' centres lies half a pixel inside the region's edge.
PlaneMap map_from_circle(const cv::Mat& region, double radius_mm) {
  const std::vector<cv::Point> outline = outer_contour(region);
  std::vector<cv::Point2f> points(outline.begin(), outline.end());
  cv::RotatedRect e = cv::fitEllipse(points);
  const double size = std::sqrt(cv::countNonZero(region) / (std::numbers::pi * 0.25 * e.size.width * e.size.height));
  e.size.width = static_cast<float>(e.size.width * size);
  e.size.height = static_cast<float>(e.size.height * size);
  const double angle = e.angle * std::numbers::pi / 180.0;
  const double ca = std::cos(angle), sa = std::sin(angle);
  const double sx = radius_mm / (0.5 * e.size.width), sy = radius_mm / (0.5 * e.size.height);
  // plane = S R(-angle) (p - c)
  const cv::Matx33d shift(1, 0, -e.center.x, 0, 1, -e.center.y, 0, 0, 1);
  const cv::Matx33d rotate(ca, sa, 0, -sa, ca, 0, 0, 0, 1);
  const cv::Matx33d scale(sx, 0, 0, 0, sy, 0, 0, 0, 1);
  PlaneMap map;
  map.image_to_plane = scale * rotate * shift;
  return map;
}

/// Mean of `values` over the pixels of `mask` in bins of `bin` mm of `along`, from `from` to `to` [mm].
std::vector<double> profile(const cv::Mat& values, const cv::Mat& along, const cv::Mat& mask, double from, double to,
                            double bin) {
  const auto bins = static_cast<std::size_t>(std::max(1.0, std::ceil((to - from) / bin)));
  std::vector<double> sum(bins, 0.0), count(bins, 0.0);
  for (int y = 0; y < values.rows; ++y) {
    const float* v = values.ptr<float>(y);
    const float* a = along.ptr<float>(y);
    const uchar* m = mask.ptr<uchar>(y);
    for (int x = 0; x < values.cols; ++x) {
      if (!m[x] || a[x] < from || a[x] >= to) continue;
      const auto i = static_cast<std::size_t>((a[x] - from) / bin);
      if (i < bins) sum[i] += v[x], count[i] += 1;
    }
  }
  std::vector<double> out(bins, 0.0);
  double last = 0;
  for (std::size_t i = 0; i < bins; ++i) out[i] = last = count[i] > 0 ? sum[i] / count[i] : last;
  return out;
}

/// [mm] the front past the gate line: along the middle of the channel, the mean sample fraction (within the
/// sample's outline, a few pixels grown) per bin along the axis, and the last place it falls through 1/2,
/// interpolated between bins (the blurred edge crosses 1/2 at the true edge).
double front_from_profile(const cv::Mat& fraction, const cv::Mat& mask, const cv::Mat& along, const cv::Mat& band,
                          double bin) {
  cv::Mat near;
  cv::dilate(mask, near, cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(7, 7)));
  cv::Mat clamped;
  cv::min(cv::max(fraction, 0.0), 1.0, clamped);
  clamped.setTo(0, near == 0);
  double far = 0;
  cv::minMaxLoc(along, nullptr, &far, nullptr, nullptr, near & band);
  if (far <= 0) return 0;
  const std::vector<double> p = profile(clamped, along, band, 0.0, far + 2 * bin, bin);
  for (std::size_t i = p.size(); i-- > 0;)
    if (p[i] >= 0.5) {
      const double next = i + 1 < p.size() ? p[i + 1] : 0.0;
      const double w = p[i] > next ? (p[i] - 0.5) / (p[i] - next) : 0.0;
      return (static_cast<double>(i) + 0.5 + w) * bin;
    }
  return 0;
}

/// The width of a long region of points across `normal`, from its middle part along `axis` (20% to 80%: away
/// from the gate, whose footprint may reach over the walls, and from the front): the range between the 1% and
/// 99% quantiles across, divided by 0.98 as for points spread evenly over the width. `middle` gets the centre.
double middle_width(const std::vector<cv::Vec2d>& points, cv::Vec2d axis, cv::Vec2d normal, double* middle = nullptr) {
  std::vector<double> along;
  for (const cv::Vec2d& p : points) along.push_back(axis.dot(p));
  const double low = quantile(along, 0.2), high = quantile(along, 0.8);
  std::vector<double> across;
  for (const cv::Vec2d& p : points) {
    const double a = axis.dot(p);
    if (a >= low && a <= high) across.push_back(normal.dot(p));
  }
  const double lo = quantile(across, 0.01), hi = quantile(across, 0.99);
  if (middle) *middle = 0.5 * (lo + hi);
  return (hi - lo) / 0.98;
}

/// [px] how far beyond the sample's outline at the release the plate was hidden (by the ring's wall, or the
/// outline's blur): the first distance where the still frames' median colour, around the whole outline, is the
/// plate's colour seen well outside (half a radius out), to within 6 noise deviations, plus 2 px for the blur.
int hidden_margin(const cv::Mat& background, const cv::Mat& holes, const cv::Rect& roi, double radius, double noise) {
  cv::Mat outside = holes(roi) == 0, distance;
  cv::distanceTransform(outside, distance, cv::DIST_L2, 3);
  const int far = std::max(6, static_cast<int>(0.5 * radius));
  std::vector<std::vector<double>> bands(static_cast<std::size_t>(far + 4) * 3);
  for (int y = 0; y < roi.height; ++y) {
    const float* d = distance.ptr<float>(y);
    const auto* b = background.ptr<cv::Vec3b>(roi.y + y) + roi.x;
    for (int x = 0; x < roi.width; ++x) {
      const int band = static_cast<int>(d[x]);
      if (band < 1 || band >= far + 4) continue;
      for (int c = 0; c < 3; ++c) bands[static_cast<std::size_t>(band * 3 + c)].push_back(b[x][c]);
    }
  }
  auto band_colour = [&](int band) {
    cv::Vec3d colour;
    for (int c = 0; c < 3; ++c) colour[c] = quantile(bands[static_cast<std::size_t>(band * 3 + c)], 0.5);
    return colour;
  };
  const cv::Vec3d plate = band_colour(far);
  const double tolerance = std::max(6.0 * noise, 4.0);
  int quiet = 0;
  for (int band = 1; band < far; ++band) {
    quiet = cv::norm(band_colour(band) - plate) <= tolerance ? quiet + 1 : 0;
    if (quiet == 2) return band + 2;
  }
  return far;
}

// --- the stages of capture_readings, in the order it calls them -----------------------------------------------

/// The decoding pass's facts about the video (size, frames, timing, release) into the result, with the notes a
/// reader of the readings needs: times from the nominal rate, frames dropped, reading times after the end.
void record_timing(const DecodedVideo& video, CaptureResult& result) {
  result.width = video.width;
  result.height = video.height;
  result.frames = static_cast<int>(video.times.size());
  result.nominal_rate = video.nominal_rate;
  result.timestamps_from_container = video.from_container;
  result.timing = analyse_timing(video.times);
  result.frame_rate = result.timing.median_interval > 0 ? 1.0 / result.timing.median_interval : 0;
  result.release_time = video.release;
  result.release_detected = video.detected;
  auto& warnings = result.warnings;
  if (!video.from_container)
    warnings.push_back("the video carries no usable frame timestamps: times come from its nominal frame rate");
  if (result.timing.dropped > 0)
    warnings.push_back(
        fmt::format("frames dropped: about {} missing (gaps up to {:.0f} ms between frames, {:.0f} ms "
                    "usual); readings keep their true times",
                    result.timing.dropped, 1000 * result.timing.longest_gap, 1000 * result.timing.median_interval));
  if (video.targets_missed > 0)
    warnings.push_back(
        fmt::format("{} of the reading times lie after the video's end and are left out", video.targets_missed));
}

/// The plate's look before the release and the sensor noise around it.
struct StillStart {
  cv::Mat background;  ///< per-pixel median of the still frames
  double noise = 0;    ///< [grey levels] sensor noise deviation (segmentation.hpp, noise_level)
};

/// The still start from up to 7 of the kept still frames, taken evenly from first to last, so that the median
/// sees the whole still start.
StillStart still_start(const DecodedVideo& video) {
  std::vector<cv::Mat> stills;
  const std::size_t use = std::min<std::size_t>(video.stills.size(), 7);
  for (std::size_t i = 0; i < use; ++i)
    stills.push_back(video.stills[(i * (video.stills.size() - 1)) / std::max<std::size_t>(use - 1, 1)].image);
  StillStart still;
  still.background = median_frame(stills);
  still.noise = noise_level(stills, still.background);
  return still;
}

/// Board scale: the plane map from the chessboard in the still start (board_homography.hpp), with the board's
/// corners for the audit images. A board not found, or only partly, is NotFoundInVideo naming what was seen;
/// a board at the frame's edge or far from flat is a warning.
PlaneMap board_map(const io::CaptureSettings& s, const cv::Mat& background, CaptureResult& result) {
  cv::Mat gray;
  cv::cvtColor(background, gray, cv::COLOR_BGR2GRAY);
  const double square_mm = s.square * 1000.0;
  const auto board = find_board(gray, s.board_columns, s.board_rows, square_mm);
  const std::string size = fmt::format("{}x{}", s.board_columns, s.board_rows);
  if (!board) {
    const std::string partial = find_partial_board(gray, s.board_columns, s.board_rows);
    throw NotFoundInVideo(
        partial.empty()
            ? fmt::format("board not found: no chessboard of {} inner corners in the frames before the release "
                          "(expected it flat beside the sample, all in view; is board = \"{}\" right?)",
                          size, size)
            : fmt::format("board not found whole: only {} of its {} inner corners are seen (the board is partly "
                          "out of view or covered; or is board = \"{}\" wrong?)",
                          partial, size, size));
  }
  result.reference.board_corners = board->corners;
  result.scale_source = fmt::format("board {}, {:g} mm squares, tilt corrected", size, square_mm);
  if (board->near_frame_edge)
    result.warnings.push_back(
        "the board is only partly seen: its outer squares reach the frame's edge (the scale holds "
        "while its inner corners are found, but keep it whole in view)");
  if (board->rms_mm > 0.1 * square_mm)
    result.warnings.push_back(
        fmt::format("the board's corners stray {:.2f} mm from a flat board: is it lying flat, and "
                    "is the lens strongly distorting?",
                    board->rms_mm));
  return board->map;
}

/// Where the sample is: what the last reading frame changed against the still start.
struct LateChange {
  cv::Mat late;           ///< the last reading frame
  double threshold = 0;   ///< [grey levels] a change above this is not noise
  cv::Mat change;         ///< frame: |d| of the late frame against the background
  cv::Mat changed;        ///< frame mask: the largest region changed by more than the threshold
  cv::Mat outline;        ///< frame mask: that region with its holes filled
  cv::Rect roi;           ///< the outline's box, grown: every ROI mask below covers it
  cv::Mat outline_grown;  ///< frame mask: the outline dilated, left out of each frame's exposure gain
};

/// The late frame's change: the sample's whole spread (and the ring or gate, gone since the still start). The
/// threshold is 5 times the noise of |d| over the three colours (sqrt(3) times one colour's), and at least 10
/// grey levels.
LateChange late_change(const DecodedVideo& video, const StillStart& still, cv::Size frame_size) {
  LateChange c;
  c.late = video.readings.back().image;
  const cv::Mat& late = c.late;
  const cv::Mat& background = still.background;
  c.threshold = std::max(5.0 * still.noise * std::sqrt(3.0), 10.0);
  c.change = magnitude(
      difference(late, background, exposure_gain(late, background, cv::Mat()), cv::Rect(cv::Point(0, 0), frame_size)));
  c.changed = largest_component(clean_mask(c.change > c.threshold, 2));
  if (cv::countNonZero(c.changed) < 30)
    throw NotFoundInVideo(
        fmt::format("sample not found: the frame at {} after the release looks like the frames "
                    "before it (expected the sample to spread, and to differ from the plate "
                    "in colour or brightness)",
                    seconds_text(video.readings.back().time - video.release)));
  c.outline = fill_holes(c.changed);
  c.roi = grown(cv::boundingRect(c.outline), 0.15, 12, frame_size);
  cv::dilate(c.outline, c.outline_grown, disc_kernel(std::max(8, c.roi.width / 20)));
  return c;
}

/// The masks and maps every reading is measured with.
struct SampleMasks {
  cv::Mat reference;        ///< the plate's look, filled in where the sample, ring or gate hid it
  cv::Mat always_sample;    ///< ROI mask: sample from the release on (plate: inside the ring)
  cv::Mat gate_band;        ///< ROI mask, channel: just past the gate line, where the gate stood
  cv::Mat counted;          ///< ROI mask, channel: past the gate line, inside the channel
  cv::Mat sample_interior;  ///< frame mask: pixels of the late frame surely sample, for the colour
  cv::Point seed;           ///< ROI pixel inside the sample
  cv::Mat along_map;        ///< channel, ROI: [mm] past the gate line
  cv::Mat centre_band;      ///< channel, ROI mask: the middle 30% of the width
  double profile_bin = 0.1;  ///< channel: [mm] bin of the profiles along the axis
};

/// Plate: the sample's outline at the release. Inside the spread the sample covered the plate before and after:
/// unchanged. That hole is the sample's outline at the release; the ring (if seen) changed around it.
cv::Mat hole_at_release(const LateChange& late) {
  cv::Mat holes = late.outline & ~late.changed;
  holes = largest_component(clean_mask(holes, 2));
  if (cv::countNonZero(holes) < 0.01 * cv::countNonZero(late.outline) || cv::countNonZero(holes) < 20)
    throw NotFoundInVideo(
        "sample not found before the release: the whole spread differs from the frames before it (expected "
        "the sample inside the ring to look the same before and after; did the camera or the lighting move?)");
  return holes;
}

/// Plate: the outline at the release placed where the change reaches half its level just outside (the ring's
/// inner edge, or the sample's own, through the blur), for the scale and the audit images.
cv::Mat half_level_hole(const cv::Mat& holes, const cv::Mat& late_change) {
  cv::Mat grown_hole, band;
  cv::dilate(holes, grown_hole, disc_kernel(4));
  band = grown_hole & ~holes;
  std::vector<double> levels;
  for (const cv::Point& p : mask_points(band, 5000)) levels.push_back(late_change.at<float>(p));
  cv::Mat below = (late_change < 0.5 * quantile(levels, 0.9)) & grown_hole;
  return fill_holes(components_touching(below, holes));
}

/// Plate: the ring scale maps the outline at the release onto a circle of the ring's radius; with a board, the
/// outline's size is compared with the ring's instead, and a difference beyond the tolerance is a warning.
void plate_scale(const io::CaptureSettings& s, const PlateRig& plate, const CaptureOptions& o, const cv::Mat& half_hole,
                 cv::Size frame_size, PlaneMap& map, CaptureResult& result) {
  if (s.scale == Scale::Ring) {
    map = map_from_circle(half_hole, plate.ring_radius * 1000.0);
    result.scale_source = fmt::format("ring, {:g} mm inner radius", plate.ring_radius * 1000.0);
  } else {
    const cv::Mat area_map = map.pixel_area_map(cv::Rect(cv::Point(0, 0), frame_size));
    const double d0 = equivalent_diameter(cv::mean(area_map, half_hole)[0] * cv::countNonZero(half_hole));
    const double ring_mm = 2000.0 * plate.ring_radius;
    if (std::abs(d0 - ring_mm) > o.size_tolerance * ring_mm)
      result.warnings.push_back(
          fmt::format("the sample's outline before the release is {:.1f} mm across, but [rig] "
                      "ring_radius gives {:.1f} mm: check the ring's size and the board's square",
                      d0, ring_mm));
  }
}

/// Plate: the outline at the release, the scale, and the masks. The reference is the background with the
/// plate filled in where the ring's wall (or the outline's blur) hid it; the sample inside the ring counts as
/// sample in every frame; its colour is taken inside the late change, clear of the hidden band.
SampleMasks plate_masks(const io::CaptureSettings& s, const PlateRig& plate, const CaptureOptions& o,
                        const StillStart& still, const LateChange& late, cv::Size frame_size, PlaneMap& map,
                        CaptureResult& result) {
  const cv::Mat holes = hole_at_release(late);
  const cv::Mat half_hole = half_level_hole(holes, late.change);
  result.reference.initial_outline = outer_contour(half_hole);
  plate_scale(s, plate, o, half_hole, frame_size, map, result);
  const cv::Rect& roi = late.roi;
  SampleMasks m;
  const double hole_radius = std::sqrt(cv::countNonZero(holes) / std::numbers::pi);
  cv::Mat hidden;
  cv::dilate(holes, hidden, disc_kernel(hidden_margin(still.background, holes, roi, hole_radius, still.noise)));
  m.reference = fill_in_plate(still.background, hidden, roi);
  m.always_sample = holes(roi).clone();
  const cv::Moments moments = cv::moments(holes, true);
  m.seed = cv::Point(static_cast<int>(moments.m10 / moments.m00) - roi.x,
                     static_cast<int>(moments.m01 / moments.m00) - roi.y);
  cv::Mat eroded;
  cv::erode(late.changed, eroded, disc_kernel(3));
  m.sample_interior = eroded & ~hidden;
  return m;
}

/// Channel: the sample's place in the plane, filled in stage by stage.
struct ChannelLayout {
  cv::Vec2d centre;                    ///< [mm] plane: the late change's mean
  cv::Vec2d axis;                      ///< its long axis (the channel's), pointing downstream once known
  cv::Vec2d normal;                    ///< across the channel (from the axis as first found)
  std::vector<cv::Point> half_points;  ///< image pixels past the change's half level, for widths
  double late_low = 0, late_high = 0;  ///< [mm] the late change's ends along the axis as first found
  double gate = 0;                     ///< [mm] along the axis from the centre: the gate line
  double width_mm = 0;                 ///< [mm] the width the sample fills
  double side_low = 0, side_high = 0;  ///< [mm] across from the centre: the sample's sides
  cv::Mat along_map, side_map;         ///< ROI: [mm] each pixel along the axis and across it, from the centre
  cv::Mat centre_band;                 ///< ROI mask: the middle 30% of the width
  double profile_bin = 0.1;            ///< [mm] bin of the profiles along the axis
};

/// Channel: the change is the sample past the gate (and the gate itself). Its long axis is the channel's. With
/// the channel scale, the plane map comes from the change's width across that axis in the image.
ChannelLayout channel_axis(const io::CaptureSettings& s, const ChannelRig& channel, const LateChange& late,
                           PlaneMap& map, CaptureResult& result) {
  ChannelLayout c;
  std::vector<cv::Point> points = mask_points(late.changed);
  cv::Mat image_points(static_cast<int>(points.size()), 2, CV_64F);
  for (std::size_t i = 0; i < points.size(); ++i) {
    image_points.at<double>(static_cast<int>(i), 0) = points[i].x;
    image_points.at<double>(static_cast<int>(i), 1) = points[i].y;
  }
  cv::PCA image_pca(image_points, cv::Mat(), cv::PCA::DATA_AS_ROW);
  // Widths from the change's half level (the blurred edge's middle), not from the noise threshold.
  c.half_points = [&] {
    cv::Mat inner;
    cv::erode(late.changed, inner, disc_kernel(3));
    std::vector<double> levels;
    for (const cv::Point& p : mask_points(inner, 5000)) levels.push_back(late.change.at<float>(p));
    cv::Mat near;
    cv::dilate(late.changed, near, disc_kernel(2));
    return mask_points((late.change > 0.5 * quantile(levels, 0.5)) & near);
  }();
  if (s.scale == Scale::Channel) {
    const cv::Vec2d a(image_pca.eigenvectors.at<double>(0, 0), image_pca.eigenvectors.at<double>(0, 1));
    const cv::Vec2d n(-a[1], a[0]);
    std::vector<cv::Vec2d> flat;
    for (const cv::Point& p : c.half_points) flat.emplace_back(p.x, p.y);
    const double width_px = middle_width(flat, a, n);
    const double ppmm = width_px / (channel.width * 1000.0);
    map.image_to_plane = cv::Matx33d(1 / ppmm, 0, 0, 0, 1 / ppmm, 0, 0, 0, 1);
    result.scale_source = fmt::format("channel, {:g} mm wide", channel.width * 1000.0);
  }
  std::vector<cv::Point2d> plane = map.to_plane(points);
  cv::Mat plane_points(static_cast<int>(plane.size()), 2, CV_64F);
  for (std::size_t i = 0; i < plane.size(); ++i) {
    plane_points.at<double>(static_cast<int>(i), 0) = plane[i].x;
    plane_points.at<double>(static_cast<int>(i), 1) = plane[i].y;
  }
  cv::PCA pca(plane_points, cv::Mat(), cv::PCA::DATA_AS_ROW);
  c.centre = cv::Vec2d(pca.mean.at<double>(0, 0), pca.mean.at<double>(0, 1));
  c.axis = cv::Vec2d(pca.eigenvectors.at<double>(0, 0), pca.eigenvectors.at<double>(0, 1));
  c.normal = cv::Vec2d(-c.axis[1], c.axis[0]);
  return c;
}

/// Channel: which way the sample flows, the end that moved between an earlier reading and the last one; the
/// other end (the sample's back) is the gate line's first guess.
void flow_direction(const DecodedVideo& video, const StillStart& still, const LateChange& late, const PlaneMap& map,
                    cv::Size frame_size, ChannelLayout& c) {
  if (video.readings.size() < 2)
    throw NotFoundInVideo(
        "a channel needs at least two readings to tell which way the sample flows (expected "
        "a shorter interval, every, or more times)");
  const KeptFrame& earlier = video.readings[video.readings.size() >= 3 ? video.readings.size() / 2 : 0];
  const cv::Rect all(cv::Point(0, 0), frame_size);
  const cv::Mat& background = still.background;
  cv::Mat changed_earlier =
      magnitude(difference(earlier.image, background, exposure_gain(earlier.image, background, cv::Mat()), all)) >
      late.threshold;
  changed_earlier = clean_mask(changed_earlier & late.outline, 2);
  auto ends = [&](const cv::Mat& mask) {
    std::vector<double> along;
    for (const cv::Point2d& p : map.to_plane(mask_points(mask))) along.push_back(c.axis.dot(cv::Vec2d(p) - c.centre));
    return std::pair{quantile(along, 0.001), quantile(along, 0.999)};
  };
  const auto [late_low, late_high] = ends(late.changed);
  const auto [earlier_low, earlier_high] =
      cv::countNonZero(changed_earlier) > 0 ? ends(changed_earlier) : std::pair{late_low, late_low};
  c.late_low = late_low;
  c.late_high = late_high;
  c.gate = late_low;
  if (earlier_low - late_low > late_high - earlier_high) {  // it grew towards -axis
    c.axis = -c.axis;
    c.gate = -late_high;
  }
}

/// Channel: the width the sample fills, from the middle of its length, and its sides; with a board scale, a
/// width unlike the rig's is a warning.
void channel_sides(const io::CaptureSettings& s, const ChannelRig& channel, const CaptureOptions& o,
                   const PlaneMap& map, ChannelLayout& c, std::vector<std::string>& warnings) {
  std::vector<cv::Vec2d> flat;
  for (const cv::Point2d& p : map.to_plane(c.half_points)) flat.emplace_back(cv::Vec2d(p) - c.centre);
  double mid_across = 0;
  c.width_mm = middle_width(flat, c.axis, c.normal, &mid_across);
  c.side_low = mid_across - 0.5 * c.width_mm;
  c.side_high = mid_across + 0.5 * c.width_mm;
  const double width_rig = channel.width * 1000.0;
  if (s.scale == Scale::Board && std::abs(c.width_mm - width_rig) > o.size_tolerance * width_rig)
    warnings.push_back(
        fmt::format("the sample fills {:.1f} mm of the channel's width, but [rig] width is {:.1f} "
                    "mm: check the channel's size and the board's square",
                    c.width_mm, width_rig));
}

/// Channel, per ROI pixel: where it lies along the channel and across it [mm], the band the readings are taken
/// in, and the profiles' bin. Readings are taken along the middle 30% of the width: near the tip of a front that
/// side-wall drag curves, and clear of the walls' shadows.
void channel_position_maps(const PlaneMap& map, const cv::Rect& roi, ChannelLayout& c) {
  c.along_map = cv::Mat(roi.size(), CV_32F);
  c.side_map = cv::Mat(roi.size(), CV_32F);
  for (int y = 0; y < roi.height; ++y)
    for (int x = 0; x < roi.width; ++x) {
      const cv::Vec2d p = cv::Vec2d(map.to_plane(cv::Point2d(roi.x + x, roi.y + y))) - c.centre;
      c.along_map.at<float>(y, x) = static_cast<float>(c.axis.dot(p));
      c.side_map.at<float>(y, x) = static_cast<float>(c.normal.dot(p));
    }
  const double mid_side = 0.5 * (c.side_low + c.side_high);
  c.centre_band =
      (c.side_map >= mid_side - 0.15 * c.width_mm) & (c.side_map <= mid_side + 0.15 * c.width_mm);
  c.profile_bin = 0.25 / map.pixels_per_mm(map.to_image(cv::Point2d(c.centre))) * 2;  // half a pixel [mm]
}

/// [mm] Channel: the gate line, the first step up of the change between the still start and the last reading
/// along the middle of the channel (the gate's footprint, or the sample block's face), placed where that step
/// reaches half its height (1.5 mm on), to a fraction of a pixel. Without such a step, the first guess stays.
double gate_line(const StillStart& still, const LateChange& late, const ChannelLayout& c) {
  double gate = c.gate;
  const cv::Vec3d late_gain_all = exposure_gain(late.late, still.background, late.outline_grown);
  const cv::Mat change = magnitude(difference(late.late, still.background, late_gain_all, late.roi));
  const double from = gate - 4.0, to = gate + 8.0;
  const std::vector<double> rise = profile(change, c.along_map, c.centre_band, from, to, c.profile_bin);
  double plateau = 0;
  for (double v : rise) plateau = std::max(plateau, v);
  const double first_level = std::max(late.threshold, 0.25 * plateau);
  std::size_t i0 = 0;
  while (i0 < rise.size() && rise[i0] < first_level) ++i0;
  if (i0 < rise.size()) {
    const std::size_t reach = std::min(rise.size(), i0 + static_cast<std::size_t>(1.5 / c.profile_bin) + 1);
    const double step = *std::max_element(rise.begin() + static_cast<std::ptrdiff_t>(i0),
                                          rise.begin() + static_cast<std::ptrdiff_t>(reach));
    std::size_t i = i0;
    while (i > 0 && rise[i - 1] >= 0.5 * step) --i;
    while (i < reach && rise[i] < 0.5 * step) ++i;
    const double before = i > 0 ? rise[i - 1] : 0.0;
    const double w = rise[i] > before ? (0.5 * step - before) / (rise[i] - before) : 0.0;
    gate = from + (static_cast<double>(i) - 0.5 + w) * c.profile_bin;
  }
  return gate;
}

/// Channel: the masks from the layout, positions measured from the gate line. Only pixels past the gate line
/// and inside the channel (1 mm of slack) count; the band just past the line, where the gate stood, seeds the
/// sample in every frame; the colour is taken from the late change beyond that band. The gate line's ends and
/// the axis go to the audit images.
SampleMasks channel_masks(const StillStart& still, const LateChange& late, ChannelLayout& c, const PlaneMap& map,
                          cv::Size frame_size, CaptureResult& result) {
  const cv::Rect& roi = late.roi;
  SampleMasks m;
  m.reference = still.background;
  c.along_map -= c.gate;
  m.counted = (c.side_map >= c.side_low - 1.0) & (c.side_map <= c.side_high + 1.0) & (c.along_map > 0);
  const double band = std::min(0.2 * c.width_mm, 10.0);
  m.gate_band = m.counted & (c.along_map <= band);
  auto image_of = [&](double along, double side) {
    return map.to_image(cv::Point2d(c.centre + c.axis * (along + c.gate) + c.normal * side));
  };
  const double mid_side = 0.5 * (c.side_low + c.side_high);
  result.reference.gate_a = image_of(0, c.side_low);
  result.reference.gate_b = image_of(0, c.side_high);
  result.reference.axis_end = image_of(c.late_high - c.late_low, mid_side);
  const cv::Point2d gate_mid = image_of(0.5 * band, mid_side);
  m.seed = cv::Point(static_cast<int>(gate_mid.x) - roi.x, static_cast<int>(gate_mid.y) - roi.y);
  m.always_sample = cv::Mat::zeros(roi.size(), CV_8U);
  cv::Mat eroded;
  cv::erode(late.changed, eroded, disc_kernel(3));
  m.sample_interior = cv::Mat::zeros(frame_size, CV_8U);
  cv::Mat counted_far = m.counted.clone();
  counted_far.setTo(0, m.gate_band);
  const cv::Mat interior = eroded(roi) & counted_far;
  interior.copyTo(m.sample_interior(roi));
  m.along_map = c.along_map;
  m.centre_band = c.centre_band;
  m.profile_bin = c.profile_bin;
  return m;
}

/// Channel: the layout stage by stage (axis and scale, flow direction, sides, position maps, gate line), then
/// the masks.
SampleMasks channel_sample_masks(const io::CaptureSettings& s, const ChannelRig& channel, const CaptureOptions& o,
                                 const DecodedVideo& video, const StillStart& still, const LateChange& late,
                                 cv::Size frame_size, PlaneMap& map, CaptureResult& result) {
  ChannelLayout c = channel_axis(s, channel, late, map, result);
  flow_direction(video, still, late, map, frame_size, c);
  channel_sides(s, channel, o, map, c, result.warnings);
  channel_position_maps(map, late.roi, c);
  c.gate = gate_line(still, late, c);
  return channel_masks(still, late, c, map, frame_size, result);
}

/// The sample's colour against the plate: the mean difference over the late frame's sure sample pixels (a plate
/// hardly spread yet: the sample inside the ring against the plate's fill), in noise deviations. Too little is
/// NotFoundInVideo, little a warning; glare around the sample is a warning too.
cv::Vec3d sample_contrast(const CaptureOptions& o, bool plate, const StillStart& still, const LateChange& late,
                          const SampleMasks& m, CaptureResult& result) {
  const cv::Rect& roi = late.roi;
  const cv::Vec3d late_gain = exposure_gain(late.late, still.background, late.outline_grown);
  int interior_count = 0;
  cv::Vec3d contrast =
      mean_difference(difference(late.late, m.reference, late_gain, roi), m.sample_interior(roi), &interior_count);
  if (interior_count < 50 && plate) {
    cv::Mat inner;
    cv::erode(m.always_sample, inner, disc_kernel(3));
    contrast =
        mean_difference(difference(still.background, m.reference, cv::Vec3d(1, 1, 1), roi), inner, &interior_count);
  }
  result.contrast = cv::norm(contrast) / still.noise;

  if (interior_count < 20 || result.contrast < o.no_contrast)
    throw NotFoundInVideo(
        fmt::format("sample not found: it differs from the plate by {:.1f} times the noise only "
                    "(expected at least {:g}; light it evenly, or use a plate of another colour)",
                    result.contrast, o.no_contrast));
  if (result.contrast < o.low_contrast)
    result.warnings.push_back(
        fmt::format("low contrast: the sample differs from the plate by {:.1f} times the noise only "
                    "(readings are less sure; a plate of another colour or more even light helps)",
                    result.contrast));
  const double glare = std::max(saturated_fraction(still.background, roi), saturated_fraction(late.late, roi));
  if (glare > o.glare_fraction)
    result.warnings.push_back(
        fmt::format("glare: {:.1f}% of the pixels around the sample are saturated white (light it "
                    "from the side or dim it; readings near the glare may be off)",
                    100 * glare));
  return contrast;
}

/// What measuring one kept frame needs besides the frame.
struct MeasureContext {
  bool plate = false;
  const StillStart& still;
  const LateChange& late;
  const SampleMasks& masks;
  cv::Vec3d contrast;
  const PlaneMap& map;
  cv::Mat area_map;  ///< ROI: [mm^2] of each pixel on the plane
  cv::Size frame_size;
  double release = 0;  ///< [s] in the video
};

/// One kept frame measured: its sample fraction against the reference, the mask (f > 1/2, in a channel also a
/// strong change in the gate band; the parts touching the sure sample, holes filled, in a channel only what
/// counts), its outline, and the diameter of its area (plate) or the front along the middle band (channel).
CapturedReading measure_frame(const KeptFrame& k, const MeasureContext& x) {
  const SampleMasks& m = x.masks;
  const cv::Rect& roi = x.late.roi;
  const bool channel = !x.plate;
  const cv::Mat d = difference(k.image, m.reference, exposure_gain(k.image, x.still.background, x.late.outline_grown),
                               roi);
  const cv::Mat f = sample_fraction(d, x.contrast);
  cv::Mat mask = f > 0.5;
  if (channel) mask |= (magnitude(d) > 0.5 * cv::norm(x.contrast)) & m.gate_band;
  mask |= m.always_sample;
  mask = clean_mask(mask, 1);
  mask |= m.always_sample;
  cv::Mat seed_mask = cv::Mat::zeros(roi.size(), CV_8U);
  if (x.plate)
    seed_mask = m.always_sample;
  else
    seed_mask = m.gate_band;
  mask = fill_holes(components_touching(mask, seed_mask));
  if (channel) mask &= m.counted;
  CapturedReading r;
  r.video_time = k.time;
  r.time = k.time - x.release;
  r.frame = k.index;
  r.outline = outer_contour(mask, roi.tl());
  r.at_edge = touches_frame_edge(mask, roi, x.frame_size);
  const double area = outline_area(mask, f, x.area_map, 2, m.counted);
  if (x.plate) {
    r.value = equivalent_diameter(area);
    r.ellipticity = ellipticity(x.map.to_plane(r.outline));
  } else {
    r.value = front_from_profile(f, mask, m.along_map, m.centre_band, m.profile_bin);
  }
  return r;
}

/// Every kept frame measured, in time order. A reading whose outline touches the frame's edge is left out, with
/// one warning from the first; none left is NotFoundInVideo. A plate outline that is far from round is a warning
/// naming the worst.
void measure_readings(const DecodedVideo& video, const CaptureOptions& o, const MeasureContext& context,
                      CaptureResult& result) {
  double worst_round = 0, worst_round_time = 0;
  std::optional<double> edge_time;
  for (const KeptFrame& k : video.readings) {
    CapturedReading r = measure_frame(k, context);
    if (context.plate && r.ellipticity > worst_round) worst_round = r.ellipticity, worst_round_time = r.time;
    if (r.at_edge) {
      if (!edge_time) edge_time = r.time;
      continue;
    }
    result.readings.push_back(std::move(r));
    result.frames_measured.push_back(k.image);
  }
  if (edge_time)
    result.warnings.push_back(
        fmt::format("the sample reached the frame's edge at {} after the release: readings from then "
                    "on are left out (keep the whole spread in view)",
                    seconds_text(*edge_time)));
  if (result.readings.empty())
    throw NotFoundInVideo(
        "sample not found whole: it touches the frame's edge in every reading (expected the "
        "whole spread in view)");
  if (context.plate && worst_round > o.round_tolerance)
    result.warnings.push_back(
        fmt::format("the outline is not round: its axes differ by {:.0f}% at {} (was the ring lifted "
                    "unevenly, or the plate not level?)",
                    100 * worst_round, seconds_text(worst_round_time)));
}

}  // namespace

CaptureResult capture_readings(const io::CaptureSettings& s, const Rig& rig, const CaptureOptions& o) {
  const io::CapturedOutline outline = io::captured_outline(rig);
  if (outline == io::CapturedOutline::None) throw std::invalid_argument("capture reads plate and channel tests only");
  const auto* plate = std::get_if<PlateRig>(&rig);  // set exactly when outline is PlateDiameter
  const auto* channel = std::get_if<ChannelRig>(&rig);

  CaptureResult result;
  result.reading = plate ? Reading::Diameter : Reading::Front;
  const DecodedVideo video = decode_video(s, o);
  record_timing(video, result);
  const cv::Size frame_size(video.width, video.height);
  const StillStart still = still_start(video);
  PlaneMap map = s.scale == Scale::Board ? board_map(s, still.background, result) : PlaneMap{};
  const LateChange late = late_change(video, still, frame_size);
  const SampleMasks masks = plate ? plate_masks(s, *plate, o, still, late, frame_size, map, result)
                                  : channel_sample_masks(s, *channel, o, video, still, late, frame_size, map, result);
  const cv::Point2d centre_image(late.roi.x + masks.seed.x, late.roi.y + masks.seed.y);
  result.pixels_per_mm = map.pixels_per_mm(centre_image);
  const cv::Vec3d contrast = sample_contrast(o, plate != nullptr, still, late, masks, result);
  const MeasureContext context{.plate = plate != nullptr,
                               .still = still,
                               .late = late,
                               .masks = masks,
                               .contrast = contrast,
                               .map = map,
                               .area_map = map.pixel_area_map(late.roi),
                               .frame_size = frame_size,
                               .release = video.release};
  measure_readings(video, o, context, result);
  return result;
}

}  // namespace spreadfit::capture
