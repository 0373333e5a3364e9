// SVG report of a prediction (`spreadfit predict ... --plot FILE.svg`), 900 px wide: what a fitted material would
// read on another rig, for a person deciding whether to trust a cheap test's reading or a spec moved between rigs.
//
// From top to bottom:
//   header   the reading and the rig (kind, geometry, fill, density); the material (law, source file, each
//            parameter with its 95% range from the fit's log-space normal approximation); what the band carries
//   panel    time axis [s] from 0 to the last requested time; the predicted curve at 81 times and its 95% band;
//            the requested times as markers (class "predicted", tooltip with the band); the rig's own readings
//            when its test description has a readings file of the same kind (class "measured", with +/- the
//            stated resolution), and how many of them fall inside the band
//   footer   what the band leaves out (model error, rig-to-rig differences, the other rig's release time), notes,
//            and the bench caution
// Unit of the reading axis: cm when the values reach 3 cm, else mm (as the fit report).
#pragma once

#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"
#include "src/fit/prediction_band.hpp"
#include "src/io/description_file.hpp"

namespace spreadfit::report {

struct PredictionReport {
  const fit::FitResult* material = nullptr;  ///< the stored fit (material parameters only, log-space covariance)
  std::string material_source;          ///< the result file, as the user named it
  const io::TestDescription* rig = nullptr;
  Reading reading = Reading::Front;  ///< what is predicted
  fit::PredictionBand curve;              ///< over a dense set of times, for the line and the band
  fit::PredictionBand at_times;           ///< at the requested times (the CSV's rows)
  std::vector<std::string> notes;    ///< e.g. how many draws solved
};

/// Never throws for numerical trouble: non-finite values are left out of the drawing.
std::string prediction_plot_svg(const PredictionReport& report);

}  // namespace spreadfit::report
