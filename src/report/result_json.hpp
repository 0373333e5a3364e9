// The machine-readable result of one fitted material (interface.md, "Result (JSON, one object per test)").
#pragma once

#include <nlohmann/json.hpp>

#include "src/report/fit_outcome.hpp"

namespace spreadfit {

nlohmann::json result_json(const FitOutcome& outcome);

}  // namespace spreadfit
