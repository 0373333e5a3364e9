// The scale of a video: the map from image pixels to the plate plane in mm.
//
// board: a printed chessboard lying flat on the plate (or the channel floor) beside the sample. Its inner corners
//   (cv::findChessboardCorners, refined by cv::cornerSubPix; the sector-based detector as a second try) are
//   matched to their known positions on the board, and the homography image -> plane (least squares over all
//   corners, cv::findHomography) corrects a tilted camera: lengths and areas come out in mm wherever the sample
//   is on that plane (Hartley & Zisserman 2004, Multiple View Geometry, sec. 4.1, the DLT).
// ring / channel: a camera held square above; the scale comes from the ring's outline or the channel's width
//   seen in the video (made in capture.cpp from those outlines; an ellipse for the ring corrects a small tilt).
#pragma once

#include <opencv2/core.hpp>
#include <optional>
#include <string>
#include <vector>

namespace spreadfit::capture {

/// Image pixels -> plane mm.
struct PlaneMap {
  cv::Matx33d image_to_plane = cv::Matx33d::eye();  ///< homography, plane in mm

  cv::Point2d to_plane(cv::Point2d pixel) const;
  std::vector<cv::Point2d> to_plane(const std::vector<cv::Point>& pixels) const;
  cv::Point2d to_image(cv::Point2d plane) const;
  /// [mm^2 per pixel] area of one pixel at `pixel` on the plane: |det J| = |det H| / w^3 for a homography H with
  /// w = h31 x + h32 y + h33 (the Jacobian determinant of a plane projective map).
  double pixel_area(cv::Point2d pixel) const;
  /// [px/mm] the mean linear scale at `pixel`: 1 / sqrt(pixel_area).
  double pixels_per_mm(cv::Point2d pixel) const;
  /// Per-pixel areas [mm^2] over `roi` of the image (CV_32F), for summing areas.
  cv::Mat pixel_area_map(const cv::Rect& roi) const;
};

struct BoardDetection {
  PlaneMap map;
  std::vector<cv::Point2f> corners;  ///< image positions of the inner corners, row by row
  double rms_mm = 0;                 ///< corners' distance from their board positions after the map [mm]
  bool near_frame_edge = false;      ///< the board's outer squares reach the frame's edge
};

/// Finds a board of `columns` x `rows` inner corners with squares of `square_mm` in a grey image.
/// nullopt when it is not there.
std::optional<BoardDetection> find_board(const cv::Mat& gray, int columns, int rows, double square_mm);

/// When the whole board was not found: the largest smaller pattern that is visible ("7x6"), or empty. Says
/// whether the board is partly out of view or covered rather than missing.
std::string find_partial_board(const cv::Mat& gray, int columns, int rows);

}  // namespace spreadfit::capture
