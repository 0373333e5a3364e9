// The starting point of a fit, found on the low-order surrogate (models/low_order.hpp, microseconds a solve):
// NLopt GN_DIRECT_L (Gablonsky & Kelley 2001) over the box of the material parameters with the release times at
// zero, then NLopt LN_BOBYQA (Powell 2009) freeing the release times. The surrogate is within a few percent of the
// full model (scripts/bench), so the point lands in the right basin; Levenberg-Marquardt on the full model polishes
// it (src/fit/fit_law.cpp).
#pragma once

#include <Eigen/Core>

#include "src/fit/fit_problem.hpp"

namespace spreadfit::fit {

/// The start with `evaluations` DIRECT-L evaluations (BOBYQA gets a third as many); the centre of the box
/// (release times 0) when evaluations is 0.
Eigen::VectorXd global_start(const FitProblem& problem, int evaluations);

}  // namespace spreadfit::fit
