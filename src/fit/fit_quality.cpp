#include "src/fit/fit_quality.hpp"

#include <algorithm>
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <cmath>
#include <fmt/format.h>

namespace spreadfit::fit {

std::string_view fit_quality_name(FitQuality q) {
  switch (q) {
    case FitQuality::Good: return "good";
    case FitQuality::AboveResolution: return "above resolution";
    case FitQuality::Outlier: return "outlier";
    case FitQuality::SystematicMisfit: return "systematic misfit";
    case FitQuality::PriorConflict: return "contradicts the product's prior";
  }
  return "good";
}

std::vector<QualityFinding> judge_fit_quality(const std::vector<SeriesResiduals>& series, int parameters) {
  std::vector<QualityFinding> out;
  int n = 0;
  double ss = 0.0, chi2 = 0.0;
  bool stated = true;
  for (const SeriesResiduals& s : series) {
    n += int(s.residuals.size());
    for (double r : s.residuals) {
      ss += r * r;
      if (s.sigma > 0) chi2 += (r / s.sigma) * (r / s.sigma);
    }
    if (!(s.sigma > 0)) stated = false;
  }
  const int dof = n - parameters;
  if (dof < 2) return out;
  const double rmse = std::sqrt(ss / n);

  // The single largest residual against the scatter of the others.
  const SeriesResiduals* worst_series = nullptr;
  std::size_t worst = 0;
  double worst_z = 0.0;
  for (const SeriesResiduals& s : series)
    for (std::size_t i = 0; i < s.residuals.size(); ++i) {
      const double r = s.residuals[i];
      double scale = std::sqrt(std::max(ss - r * r, 0.0) / std::max(dof - 1, 1));
      if (s.sigma > 0) scale = std::max(scale, s.sigma);
      const double z = scale > 0 ? std::abs(r) / scale : 0.0;
      if (z > worst_z) worst_z = z, worst_series = &s, worst = i;
    }
  const double outlier_cut =
      boost::math::quantile(boost::math::complement(boost::math::normal(), 0.01 / (2.0 * n)));
  const bool outlier = worst_series && worst_z > outlier_cut;
  if (outlier) {
    const SeriesResiduals& s = *worst_series;
    out.push_back({FitQuality::Outlier,
                   fmt::format("the reading at {:.4g} s in {} ({:.4g} mm) lies {:.3g} mm from the fitted curve, {:.1f} "
                               "times the scatter of the others: a misread or a transposed digit? Check it, correct "
                               "or delete the row, and fit again",
                               s.times[worst], s.label.empty() ? std::string("the readings") : s.label,
                               s.readings[worst] * 1e3, std::abs(s.residuals[worst]) * 1e3, worst_z)});
  }

  if (stated) {
    const double cut = boost::math::quantile(boost::math::chi_squared(double(dof)), 0.999);
    double sigma = 0.0;
    for (const SeriesResiduals& s : series) sigma = std::max(sigma, s.sigma);
    if (chi2 > cut && rmse > 1.5 * sigma && !outlier)
      out.push_back({FitQuality::AboveResolution,
                     fmt::format("the readings scatter {:.3g} mm about the fitted curve, {:.1f} times the stated "
                                 "resolution ({:.3g} mm): misreads, a disturbed test, or a model that does not "
                                 "describe this sample; the intervals were widened to the scatter",
                                 rmse * 1e3, rmse / sigma, sigma * 1e3)});
  }

  // Runs of one sign, over the series in time order (a run does not continue across series).
  int plus = 0, minus = 0, runs = 0;
  for (const SeriesResiduals& s : series) {
    int last = 0;
    for (double r : s.residuals) {
      const int sign = r > 0 ? 1 : (r < 0 ? -1 : 0);
      if (sign == 0) continue;
      (sign > 0 ? plus : minus) += 1;
      if (sign != last) ++runs;
      last = sign;
    }
  }
  // Residuals a hundredth of the stated resolution and below are under anything the readings can show (readings
  // simulated by the same model, solver rounding): their signs say nothing about the readings' shape.
  double resolution = 0.0;
  for (const SeriesResiduals& s : series) resolution = std::max(resolution, s.sigma);
  const bool visible = !stated || rmse >= 0.01 * resolution;
  const int m = plus + minus;
  if (visible && m >= 10 && plus > 0 && minus > 0) {
    const double mean = 2.0 * plus * minus / m + 1.0;
    const double var = (mean - 1.0) * (mean - 2.0) / (m - 1.0);
    const double z = var > 0 ? (runs - mean) / std::sqrt(var) : 0.0;
    const double cut = boost::math::quantile(boost::math::normal(), 0.001);
    if (z < cut)
      out.push_back({FitQuality::SystematicMisfit,
                     fmt::format("the residuals run in long stretches of one sign ({} runs where about {:.0f} are "
                                 "expected): the fitted curve does not follow the readings' shape (a sample that "
                                 "slipped, stopped abruptly or was disturbed?); look at the plot before using "
                                 "these numbers",
                                 runs, mean)});
  }
  return out;
}

}  // namespace spreadfit::fit
