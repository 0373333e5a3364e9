#include "src/capture/board_homography.hpp"

#include <cmath>
#include <opencv2/calib3d.hpp>
#include <opencv2/imgproc.hpp>

namespace spreadfit::capture {

cv::Point2d PlaneMap::to_plane(cv::Point2d p) const {
  const cv::Matx33d& h = image_to_plane;
  const double w = h(2, 0) * p.x + h(2, 1) * p.y + h(2, 2);
  return {(h(0, 0) * p.x + h(0, 1) * p.y + h(0, 2)) / w, (h(1, 0) * p.x + h(1, 1) * p.y + h(1, 2)) / w};
}

std::vector<cv::Point2d> PlaneMap::to_plane(const std::vector<cv::Point>& pixels) const {
  std::vector<cv::Point2d> out;
  out.reserve(pixels.size());
  for (const cv::Point& p : pixels) out.push_back(to_plane(cv::Point2d(p.x, p.y)));
  return out;
}

cv::Point2d PlaneMap::to_image(cv::Point2d p) const {
  const cv::Matx33d h = image_to_plane.inv();
  const double w = h(2, 0) * p.x + h(2, 1) * p.y + h(2, 2);
  return {(h(0, 0) * p.x + h(0, 1) * p.y + h(0, 2)) / w, (h(1, 0) * p.x + h(1, 1) * p.y + h(1, 2)) / w};
}

double PlaneMap::pixel_area(cv::Point2d p) const {
  const cv::Matx33d& h = image_to_plane;
  const double w = h(2, 0) * p.x + h(2, 1) * p.y + h(2, 2);
  return std::abs(cv::determinant(h) / (w * w * w));
}

double PlaneMap::pixels_per_mm(cv::Point2d pixel) const { return 1.0 / std::sqrt(pixel_area(pixel)); }

cv::Mat PlaneMap::pixel_area_map(const cv::Rect& roi) const {
  cv::Mat area(roi.height, roi.width, CV_32F);
  const cv::Matx33d& h = image_to_plane;
  const double det = std::abs(cv::determinant(h));
  for (int y = 0; y < roi.height; ++y) {
    auto* row = area.ptr<float>(y);
    const double py = roi.y + y;
    for (int x = 0; x < roi.width; ++x) {
      const double w = h(2, 0) * (roi.x + x) + h(2, 1) * py + h(2, 2);
      row[x] = static_cast<float>(det / std::abs(w * w * w));
    }
  }
  return area;
}

namespace {

/// The classic detector (adaptive threshold, normalised image) refined to sub-pixel, then the sector-based one.
std::optional<std::vector<cv::Point2f>> detect_corners(const cv::Mat& gray, cv::Size pattern) {
  std::vector<cv::Point2f> corners;
  const int flags = cv::CALIB_CB_ADAPTIVE_THRESH | cv::CALIB_CB_NORMALIZE_IMAGE;
  if (cv::findChessboardCorners(gray, pattern, corners, flags)) {
    // Window: a third of the smallest corner spacing, so the search never reaches the next corner.
    double spacing = 1e9;
    for (int r = 0; r < pattern.height; ++r)
      for (int c = 0; c + 1 < pattern.width; ++c)
        spacing = std::min(spacing, cv::norm(corners[r * pattern.width + c + 1] - corners[r * pattern.width + c]));
    const int half = std::clamp(static_cast<int>(spacing / 3), 2, 11);
    cv::cornerSubPix(gray, corners, cv::Size(half, half), cv::Size(-1, -1),
                     cv::TermCriteria(cv::TermCriteria::EPS + cv::TermCriteria::COUNT, 40, 0.01));
    return corners;
  }
  if (cv::findChessboardCornersSB(gray, pattern, corners, cv::CALIB_CB_NORMALIZE_IMAGE)) return corners;
  return std::nullopt;
}

}  // namespace

std::optional<BoardDetection> find_board(const cv::Mat& gray, int columns, int rows, double square_mm) {
  const cv::Size pattern(columns, rows);
  auto corners = detect_corners(gray, pattern);
  if (!corners) return std::nullopt;
  std::vector<cv::Point2f> board;
  for (int r = 0; r < rows; ++r)
    for (int c = 0; c < columns; ++c)
      board.emplace_back(static_cast<float>(c * square_mm), static_cast<float>(r * square_mm));
  const cv::Mat h = cv::findHomography(*corners, board, 0);
  if (h.empty()) return std::nullopt;
  BoardDetection out;
  out.map.image_to_plane = cv::Matx33d(h);
  out.corners = *corners;
  double sum = 0;
  for (std::size_t i = 0; i < board.size(); ++i) {
    const cv::Point2d p = out.map.to_plane(cv::Point2d((*corners)[i]));
    sum += std::pow(p.x - board[i].x, 2) + std::pow(p.y - board[i].y, 2);
  }
  out.rms_mm = std::sqrt(sum / static_cast<double>(board.size()));
  // The outer squares lie one square beyond the inner corners: are they inside the frame, with a pixel to spare?
  for (const cv::Point2d q :
       {cv::Point2d(-square_mm, -square_mm), cv::Point2d(columns * square_mm, -square_mm),
        cv::Point2d(-square_mm, rows * square_mm), cv::Point2d(columns * square_mm, rows * square_mm)}) {
    const cv::Point2d p = out.map.to_image(q);
    if (p.x < 1 || p.y < 1 || p.x > gray.cols - 2 || p.y > gray.rows - 2) out.near_frame_edge = true;
  }
  return out;
}

std::string find_partial_board(const cv::Mat& gray, int columns, int rows) {
  for (int lost = 1; lost <= 3; ++lost)  // a few sizes only: each try is a full detection
    for (int dc = 0; dc <= lost; ++dc) {
      const int c = columns - dc, r = rows - (lost - dc);
      if (c < 3 || r < 3) continue;
      std::vector<cv::Point2f> corners;
      if (cv::findChessboardCornersSB(gray, cv::Size(c, r), corners))
        return std::to_string(c) + "x" + std::to_string(r);
    }
  return {};
}

}  // namespace spreadfit::capture
