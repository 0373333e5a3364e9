// Data, options and results of a fit: one material, one or more reading series (replicates or other rigs).
// Modelled on a solver's Problem / Options / Summary split: FitSeries holds observations, FitOptions says how to
// fit (each field has a documented default), FitResult reports what happened, converged or not, as values.
#pragma once

#include <Eigen/Core>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/forward.hpp"
#include "models/rheology.hpp"
#include "models/rig.hpp"

namespace spreadfit {

/// One curve of readings on one rig.
struct FitSeries {
  TestSetup setup;             ///< rig, density, reading kind
  std::vector<double> times;   ///< [s], strictly increasing, after the release
  std::vector<double> values;  ///< readings [m]
  std::optional<double> sigma; ///< stated standard uncertainty of one reading [m] (resolution)
  std::string label;           ///< source file, for messages
};

struct FitOptions {
  bool fit_time_origin = true;     ///< fit a virtual release time per series (nuisance parameter)
  double ignore_before = 0.0;      ///< [s] readings earlier than this are not fitted
  int max_iterations = 45;         ///< Levenberg-Marquardt iterations (coarse stage; a third of it to polish)
  int global_evaluations = 2000;   ///< NLopt DIRECT-L evaluations of the starting-point stage
  bool profile_intervals = true;   ///< profile-likelihood interval for the yield stress (else quadratic only)
  ForwardOptions forward;          ///< numerical settings of every forward solve
  /// Throws std::invalid_argument naming the field and the violated constraint.
  void validate() const;
};

enum class FitStatus { Converged, NotConverged, NotIdentifiable, ForwardFailure, InsufficientData };
std::string_view fit_status_name(FitStatus s);

/// A reported parameter with its 95% interval. A one-sided interval (e.g. yield stress of a sample that never
/// stopped) has lower = 0 and upper_only = true.
struct ParameterEstimate {
  std::string name;  ///< yield_stress | viscosity | consistency | flow_index | time_origin
  std::string unit;  ///< Pa | Pa.s | Pa.s^n | - | s
  double value = 0, lower = 0, upper = 0;
  bool upper_only = false;   ///< only an upper bound is supported by the data
  bool identifiable = true;  ///< false when the interval spans more than two decades
};

struct FitResult {
  Law law = Law::Newtonian;
  FitStatus status = FitStatus::NotConverged;
  std::string reason;                        ///< plain words; empty when converged
  Material material;                         ///< best fit
  std::vector<double> time_origins;          ///< per series [s] (0 when not fitted)
  std::vector<ParameterEstimate> parameters; ///< material parameters then time origins
  Eigen::MatrixXd correlation;               ///< of the fitted (log-space) parameters, same order
  Eigen::VectorXd estimate;                  ///< the fitted parameter vector (log of material parameters, then
                                             ///< release times [s]), in the order of `names`
  Eigen::MatrixXd covariance;                ///< of `estimate` (quadratic approximation; infinite where undetermined)
  std::vector<std::string> names;            ///< fitted parameter names in the correlation's order
  double rmse = 0;                           ///< root mean square of the unweighted residuals [m]
  double sigma = 0;                          ///< reading standard uncertainty used for the intervals [m]
  double aicc = 0;
  double cost = 0;                           ///< half the weighted sum of squares at the optimum
  double initial_cost = 0;                   ///< the same at the start of the polish
  int points = 0;
  int evaluations = 0;                       ///< forward solves of the full model
  int iterations = 0;
  std::vector<std::string> warnings;         ///< plain words
  bool converged() const { return status == FitStatus::Converged; }
};

}  // namespace spreadfit
