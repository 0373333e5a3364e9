// SVG of an individuals control chart (`spreadfit history DB --chart FILE.svg`), 900 px wide.
//
// Header: `title`, then the parameter and unit, the number of batches, the centre line and the limits with how
// they were set (mean +/- 2.66 x mean moving range). Chart: the values joined in batch order, the centre line
// (solid), the upper and lower control limits (dashed, labelled at the right with their values) with the area
// beyond them lightly shaded, and one marker a batch:
//   filled circle        within the limits and not in a run
//   red diamond          beyond a control limit            (marker class "beyond-limits")
//   amber square         in a run of `run_length` or more on one side of the centre line (class "in-run")
//   red diamond, amber outline: both
// every marker of class "point" with a tooltip naming the batch and value; a legend with the count of each mark.
// The x axis is labelled with the batch ids (slanted; every k-th one when closer than 22 px, ids longer than 24
// characters shortened with an ellipsis). Footer: the bench caution (fit_outcome.hpp).
#pragma once

#include <string>

#include "src/qc/control_chart.hpp"

namespace spreadfit::report {

/// Also drawn: the product's spec limits (dotted, USL/LSL) when the chart has them; the batches left out of the
/// chart (ControlChart::left_out) as hollow grey triangles (class "left-out") on the chart's bottom edge at their
/// place in the order, each named with its reason in a note under the header (class "left-out-note"); a log value
/// axis when the chart was computed on a log scale, with the reason for the scale in the header.
/// Non-finite values are left out of the line and the markers (the legend says how many).
std::string control_chart_svg(const qc::ControlChart& chart, const std::string& title);

}  // namespace spreadfit::report
