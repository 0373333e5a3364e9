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

namespace spreadfit::fit {

/// One curve of readings on one rig.
struct FitSeries {
  TestSetup setup;             ///< rig, density, reading kind
  std::vector<double> times;   ///< [s], strictly increasing, after the release
  std::vector<double> values;  ///< readings [m]
  std::optional<double> sigma; ///< stated standard uncertainty of one reading [m] (resolution)
  std::string label;           ///< source file, for messages
};

/// What is known of a product's flow index before this batch (a spec catalogue entry, or learned from the
/// product's earlier batches): a normal prior, typical value and standard deviation (DEVELOPERS.md, "The inverse problem").
struct FlowIndexPrior {
  double typical = 0;        ///< [-]
  double spread = 0;         ///< standard deviation [-], > 0
  std::string source;        ///< plain words: where it came from (catalogue entry, history of N batches)
};

struct FitOptions {
  bool fit_time_origin = true;     ///< fit a virtual release time per series (nuisance parameter)
  double ignore_before = 0.0;      ///< [s] readings earlier than this are not fitted
  int max_iterations = 45;         ///< Levenberg-Marquardt iterations (coarse stage; a third of it to polish)
  int global_evaluations = 2000;   ///< NLopt DIRECT-L evaluations of the starting-point stage
  bool profile_intervals = true;   ///< profile-likelihood intervals for every material parameter (else quadratic)
  std::optional<FlowIndexPrior> flow_index_prior;  ///< product knowledge on the flow index (none by default)
  int likelihood_draws = 200;      ///< parameter vectors drawn from the likelihood for bands (with profile
                                   ///< intervals; src/fit/likelihood_draws.hpp); 0 for none
  double prior_scale = 1.0;        ///< the prior residual's scale: sqrt of the residual variance in weighting
                                   ///< units (1 with a stated resolution; set by fit_with_prior otherwise)
  ForwardOptions forward;          ///< numerical settings of every forward solve
  /// Throws std::invalid_argument naming the field and the violated constraint.
  void validate() const;
};

enum class FitStatus { Converged, NotConverged, NotIdentifiable, ForwardFailure, InsufficientData };
std::string_view fit_status_name(FitStatus s);

/// A reported parameter with its 95% interval (profile likelihood). A one-sided interval (e.g. yield stress of a
/// sample that never stopped) has lower = 0 and upper_only = true. A side of the interval that reached the
/// parameter's physical range before the likelihood cut-off is open: lower/upper then hold that range's end.
struct ParameterEstimate {
  std::string name;  ///< yield_stress | viscosity | consistency | flow_index | time_origin
  std::string unit;  ///< Pa | Pa.s | Pa.s^n | - | s
  double value = 0, lower = 0, upper = 0;
  bool upper_only = false;   ///< only an upper bound is supported by the data (yield stress: lower = 0)
  bool lower_open = false;   ///< the readings set no lower limit within the parameter's range
  bool upper_open = false;   ///< the readings set no upper limit within the parameter's range
  bool identifiable = true;  ///< false when undetermined: open on both sides, or spanning more than two decades
  bool profiled = false;     ///< interval from the profile likelihood (else quadratic)
};

/// Fit-quality findings (src/fit/fit_quality.hpp): each one has a plain warning, and a batch with any of them
/// is never passed silently.
enum class FitQuality { Good, AboveResolution, Outlier, SystematicMisfit, PriorConflict };
std::string_view fit_quality_name(FitQuality q);

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
  std::vector<Eigen::VectorXd> draws;        ///< parameter vectors drawn from the likelihood (layout of
                                             ///< `estimate`), for bands; empty without profile intervals
  double draws_effective_size = 0;           ///< importance-sampling effective size behind `draws`
  std::vector<Eigen::VectorXd> ridge;        ///< profile-walk points inside the 95% likelihood region (layout of
                                             ///< `estimate`): a band must reach every one of them
  double rmse = 0;                           ///< root mean square of the unweighted residuals [m]
  double sigma = 0;                          ///< reading standard uncertainty used for the intervals [m]
  double aicc = 0;
  double cost = 0;                           ///< half the weighted sum of squares at the optimum
  double initial_cost = 0;                   ///< the same at the start of the polish
  int points = 0;
  int evaluations = 0;                       ///< forward solves of the full model
  int iterations = 0;
  std::vector<std::string> warnings;         ///< plain words
  std::vector<FitQuality> quality;           ///< fit-quality findings (empty: none; src/fit/fit_quality.hpp)
  std::optional<FlowIndexPrior> prior;       ///< the flow-index prior that entered this fit, if any
  std::string prior_note;                    ///< plain words: what the prior did (narrowed by, or not applied)
  std::optional<ParameterEstimate> without_prior;  ///< the flow index from the readings alone, when a prior was
                                                   ///< considered (what the history learns from)
  bool converged() const { return status == FitStatus::Converged; }
};

}  // namespace spreadfit::fit
