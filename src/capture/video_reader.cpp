#include "src/capture/video_reader.hpp"

#include <algorithm>
#include <cmath>
#include <opencv2/imgproc.hpp>
#include <stdexcept>

namespace spreadfit::capture {

FrameTiming analyse_timing(const std::vector<double>& times) {
  FrameTiming timing;
  if (times.size() < 2) return timing;
  std::vector<double> intervals;
  intervals.reserve(times.size() - 1);
  for (std::size_t i = 1; i < times.size(); ++i) intervals.push_back(times[i] - times[i - 1]);
  std::vector<double> sorted = intervals;
  std::nth_element(sorted.begin(), sorted.begin() + static_cast<std::ptrdiff_t>(sorted.size() / 2), sorted.end());
  timing.median_interval = sorted[sorted.size() / 2];
  // Each gap against the median of the 15 intervals around it: a phone's rate may change during a video.
  for (std::size_t i = 0; i < intervals.size(); ++i) {
    const double gap = intervals[i];
    timing.longest_gap = std::max(timing.longest_gap, gap);
    const std::size_t from = i >= 7 ? i - 7 : 0, to = std::min(intervals.size(), i + 8);
    std::vector<double> around(intervals.begin() + static_cast<std::ptrdiff_t>(from),
                               intervals.begin() + static_cast<std::ptrdiff_t>(to));
    std::nth_element(around.begin(), around.begin() + static_cast<std::ptrdiff_t>(around.size() / 2), around.end());
    const double usual = around[around.size() / 2];
    if (usual > 0 && gap > 1.5 * usual) timing.dropped += static_cast<int>(std::lround(gap / usual)) - 1;
  }
  return timing;
}

VideoReader::VideoReader(const std::filesystem::path& file) {
  // FFmpeg first: it carries the container's timestamps; any other backend that opens the file as a fallback.
  if (!capture_.open(file.string(), cv::CAP_FFMPEG)) capture_.open(file.string(), cv::CAP_ANY);
  if (!capture_.isOpened())
    throw std::runtime_error("cannot be read as a video (no video stream any installed decoder opens)");
  backend_ = capture_.getBackendName();
  width_ = static_cast<int>(capture_.get(cv::CAP_PROP_FRAME_WIDTH));
  height_ = static_cast<int>(capture_.get(cv::CAP_PROP_FRAME_HEIGHT));
  nominal_rate_ = capture_.get(cv::CAP_PROP_FPS);
  if (!std::isfinite(nominal_rate_) || nominal_rate_ < 0) nominal_rate_ = 0;
  if (width_ <= 0 || height_ <= 0) throw std::runtime_error("cannot be read as a video (no frame size)");
}

bool VideoReader::grab() {
  if (!capture_.grab()) return false;
  ++index_;
  const double ms = capture_.get(cv::CAP_PROP_POS_MSEC);
  if (index_ == 0) {
    first_ms_ = std::isfinite(ms) ? ms : 0;
    last_ms_ = first_ms_;
    time_ = 0;
    return true;
  }
  // FFmpeg reports 0 for the frames it flushes at the end, and some containers carry no stamps at all: such a
  // frame follows the last one after the mean interval so far (or the nominal rate before any good stamp).
  if (std::isfinite(ms) && ms > last_ms_) {
    last_ms_ = ms;
    time_ = (ms - first_ms_) / 1000.0;
    ++stamped_;
  } else {
    ++unstamped_;
    const double interval =
        stamped_ > 0 ? (last_ms_ - first_ms_) / 1000.0 / stamped_ : 1.0 / (nominal_rate_ > 0 ? nominal_rate_ : 30.0);
    time_ += interval;
  }
  return true;
}

cv::Mat VideoReader::retrieve() {
  cv::Mat frame;
  if (!capture_.retrieve(frame) || frame.empty()) throw std::runtime_error("a frame could not be decoded");
  if (frame.type() != CV_8UC3) {
    cv::Mat converted;
    if (frame.channels() == 1)
      cv::cvtColor(frame, converted, cv::COLOR_GRAY2BGR);
    else
      frame.convertTo(converted, CV_8UC3);
    frame = converted;
  }
  return frame;
}

}  // namespace spreadfit::capture
