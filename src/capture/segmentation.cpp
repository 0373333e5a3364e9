#include "src/capture/segmentation.hpp"

#include <algorithm>
#include <cmath>
#include <opencv2/imgproc.hpp>
#include <opencv2/photo.hpp>

namespace spreadfit::capture {

namespace {
double median_of(std::vector<double>& v) {
  if (v.empty()) return 0;
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2), v.end());
  return v[v.size() / 2];
}
}  // namespace

cv::Mat median_frame(const std::vector<cv::Mat>& frames) {
  if (frames.size() == 1) return frames.front().clone();
  cv::Mat out(frames.front().size(), CV_8UC3);
  const std::size_t n = frames.size();
  std::vector<uchar> values(n);
  const int rows = out.rows, cols = out.cols * 3;
  for (int y = 0; y < rows; ++y) {
    std::vector<const uchar*> in(n);
    for (std::size_t k = 0; k < n; ++k) in[k] = frames[k].ptr<uchar>(y);
    uchar* o = out.ptr<uchar>(y);
    for (int x = 0; x < cols; ++x) {
      for (std::size_t k = 0; k < n; ++k) values[k] = in[k][x];
      std::nth_element(values.begin(), values.begin() + static_cast<std::ptrdiff_t>(n / 2), values.end());
      o[x] = values[n / 2];
    }
  }
  return out;
}

double noise_level(const std::vector<cv::Mat>& stills, const cv::Mat& background) {
  if (stills.size() < 2) return 1.0;
  std::vector<double> deviations;
  for (const cv::Mat& s : stills)
    for (int y = 0; y < s.rows; y += 5) {
      const uchar* a = s.ptr<uchar>(y);
      const uchar* b = background.ptr<uchar>(y);
      for (int x = 0; x < s.cols * 3; x += 7) deviations.push_back(std::abs(double(a[x]) - double(b[x])));
    }
  // A frame's deviation from the median of n frames has variance sigma^2 (1 - 1/n) nearly; undo that.
  const double n = static_cast<double>(stills.size());
  return std::max(0.5, 1.4826 * median_of(deviations) / std::sqrt(1.0 - 1.0 / n));
}

cv::Vec3d exposure_gain(const cv::Mat& frame, const cv::Mat& background, const cv::Mat& exclude) {
  std::vector<double> ratios[3];
  for (int y = 0; y < frame.rows; y += 4) {
    const auto* f = frame.ptr<cv::Vec3b>(y);
    const auto* b = background.ptr<cv::Vec3b>(y);
    const uchar* e = exclude.empty() ? nullptr : exclude.ptr<uchar>(y);
    for (int x = 0; x < frame.cols; x += 4) {
      if (e && e[x]) continue;
      for (int c = 0; c < 3; ++c)
        if (b[x][c] >= 20 && b[x][c] <= 245 && f[x][c] <= 250) ratios[c].push_back(double(f[x][c]) / b[x][c]);
    }
  }
  cv::Vec3d gain(1, 1, 1);
  for (int c = 0; c < 3; ++c)
    if (ratios[c].size() > 100) gain[c] = median_of(ratios[c]);
  return gain;
}

cv::Mat difference(const cv::Mat& frame, const cv::Mat& reference, cv::Vec3d gain, const cv::Rect& roi) {
  cv::Mat f, r;
  frame(roi).convertTo(f, CV_32FC3);
  reference(roi).convertTo(r, CV_32FC3);
  cv::multiply(r, cv::Scalar(gain[0], gain[1], gain[2]), r);
  return f - r;
}

cv::Mat magnitude(const cv::Mat& d) {
  cv::Mat sq;
  cv::multiply(d, d, sq);
  cv::Mat sum = sq.reshape(1, static_cast<int>(sq.total()));
  cv::Mat out;
  cv::reduce(sum, out, 1, cv::REDUCE_SUM);
  cv::sqrt(out, out);
  return out.reshape(1, d.rows);
}

cv::Mat sample_fraction(const cv::Mat& d, cv::Vec3d u) {
  const double c2 = u.dot(u);
  cv::Mat out;
  cv::transform(d, out, cv::Matx13f(float(u[0] / c2), float(u[1] / c2), float(u[2] / c2)));
  return out;
}

cv::Vec3d mean_difference(const cv::Mat& d, const cv::Mat& mask, int* count) {
  const int n = cv::countNonZero(mask);
  if (count) *count = n;
  if (n == 0) return {0, 0, 0};
  const cv::Scalar m = cv::mean(d, mask);
  return {m[0], m[1], m[2]};
}

cv::Mat clean_mask(const cv::Mat& mask, int radius) {
  const cv::Mat kernel = cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(2 * radius + 1, 2 * radius + 1));
  cv::Mat out;
  cv::morphologyEx(mask, out, cv::MORPH_OPEN, kernel);
  cv::morphologyEx(out, out, cv::MORPH_CLOSE, kernel);
  return out;
}

cv::Mat largest_component(const cv::Mat& mask) {
  cv::Mat labels, stats, centroids;
  const int n = cv::connectedComponentsWithStats(mask, labels, stats, centroids, 8, CV_32S);
  int best = 0, best_area = 0;
  for (int i = 1; i < n; ++i)
    if (stats.at<int>(i, cv::CC_STAT_AREA) > best_area) best_area = stats.at<int>(i, cv::CC_STAT_AREA), best = i;
  if (best == 0) return cv::Mat::zeros(mask.size(), CV_8U);
  return labels == best;
}

cv::Mat components_touching(const cv::Mat& mask, const cv::Mat& seed) {
  cv::Mat labels;
  const int n = cv::connectedComponents(mask, labels, 8, CV_32S);
  std::vector<uchar> keep(static_cast<std::size_t>(n), 0);
  for (int y = 0; y < mask.rows; ++y) {
    const int* l = labels.ptr<int>(y);
    const uchar* s = seed.ptr<uchar>(y);
    for (int x = 0; x < mask.cols; ++x)
      if (s[x] && l[x] > 0) keep[static_cast<std::size_t>(l[x])] = 1;
  }
  cv::Mat out = cv::Mat::zeros(mask.size(), CV_8U);
  for (int y = 0; y < mask.rows; ++y) {
    const int* l = labels.ptr<int>(y);
    uchar* o = out.ptr<uchar>(y);
    for (int x = 0; x < mask.cols; ++x)
      if (keep[static_cast<std::size_t>(l[x])]) o[x] = 255;
  }
  return out;
}

cv::Mat fill_holes(const cv::Mat& mask) {
  std::vector<std::vector<cv::Point>> contours;
  cv::findContours(mask.clone(), contours, cv::RETR_EXTERNAL, cv::CHAIN_APPROX_NONE);
  cv::Mat out = cv::Mat::zeros(mask.size(), CV_8U);
  cv::drawContours(out, contours, -1, cv::Scalar(255), cv::FILLED);
  return out;
}

std::vector<cv::Point> outer_contour(const cv::Mat& mask, cv::Point offset) {
  std::vector<std::vector<cv::Point>> contours;
  cv::findContours(mask.clone(), contours, cv::RETR_EXTERNAL, cv::CHAIN_APPROX_NONE, offset);
  std::size_t best = contours.size();
  double best_area = -1;
  for (std::size_t i = 0; i < contours.size(); ++i) {
    const double a = cv::contourArea(contours[i]);
    if (a > best_area) best_area = a, best = i;
  }
  return best < contours.size() ? contours[best] : std::vector<cv::Point>{};
}

cv::Mat fill_in_plate(const cv::Mat& background, const cv::Mat& mask, const cv::Rect& roi) {
  cv::Mat out = background.clone();
  cv::Mat filled;
  cv::inpaint(background(roi), mask(roi), filled, 3, cv::INPAINT_TELEA);
  filled.copyTo(out(roi));
  return out;
}

double saturated_fraction(const cv::Mat& frame, const cv::Rect& roi) {
  cv::Mat channel_max;
  std::vector<cv::Mat> channels;
  cv::split(frame(roi), channels);
  channel_max = cv::max(channels[0], cv::max(channels[1], channels[2]));
  return static_cast<double>(cv::countNonZero(channel_max >= 250)) / static_cast<double>(roi.area());
}

}  // namespace spreadfit::capture
