// How a forward solve ended. One status for every time-stepping solver of models/ (the thin-film method of lines,
// the squeeze ODE), passed unchanged through predict_readings, so a caller learns which bound stopped a solve
// without parsing its message (the message names the bound and its value).
#pragma once

#include <string_view>

namespace spreadfit {

enum class SolveStatus {
  Ok,                 ///< every requested time was reached
  StepLimit,          ///< the bound on time steps per solve (max_steps of the solver's options) was reached
  StepSizeUnderflow,  ///< the step-size control found no acceptable step (its bound on rejections in a row was hit)
  NonFiniteState,     ///< the state or its rate became NaN or infinite
};

/// Plain words for messages: "ok", "step limit", "step size underflow", "non-finite state".
constexpr std::string_view solve_status_name(SolveStatus status) {
  switch (status) {
    case SolveStatus::Ok: return "ok";
    case SolveStatus::StepLimit: return "step limit";
    case SolveStatus::StepSizeUnderflow: return "step size underflow";
    case SolveStatus::NonFiniteState: return "non-finite state";
  }
  return "unknown";  // not reached: every enumerator is listed above (-Wswitch names a missing one)
}

}  // namespace spreadfit
