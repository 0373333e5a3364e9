// The machine-readable result of one fitted material (README, "Result JSON").
#pragma once

#include <nlohmann/json.hpp>

#include "src/report/fit_outcome.hpp"

namespace spreadfit::report {

nlohmann::json result_json(const FitOutcome& outcome);

}  // namespace spreadfit::report
