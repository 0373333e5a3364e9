// SVG report of one fitted material (`spreadfit fit --plot FILE.svg`), 900 px wide, for a person deciding
// whether the fit can be trusted and what it says.
//
// From top to bottom:
//   header     sample id and product; the law and why it was chosen; each parameter with its 95% interval; the
//              fit's rmse; a verdict badge (PASS, FAIL or NO SPEC; "marginal" under it when a 95% interval
//              crosses a spec limit)
//   legend     one entry per series (marker shape and colour, file name, readings, error bar size), the fitted
//              curve and its band
//   readings   one panel per kind of reading (front, radius, diameter, gap), shared time axis [s]; readings
//              with +/- 1 standard uncertainty error bars (the series' stated resolution, else the fit's sigma);
//              the best-fit curve at 81 times from 0 to the last reading and its 95% band (prediction_band with
//              200 parameter draws); the reading unit is cm when the panel reaches 3 cm, else mm
//   residuals  reading - fit [mm] at every reading, the zero line and dashed +/- 2 sigma lines
//   footer     the fit's warnings and the bench caution (fit_outcome.hpp)
// A failed fit (no result) still shows the readings, with a "no result" note and each law's failure, and no
// curve, band, residuals or parameters. Series with no readings are left out; no series at all (a final-only
// test) gives the header, the note and the footer.
//
// Every reading marker has class "reading" and every residual marker class "residual" (one per reading), each
// with a tooltip (<title>) giving the series, time and value.
#pragma once

#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"
#include "src/report/fit_outcome.hpp"

namespace spreadfit::report {

/// `series` are the series the fit saw, in the order of the fitted release times (FitResult::time_origins).
/// Runs the forward model (about 200 solves a series for the band); never throws for numerical trouble (a band
/// that cannot be computed is left out with a note).
std::string fit_plot_svg(const FitOutcome& outcome, const std::vector<fit::FitSeries>& series);

}  // namespace spreadfit::report
