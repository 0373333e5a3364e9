// Is the fitted curve a fair description of the readings? Three checks on the residuals of a converged fit, each
// with a plain warning that says what to look at (DEVELOPERS.md, "The inverse problem": "residuals far above the stated
// resolution, a single outlying reading, runs of one residual sign: each is reported, never passed silently").
//  - AboveResolution: with a stated reading uncertainty sigma, chi^2 = sum (r/sigma)^2 above its 0.999 quantile
//    on n - p degrees of freedom and the rmse above 1.5 sigma (the readings scatter more than the rig reads).
//  - Outlier: one reading whose residual, against the scatter of the others (leave-one-out standard deviation,
//    or sigma when stated and larger), exceeds the two-sided normal quantile at 1% / n (a Bonferroni bound: a
//    clean curve of n readings trips it in 1% of tests): a misread or a transposed digit. It is named.
//  - SystematicMisfit: the Wald-Wolfowitz runs test on the residual signs in time order (Wald & Wolfowitz 1940;
//    NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.5.13): far fewer runs than chance (one-sided
//    p < 0.001), i.e. long stretches of one sign: the model does not follow the curve's shape (a sample that
//    stopped abruptly, slipped, or was read on a moving ruler).
#pragma once

#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

struct QualityFinding {
  FitQuality kind = FitQuality::Good;
  std::string message;  ///< plain words, names the reading for an outlier
};

/// The residuals of one series in time order, unweighted [m].
struct SeriesResiduals {
  std::string label;             ///< source file
  std::vector<double> times;     ///< [s] as entered
  std::vector<double> readings;  ///< [m]
  std::vector<double> residuals; ///< model - reading [m]
  double sigma = 0;              ///< stated standard uncertainty [m], 0 when none was stated
};

/// Findings for a fit with `parameters` fitted parameters; empty when the fit is a fair description.
std::vector<QualityFinding> judge_fit_quality(const std::vector<SeriesResiduals>& series, int parameters);

}  // namespace spreadfit::fit
