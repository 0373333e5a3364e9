#include "src/capture/release_detection.hpp"

#include <algorithm>
#include <cmath>
#include <opencv2/imgproc.hpp>

namespace spreadfit::capture {

namespace {

double median_of(std::vector<double> v) {
  if (v.empty()) return 0;
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2), v.end());
  return v[v.size() / 2];
}

}  // namespace

cv::Mat ReleaseDetector::small(const cv::Mat& frame) const {
  const double f = std::min(1.0, static_cast<double>(options_.width) / frame.cols);
  cv::Mat out;
  cv::resize(frame, out, cv::Size(), f, f, cv::INTER_AREA);
  out.convertTo(out, CV_32FC3);
  return out;
}

double ReleaseDetector::change(const cv::Mat& s, const cv::Mat& reference) const {
  std::vector<cv::Mat> channels, references;
  cv::split(s, channels);
  cv::split(reference, references);
  cv::Mat changed = cv::Mat::zeros(s.size(), CV_8U);
  for (std::size_t k = 0; k < channels.size(); ++k) {
    // Take off the frame's median gain: an exposure change scales every pixel and is no motion.
    std::vector<double> ratios;
    for (int y = 0; y < s.rows; y += 4)
      for (int x = 0; x < s.cols; x += 4) {
        const float r = references[k].at<float>(y, x);
        if (r >= 20) ratios.push_back(channels[k].at<float>(y, x) / r);
      }
    const double gain = ratios.size() > 20 ? median_of(ratios) : 1.0;
    const cv::Mat residual = channels[k] - gain * references[k];
    // The noise of this pair of frames, from the residual's own spread (1.4826 MAD): sensor noise and codec
    // artefacts vary from frame to frame (a key frame differs more), and motion touches few pixels.
    std::vector<double> spread;
    for (int y = 0; y < s.rows; y += 3)
      for (int x = 0; x < s.cols; x += 3) spread.push_back(std::abs(residual.at<float>(y, x)));
    const double noise = 1.4826 * median_of(spread);
    const double threshold = std::max(options_.noise_floor, options_.noise_factor * noise);
    cv::Mat moved = cv::abs(residual) > threshold;
    changed |= moved;
  }
  return static_cast<double>(cv::countNonZero(changed)) / static_cast<double>(changed.total());
}

bool ReleaseDetector::add(const cv::Mat& frame, double time) {
  if (found()) return false;
  cv::Mat s = small(frame);
  times_.push_back(time);
  const int n = static_cast<int>(times_.size());
  // Compared with the frame `lag` before: slow drifts (exposure, a codec's creeping artefacts) stay small, a
  // release shows at once.
  fraction_.push_back(n > options_.lag ? change(s, recent_.front()) : 0.0);
  recent_.push_back(s);
  if (static_cast<int>(recent_.size()) > options_.lag) recent_.pop_front();
  const int first_compared = options_.lag;
  if (n < first_compared + options_.persistence + 1) return false;
  // The still level: the median fraction of the frames compared before the run looked at.
  std::vector<double> still(fraction_.begin() + first_compared, fraction_.end() - options_.persistence);
  const double level = still.empty() ? 0.0 : median_of(still);
  const double trigger = std::max(options_.trigger, options_.trigger_over_still * level);
  for (int i = n - options_.persistence; i < n; ++i)
    if (fraction_[static_cast<std::size_t>(i)] <= trigger) return false;
  // Walk back to the first frame above the still level (plus a little, for the noise of the fraction itself).
  int first = n - options_.persistence;
  const double quiet = std::max(2.0 * level, 0.2 * options_.trigger);
  while (first > first_compared && fraction_[static_cast<std::size_t>(first - 1)] > quiet) --first;
  release_index_ = first;
  return true;
}

bool ReleaseDetector::moving_from_start() const {
  // The first frames compared all changed well beyond the trigger: nothing was still to begin with.
  const auto first = static_cast<std::size_t>(options_.lag);
  if (fraction_.size() < first + static_cast<std::size_t>(options_.persistence)) return false;
  for (std::size_t i = first; i < first + static_cast<std::size_t>(options_.persistence); ++i)
    if (fraction_[i] <= 5 * options_.trigger) return false;
  return true;
}

double ReleaseDetector::release_time() const {
  if (!found()) return 0;
  const auto i = static_cast<std::size_t>(*release_index_);
  return i == 0 ? times_[0] : 0.5 * (times_[i - 1] + times_[i]);
}

}  // namespace spreadfit::capture
