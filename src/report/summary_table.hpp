// The short human summary `spreadfit fit` prints to stdout for each material.
#pragma once

#include <string>

#include "src/report/fit_outcome.hpp"

namespace spreadfit {

std::string summary_table(const FitOutcome& outcome);

}  // namespace spreadfit
