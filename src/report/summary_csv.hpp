// One row per fitted material, for spreadsheets: ids, rig, law, every parameter with its 95% interval (empty
// cells where a law lacks the parameter or the fit failed), fit quality and verdict. Units in the header.
#pragma once

#include <string>
#include <vector>

#include "src/report/fit_outcome.hpp"

namespace spreadfit::report {

std::string summary_csv(const std::vector<FitOutcome>& outcomes);

}  // namespace spreadfit::report
