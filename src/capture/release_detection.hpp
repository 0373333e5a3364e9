// Finding the release in a video: the first frame where something moves (the ring or gate lifted, or the sample
// starting to grow) after a still start.
//
// Each frame is reduced to a small image (about 320 px wide, area-averaged, which also averages the sensor noise)
// and compared with the small image `lag` frames before it (slow drifts of exposure or of a codec's artefacts
// stay below the threshold; a release shows at once). A pixel has changed when one of its channels differs by
// more than `noise_factor` times the noise of that pair of frames (1.4826 times the median absolute difference:
// robust, since motion touches few pixels), after taking off the frame's median gain per channel (a change of
// exposure scales every pixel alike and is no motion). The change signal is the fraction of
// changed pixels. The release is the first frame of the first run of `persistence` frames above the trigger
// level, walked back to the last frame still at the level of the still start. Common practice, no source: frame
// differencing against a background is the textbook motion detector (e.g. Szeliski 2022, Computer Vision,
// sec. 9.3).
#pragma once

#include <deque>
#include <opencv2/core.hpp>
#include <optional>
#include <vector>

namespace spreadfit::capture {

struct ReleaseOptions {
  int lag = 8;                    ///< frames between the two compared; the video must start still for longer
  double noise_factor = 5.0;      ///< a pixel has changed beyond this many noise standard deviations
  double noise_floor = 4.0;       ///< [grey levels] least change counted (codecs keep some artefacts moving)
  double trigger = 0.01;          ///< changed fraction that marks motion (1% of the frame; a codec key frame can
                                  ///< change 0.5%), at least
  double trigger_over_still = 4;  ///< ... and this many times the still start's median fraction
  int persistence = 3;            ///< frames in a row above the trigger (a single flicker is no release)
  int width = 320;                ///< [px] width of the small images compared
};

/// Online release detector: feed every frame from the first; once `found()`, `release_index()` is the first
/// moving frame.
class ReleaseDetector {
 public:
  explicit ReleaseDetector(ReleaseOptions options = {}) : options_(options) {}
  /// Feeds the next frame (BGR). Returns true when this frame completed the detection.
  bool add(const cv::Mat& frame, double time);
  bool found() const { return release_index_.has_value(); }
  /// First moving frame (index into the frames fed).
  int release_index() const { return release_index_.value_or(-1); }
  /// [s] the release: midway between the last still frame and the first moving one.
  double release_time() const;
  /// Whether the first frames compared already differ (the video starts after the release, or moving).
  bool moving_from_start() const;
  const std::vector<double>& changed_fraction() const { return fraction_; }
  const std::vector<double>& times() const { return times_; }

 private:
  cv::Mat small(const cv::Mat& frame) const;
  double change(const cv::Mat& small_frame, const cv::Mat& reference) const;

  ReleaseOptions options_;
  std::deque<cv::Mat> recent_;  ///< the last `lag` small frames
  std::vector<double> fraction_, times_;
  std::optional<int> release_index_;
};

}  // namespace spreadfit::capture
