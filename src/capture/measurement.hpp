// Readings from a sample's outline on the plate plane.
//
// plate: the equivalent-area diameter D = 2 sqrt(A / pi) of the outline (README), A in mm^2 on the plane:
//   every pixel counts with its own area there (PlaneMap::pixel_area), whole inside the outline and by its sample
//   fraction on the outline's edge (segmentation.hpp). The roundness check fits an ellipse to the outline on the
//   plane (cv::fitEllipse, least squares; Fitzgibbon & Fisher 1995) and reports 1 - b/a.
// channel: the front past the gate is read in capture.cpp (front_from_profile): along the middle 30% of the
//   channel's width, the mean sample fraction per bin along the axis, and the last place it falls through 1/2
//   (the blurred edge's middle), measured from the gate line (the first step of the change at the release).
#pragma once

#include <opencv2/core.hpp>
#include <vector>

namespace spreadfit::capture {

/// [mm^2] sum over the pixels of `mask` (filled outline): those `edge` px or more inside count whole, the rest
/// within `edge` px of the outline (both sides) by `fraction` clamped to [0, 1]; each times `pixel_area`. Only
/// pixels where `counted` is non-zero take part (empty: all).
double outline_area(const cv::Mat& mask, const cv::Mat& fraction, const cv::Mat& pixel_area, int edge = 2,
                    const cv::Mat& counted = {});

/// 2 sqrt(area / pi).
double equivalent_diameter(double area);

/// 1 - b/a of the least-squares ellipse through the points (plane mm); 0 with fewer than 6 points.
double ellipticity(const std::vector<cv::Point2d>& outline);

}  // namespace spreadfit::capture
