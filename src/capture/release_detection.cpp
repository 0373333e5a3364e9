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
  const float threshold =
      static_cast<float>(std::max(options_.noise_floor, options_.noise_factor * std::sqrt(2.0) * noise_));
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
    cv::Mat moved = cv::abs(channels[k] - gain * references[k]) > threshold;
    changed |= moved;
  }
  return static_cast<double>(cv::countNonZero(changed)) / static_cast<double>(changed.total());
}

bool ReleaseDetector::add(const cv::Mat& frame, double time) {
  if (found()) return false;
  cv::Mat s = small(frame);
  times_.push_back(time);
  const int n = static_cast<int>(times_.size());
  if (n == 2) {
    // Noise of one small pixel: the median absolute difference of two still frames as a standard deviation
    // (1.4826 MAD for a normal distribution), over sqrt(2) for the difference of two frames.
    cv::Mat d = cv::Mat(cv::abs(s - recent_.back())).reshape(1);
    std::vector<double> v;
    for (int i = 0; i < static_cast<int>(d.total()); i += 7) v.push_back(d.at<float>(i));
    noise_ = 1.4826 * median_of(v) / std::sqrt(2.0);
  }
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
  const double quiet = std::max(2.0 * level, 0.25 * options_.trigger);
  while (first > first_compared && fraction_[static_cast<std::size_t>(first - 1)] > quiet) --first;
  release_index_ = first;
  return true;
}

bool ReleaseDetector::moving_from_start() const {
  const auto first = static_cast<std::size_t>(options_.lag);
  return fraction_.size() > first && fraction_[first] > options_.trigger;
}

double ReleaseDetector::release_time() const {
  if (!found()) return 0;
  const auto i = static_cast<std::size_t>(*release_index_);
  return i == 0 ? times_[0] : 0.5 * (times_[i - 1] + times_[i]);
}

}  // namespace spreadfit::capture
