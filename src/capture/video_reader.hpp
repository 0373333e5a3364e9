// Reading a video frame by frame with its container timestamps (OpenCV's FFmpeg backend).
//
// Phones record at a variable frame rate, so a frame's time is the presentation timestamp the container stores
// (CAP_PROP_POS_MSEC read after each grab), never index / nominal rate. grab() decodes a frame without converting
// it; retrieve() converts only the frames the capture looks at (BGR, 8 bits), which is most of the saving when a
// reading is wanted once a second. A frame without a usable timestamp (FFmpeg gives 0 for the frames flushed at the
// end) follows the one before at the mean interval; when many do, timestamps_from_container() says so.
#pragma once

#include <algorithm>
#include <filesystem>
#include <opencv2/core.hpp>
#include <opencv2/videoio.hpp>
#include <string>
#include <vector>

namespace spreadfit::capture {

/// Timing of the frames read so far, and what it says about dropped frames.
struct FrameTiming {
  double median_interval = 0;  ///< [s] median time between frames
  int dropped = 0;             ///< frames missing where a gap is more than 1.5 usual intervals
  double longest_gap = 0;      ///< [s] longest interval between two frames
};

/// Frame timing from timestamps [s] (increasing). A gap of g usual intervals (the median of the 15 around it, so
/// a change of rate is no gap) counts round(g) - 1 missing frames when g > 1.5 (common practice, no source: half
/// a frame of jitter is normal for phone video).
FrameTiming analyse_timing(const std::vector<double>& times);

class VideoReader {
 public:
  /// Opens the video. Throws std::runtime_error with a plain message ("cannot be read as a video ...") when
  /// no backend opens it or it holds no decodable frame; the caller locates the message at the test description.
  explicit VideoReader(const std::filesystem::path& file);

  /// Decodes the next frame; false at the end of the video.
  bool grab();
  /// Converts the frame just grabbed to BGR, 8 bits per channel.
  cv::Mat retrieve();
  /// [s] presentation time of the frame just grabbed, from the first frame's.
  double time() const { return time_; }
  int index() const { return index_; }  ///< 0-based index of the frame just grabbed
  int width() const { return width_; }
  int height() const { return height_; }
  double nominal_rate() const { return nominal_rate_; }  ///< [1/s] frame rate the container announces (0: none)
  /// False when more than a few frames (2, or 5%) had no usable timestamp (missing, or not after the last one):
  /// their times then follow the frame before at the mean interval.
  bool timestamps_from_container() const { return unstamped_ <= std::max(2, (index_ + 1) / 20); }
  const std::string& backend() const { return backend_; }

 private:
  cv::VideoCapture capture_;
  double time_ = 0, first_ms_ = 0, last_ms_ = -1;
  int index_ = -1, width_ = 0, height_ = 0;
  double nominal_rate_ = 0;
  int stamped_ = 0, unstamped_ = 0;
  std::string backend_;
};

}  // namespace spreadfit::capture
