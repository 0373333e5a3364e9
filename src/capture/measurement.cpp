#include "src/capture/measurement.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <opencv2/imgproc.hpp>

namespace spreadfit::capture {

double outline_area(const cv::Mat& mask, const cv::Mat& fraction, const cv::Mat& pixel_area, int edge,
                    const cv::Mat& counted) {
  const cv::Mat kernel = cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(2 * edge + 1, 2 * edge + 1));
  cv::Mat inner, outer;
  cv::erode(mask, inner, kernel);
  cv::dilate(mask, outer, kernel);
  double area = 0;
  for (int y = 0; y < mask.rows; ++y) {
    const uchar* in = inner.ptr<uchar>(y);
    const uchar* out = outer.ptr<uchar>(y);
    const uchar* c = counted.empty() ? nullptr : counted.ptr<uchar>(y);
    const float* f = fraction.ptr<float>(y);
    const float* a = pixel_area.ptr<float>(y);
    for (int x = 0; x < mask.cols; ++x) {
      if (c && !c[x]) continue;
      if (in[x])
        area += a[x];
      else if (out[x])
        area += std::clamp(static_cast<double>(f[x]), 0.0, 1.0) * a[x];
    }
  }
  return area;
}

double equivalent_diameter(double area) { return 2.0 * std::sqrt(std::max(area, 0.0) / std::numbers::pi); }

double ellipticity(const std::vector<cv::Point2d>& outline) {
  if (outline.size() < 6) return 0;
  std::vector<cv::Point2f> points(outline.begin(), outline.end());
  const cv::RotatedRect e = cv::fitEllipse(points);
  const double a = std::max(e.size.width, e.size.height), b = std::min(e.size.width, e.size.height);
  return a > 0 ? 1.0 - b / a : 0;
}

}  // namespace spreadfit::capture
