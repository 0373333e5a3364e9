// Fit-quality findings (src/fit/fit_quality.hpp): defining properties on residuals of known make-up, and the
// end-to-end rule that such a batch never passes silently.
#include <doctest/doctest.h>

#include <cmath>
#include <random>

#include "fit_test_support.hpp"
#include "src/fit/fit_law.hpp"
#include "src/fit/fit_quality.hpp"
#include "src/qc/verdict.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

namespace {

fit::SeriesResiduals gaussian(double sd, double stated, unsigned seed, int n = 30) {
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, sd);
  fit::SeriesResiduals s;
  s.label = "run.csv";
  s.sigma = stated;
  for (int i = 0; i < n; ++i) {
    s.times.push_back(3.0 * (i + 1));
    s.readings.push_back(0.05 + 0.001 * i);
    s.residuals.push_back(noise(rng));
  }
  return s;
}

bool has(const std::vector<fit::QualityFinding>& f, fit::FitQuality q) {
  for (const auto& x : f)
    if (x.kind == q) return true;
  return false;
}

}  // namespace

TEST_CASE("clean residuals at the stated resolution give no finding") {
  // Each check is set so that a clean curve trips it rarely (0.1% chi-square, 1% Bonferroni outlier bound, 0.1%
  // runs test): over 50 seeds at most one finding in all.
  int findings = 0;
  for (unsigned seed = 1; seed <= 50; ++seed) findings += int(fit::judge_fit_quality({gaussian(1e-3, 1e-3, seed)}, 4).size());
  CHECK(findings <= 1);
}

TEST_CASE("a transposed digit is named as an outlier") {
  // 7.4 mm off against a 1 mm resolution: a reading of 57.1 mm written 64.5 mm (digits swapped and misread).
  fit::SeriesResiduals s = gaussian(1e-3, 1e-3, 7);
  s.residuals[11] = -7.4e-3;
  const auto f = fit::judge_fit_quality({s}, 4);
  REQUIRE(has(f, fit::FitQuality::Outlier));
  CHECK(f.front().message.find("at 36 s in run.csv") != std::string::npos);
  CHECK_FALSE(has(f, fit::FitQuality::AboveResolution));  // the outlier explains the excess scatter
}

TEST_CASE("scatter three times the stated resolution is reported") {
  const auto f = fit::judge_fit_quality({gaussian(3e-3, 1e-3, 11)}, 4);
  CHECK(has(f, fit::FitQuality::AboveResolution));
}

TEST_CASE("long runs of one residual sign are a systematic misfit") {
  // The Wald-Wolfowitz runs test (NIST/SEMATECH e-Handbook 1.3.5.13): 30 residuals in three blocks of ten (3 runs,
  // about 16 expected for 15 + 15 signs; z = -4.8).
  fit::SeriesResiduals s = gaussian(1e-4, 1e-3, 3);
  for (int i = 0; i < 30; ++i) s.residuals[std::size_t(i)] = (i / 10 == 1 ? -1.0 : 1.0) * 5e-4;
  const auto f = fit::judge_fit_quality({s}, 4);
  CHECK(has(f, fit::FitQuality::SystematicMisfit));
  CHECK_FALSE(has(f, fit::FitQuality::Outlier));
}

TEST_CASE("runs of one sign far below the stated resolution are no misfit") {
  // The same three blocks at 1e-8 m against a 1 mm resolution: the residuals of readings the model itself
  // simulated (solver rounding); no reading could show such a pattern. At a tenth of the resolution it counts.
  fit::SeriesResiduals s = gaussian(1e-4, 1e-3, 3);
  for (int i = 0; i < 30; ++i) s.residuals[std::size_t(i)] = (i / 10 == 1 ? -1.0 : 1.0) * 1e-8;
  CHECK(fit::judge_fit_quality({s}, 4).empty());
  for (double& r : s.residuals) r *= 1e4;  // 1e-4 m
  CHECK(has(fit::judge_fit_quality({s}, 4), fit::FitQuality::SystematicMisfit));
}

TEST_CASE("a fit with a misread reading fails its verdict with a fit-quality check") {
  fit::FitSeries s = synthetic(channel_setup(), {30, 2.0, 1.0}, 5e-4, 21, 0.3, 3.0, 90.0);
  s.values[9] += 7.4e-3;
  const fit::FitResult r = fit::fit_law({s}, Law::Bingham);
  REQUIRE(r.converged());
  REQUIRE_FALSE(r.quality.empty());
  CHECK(r.quality.front() == fit::FitQuality::Outlier);
  const qc::Verdict v = qc::judge(r, {io::SpecLimit{"yield_stress", 1.0, 100.0}});
  CHECK(v.status == qc::Verdict::Status::Fail);
  CHECK(v.checks.back().parameter == "fit_quality");
  // Without limits too: a batch with a finding never passes (exit 1), where one without both gives no verdict.
  const qc::Verdict unlimited = qc::judge(r, {});
  CHECK(unlimited.status == qc::Verdict::Status::Fail);
  REQUIRE(unlimited.checks.size() == 1);
  CHECK(unlimited.checks.front().parameter == "fit_quality");
  fit::FitResult clean = r;
  clean.quality.clear();
  CHECK(qc::judge(clean, {}).status == qc::Verdict::Status::None);
}

TEST_CASE("a first row 0,0 marks the release and is not fitted") {
  // What technicians write at the gate opening; the release time is fitted instead (common practice, no source).
  fit::FitSeries s = synthetic(channel_setup(), {30, 2.0, 1.0}, 5e-4, 22, 0.3, 3.0, 90.0);
  s.times.insert(s.times.begin(), 0.0);
  s.values.insert(s.values.begin(), 0.0);
  const fit::FitResult r = fit::fit_law({s}, Law::Bingham);
  REQUIRE(r.converged());
  CHECK(r.points == int(s.times.size()) - 1);
  CHECK(r.quality.empty());
  bool noted = false;
  for (const auto& w : r.warnings) noted = noted || w.find("row at 0 s marks the release") != std::string::npos;
  CHECK(noted);
  CHECK(estimate(r, "yield_stress").lower <= 30.0);
  CHECK(estimate(r, "yield_stress").upper >= 30.0);
}
