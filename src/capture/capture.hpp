// Video of a bench test -> readings: the whole capture, without files or printing (capture_command.cpp does the
// I/O). Steps, each in its own file:
//   video_reader       frames and their container timestamps, one decoding pass
//   release_detection  the first moving frame after a still start (or the release the test description gives)
//   board_homography   image -> plate plane in mm (board), or the ring's / channel's own size (ring, channel)
//   segmentation       sample against the plate's look before the release, lighting-adaptive
//   measurement        equivalent-area diameter (plate) or front past the gate (channel), roundness
// Only the frames at the reading times (and the still start) are converted and kept; the frame nearest each
// reading time is measured and its own timestamp written, so no reading is interpolated.
#pragma once

#include <filesystem>
#include <opencv2/core.hpp>
#include <string>
#include <vector>

#include "models/rig.hpp"
#include "src/capture/video_reader.hpp"
#include "src/io/description_file.hpp"

namespace spreadfit::capture {

struct CaptureOptions {
  int max_readings = 2000;        ///< bound on the readings (and the frames kept for them)
  long max_frames = 2000000;      ///< bound on the frames decoded (about 18 h at 30 frames/s)
  double round_tolerance = 0.05;  ///< ellipticity 1 - b/a above which the outline is "not round" (5%)
  double low_contrast = 12;       ///< sample-plate colour difference below this many noise deviations: a warning
  double no_contrast = 6;         ///< ... below this many: the sample is not found
  double glare_fraction = 0.005;  ///< saturated pixels around the sample above this fraction (0.5%): a warning
  double size_tolerance = 0.10;   ///< board scale: the ring's or channel's size seen vs [rig] differs by more: warn
};

/// One reading and what it was measured on.
struct CapturedReading {
  double time = 0;                 ///< [s] since the release
  double video_time = 0;           ///< [s] the frame's time in the video
  int frame = 0;                   ///< frame index in the video
  double value = 0;                ///< [mm] diameter (plate) or front past the gate (channel)
  double ellipticity = 0;          ///< plate: 1 - b/a of the outline
  bool at_edge = false;            ///< the outline touches the frame's edge
  std::vector<cv::Point> outline;  ///< image pixels of the outline
};

/// What the audit images draw besides the outline.
struct CaptureReference {
  std::vector<cv::Point2f> board_corners;  ///< board scale
  std::vector<cv::Point> initial_outline;  ///< plate: the sample's outline before the release
  cv::Point2d gate_a, gate_b, axis_end;    ///< channel: the gate line's ends and the axis, image pixels
};

struct CaptureResult {
  Reading reading = Reading::Diameter;  ///< Diameter (plate) or Front (channel)
  std::vector<CapturedReading> readings;
  std::vector<std::string> warnings;  ///< plain words, one line each
  double release_time = 0;            ///< [s] in the video
  bool release_detected = false;      ///< false: as the test description gave it
  double pixels_per_mm = 0;           ///< at the sample's centre
  std::string scale_source;           ///< "board 9x6, 10 mm squares" etc.
  int width = 0, height = 0;
  int frames = 0;           ///< frames read (all, unless every reading time came before the end)
  double frame_rate = 0;    ///< [1/s] from the timestamps (median interval)
  double nominal_rate = 0;  ///< [1/s] as the container announces it
  bool timestamps_from_container = true;
  FrameTiming timing;
  double contrast = 0;  ///< sample-plate colour difference in noise deviations
  CaptureReference reference;
  std::vector<cv::Mat> frames_measured;  ///< the frame of each reading (for the audit images), same order
};

/// Captures the readings of a plate or channel test from `settings.video`. Throws NotFoundInVideo when the board,
/// the sample or the release is not in the video, std::runtime_error with a plain message when the video cannot
/// be read (the caller locates it), std::invalid_argument for a rig without capture.
CaptureResult capture_readings(const io::CaptureSettings& settings, const Rig& rig, const CaptureOptions& options = {});

}  // namespace spreadfit::capture
