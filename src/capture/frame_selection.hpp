// One decoding pass over a test video that keeps only the frames the measurement needs: still frames before the
// release (at most 16, spread over the still start) and, after it, the frame nearest each reading time. The
// release is detected on the way (src/capture/release_detection.hpp) unless [capture] gives it.
#pragma once

#include <cstddef>
#include <opencv2/core.hpp>
#include <vector>

#include "src/capture/capture.hpp"

namespace spreadfit::capture {

struct KeptFrame {
  double time = 0;  ///< [s] in the video
  int index = 0;
  cv::Mat image;
};

/// Everything one decoding pass gives.
struct DecodedVideo {
  std::vector<double> times;        ///< [s] every frame's time
  std::vector<KeptFrame> stills;    ///< still frames before the release
  std::vector<KeptFrame> readings;  ///< the frame nearest each reading time
  double release = 0;               ///< [s]
  bool detected = false;            ///< the release was detected (not given)
  int width = 0, height = 0;
  double nominal_rate = 0;
  bool from_container = true;       ///< frame times from the container's timestamps
  std::size_t targets_missed = 0;   ///< times given that lie after the video's end
};

/// Decodes settings.video once. Throws NotFoundInVideo (src/capture/capture_error.hpp) when no release or no
/// reading can be found, std::invalid_argument for settings the video contradicts (a release after its end, more
/// frames or readings than `options` allow), std::runtime_error when it cannot be read as a video.
DecodedVideo decode_video(const io::CaptureSettings& settings, const CaptureOptions& options);

}  // namespace spreadfit::capture
