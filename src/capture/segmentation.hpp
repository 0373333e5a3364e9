// Telling the sample from the plate in a frame.
//
// The plate's look comes from the still frames before the release: their per-pixel median is the background
// (any fixed lighting gradient, plate print or table edge is in it). Where the sample (and the ring or gate) sat
// before the release the plate is not visible, so the reference there is filled in from the plate around it
// (cv::inpaint, Telea 2004, J. Graphics Tools 9). A frame's exposure may drift (phones adjust it): each frame is
// compared with the reference times a per-channel gain measured on the plate away from the sample.
//
// The difference d = frame - gain * reference is projected on the sample's own colour difference u (the mean d
// over sample pixels well inside the outline, |u| = C): f = d.u / C^2 is 0 on the plate and 1 on the sample, and
// a blurred edge crosses 1/2 where the true edge is. The mask is f > 1/2, opened and closed morphologically
// (specks and pinholes of a few pixels), and its outer contour filled (glare spots inside the sample stay
// inside). Areas count whole pixels inside the outline and the fraction f of the pixels on its edge, so the edge
// is placed to a fraction of a pixel: the projection is signed, so sensor noise averages out instead of adding.
#pragma once

#include <opencv2/core.hpp>
#include <vector>

namespace spreadfit::capture {

/// Per-pixel median of frames of one size (BGR, 8 bits).
cv::Mat median_frame(const std::vector<cv::Mat>& frames);

/// [grey levels] standard deviation of the sensor noise per channel, from still frames and their median (1.4826
/// times the median absolute deviation, scaled for the median of n frames); 1 when there is only one frame.
double noise_level(const std::vector<cv::Mat>& stills, const cv::Mat& background);

/// Per-channel gain frame / background over pixels where `exclude` is zero (every 4th pixel, median of ratios).
cv::Vec3d exposure_gain(const cv::Mat& frame, const cv::Mat& background, const cv::Mat& exclude);

/// d = frame - gain * reference over `roi`, as CV_32FC3.
cv::Mat difference(const cv::Mat& frame, const cv::Mat& reference, cv::Vec3d gain, const cv::Rect& roi);

/// |d| per pixel (CV_32F).
cv::Mat magnitude(const cv::Mat& difference);

/// d.u / |u|^2 per pixel (CV_32F): 0 plate, 1 sample.
cv::Mat sample_fraction(const cv::Mat& difference, cv::Vec3d contrast);

/// Mean of d over the non-zero pixels of `mask`; zero vector when it has none.
cv::Vec3d mean_difference(const cv::Mat& difference, const cv::Mat& mask, int* count = nullptr);

/// Opening then closing with an ellipse of `radius` px: specks and pinholes go.
cv::Mat clean_mask(const cv::Mat& mask, int radius);
/// The 8-connected component of `mask` with the most pixels (empty mask when there is none).
cv::Mat largest_component(const cv::Mat& mask);
/// The components of `mask` that touch a non-zero pixel of `seed`.
cv::Mat components_touching(const cv::Mat& mask, const cv::Mat& seed);
/// Everything inside the mask's outer contours.
cv::Mat fill_holes(const cv::Mat& mask);
/// The outer contour of the largest region (image coordinates shifted by `offset`).
std::vector<cv::Point> outer_contour(const cv::Mat& mask, cv::Point offset = {});

/// B with the pixels under `mask` (non-zero) filled in from around them, within `roi`.
cv::Mat fill_in_plate(const cv::Mat& background, const cv::Mat& mask, const cv::Rect& roi);

/// Fraction of pixels in `roi` with a channel at 250 or above (saturated: glare).
double saturated_fraction(const cv::Mat& frame, const cv::Rect& roi);

}  // namespace spreadfit::capture
