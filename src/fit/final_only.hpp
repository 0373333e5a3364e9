// Yield stress from a single arrested reading (the sample had stopped; only the final reading is known), by the
// published static relations of each rig in the plastic limit:
//   channel  tau_y = 9 rho g A^2 / (8 L^3), A = V/W, L the arrested length from the wall (thin-film plastic limit)
//   plate    tau_y = 225 rho g V^2 / (128 pi^2 R^5)                       (Roussel & Coussot 2005, J. Rheol. 49)
//   squeeze  F = 2 pi tau_y R^3 / (3 h), R = sqrt(V / (pi h))             (perfectly plastic squeeze, Engmann et al. 2005)
//   slump    the slump model of models/slump.hpp inverted for tau_y      (Pashias et al. 1996)
// The interval propagates the reading's standard uncertainty (1 mm when none is stated) to first order in log
// space. No other parameter can be estimated from one reading.
#pragma once

#include <optional>
#include <string>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

/// A plain warning when `reading` is an arrest too short for the whole sample to have yielded (channel and
/// plate), where the plastic-limit relation bounds the yield stress from below only; nullopt otherwise.
std::optional<std::string> partial_yield(const TestSetup& setup, double reading);

/// Estimates the yield stress (a lower bound only, upper_open, where partial_yield warns); status NotIdentifiable when the reading is outside the relation's range
/// (e.g. no slump at all: only a lower bound would follow).
FitResult fit_final_reading(const TestSetup& setup, double reading, std::optional<double> sigma);

}  // namespace spreadfit::fit
