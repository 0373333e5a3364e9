// A one-state model of the spreading front for instant estimates and starting points of the fit:
//     dx_f/dt = U(x_f) * S(x_f)
// U is the front speed of the power-law similarity solution at the same front position (Gratton, Minotti &
// Mahajan 1999; Huppert 1982 for n = 1): with x^(2n+3) = P_p (rho g/K) A^(n+2) t^n, U = n x / ((2n+3) t(x));
// axisymmetric with 3n+5 and P_a. S is a yield slow-down, S = (1 - (x/L)^k)^(1+1/n), where L is the plastic
// arrest extent (9 rho g A^2/(8 L^3) planar; Roussel & Coussot 2005 axisymmetric), k = 3 planar or 5 axisymmetric
// (the basal stress of the plastic profile scales as x^-k), and the power 1 + 1/n makes the approach to arrest
// decay like t^-n (Matson & Hogg 2007). So the model follows Huppert's law exactly without a yield stress and
// stops exactly at the plastic-limit extent; in between it is an approximation (its error against the method of
// lines is measured by scripts/bench and reported in the README).
#pragma once

#include <vector>

#include "models/thin_film.hpp"

namespace spreadfit {

struct LowOrderSolution {
  std::vector<double> fronts;  ///< [m], from the wall or the axis
  double arrest_extent = 0.0;  ///< plastic-limit extent [m] (infinite without a yield stress)
};

/// Front positions at the given times (non-decreasing, >= 0) for the same problem the method of lines solves.
LowOrderSolution solve_low_order(const SpreadingProblem& problem, const std::vector<double>& times);

}  // namespace spreadfit
