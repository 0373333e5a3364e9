// The least-squares problem of one law against one or more series: parameter vector layout, bounds and the
// weighted residuals. Material parameters are fitted as logarithms (they span decades and must stay positive);
// each series may add its own virtual release time t0 (linear), because the gate or ring is never lifted at
// exactly t = 0 and the first instants are inertial, not thin-film (DEVELOPERS.md, "Numerics").
#pragma once

#include <Eigen/Core>
#include <atomic>
#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

class FitProblem {
 public:
  FitProblem(const std::vector<FitSeries>& series, Law law, const FitOptions& options);

  Law law() const { return law_; }
  int material_parameters() const { return material_count_; }
  int size() const { return int(lower_.size()); }
  int points() const { return points_; }
  /// Entries of the residual vector: the readings, plus one for a flow-index prior when it applies.
  int residual_count() const { return points_ + (prior_index_ >= 0 ? 1 : 0); }
  bool has_prior() const { return prior_index_ >= 0; }
  const Eigen::VectorXd& lower() const { return lower_; }
  const Eigen::VectorXd& upper() const { return upper_; }
  const std::vector<std::string>& names() const { return names_; }

  Material material(const Eigen::VectorXd& theta) const;
  std::vector<double> time_origins(const Eigen::VectorXd& theta) const;
  /// theta for a material and zero time origins (clamped into the bounds).
  Eigen::VectorXd parameters(const Material& m, const std::vector<double>& time_origins) const;

  /// Weighted residuals (model - reading) / sigma of all fitted points, then (with a flow-index prior)
  /// prior_scale (n - typical) / spread. Returns false if a forward solve failed
  /// (message in *failure). Counts full-model solves in evaluations().
  bool residuals(const Eigen::VectorXd& theta, Eigen::VectorXd& r, std::string* failure = nullptr) const;
  /// The same, and with `columns` not null the Jacobian columns known in closed form (levenberg_marquardt's
  /// ResidualColumnsFunction): each release time's, -(reading's rate) / sigma, and the consistency's (or
  /// viscosity's), from the time scaling of models/forward.hpp (reading_derivative_log_consistency). The others
  /// are NaN. The rates come from the same solves (about 3% more work).
  bool residuals(const Eigen::VectorXd& theta, Eigen::VectorXd& r, std::string* failure,
                 Eigen::MatrixXd* columns) const;
  /// The same with the low-order surrogate (global stage). Non-finite entries mark failure.
  void surrogate_residuals(const Eigen::VectorXd& theta, Eigen::VectorXd& r) const;
  /// Unweighted model readings of series s at its fitted times.
  bool predict(const Eigen::VectorXd& theta, std::size_t s, const std::vector<double>& times,
               std::vector<double>& out, std::string* failure = nullptr, std::vector<double>* rates = nullptr) const;

  /// The forward model's validity remarks (e.g. slump regime, side walls) for every series at theta, each once.
  std::vector<std::string> notes(const Eigen::VectorXd& theta) const;

  int evaluations() const { return evaluations_.load(); }
  double weight_sigma(std::size_t s) const { return sigma_[s]; }
  const std::vector<FitSeries>& series() const { return series_; }
  const std::vector<std::vector<double>>& fitted_times() const { return times_; }
  const std::vector<std::vector<double>>& fitted_values() const { return values_; }
  bool sigma_stated() const { return sigma_stated_; }

 private:
  std::vector<double> shifted(const std::vector<double>& t, double t0) const;
  std::vector<FitSeries> series_;
  std::vector<std::vector<double>> times_, values_;  // fitted points (after ignore_before)
  std::vector<double> sigma_;
  std::vector<int> origin_index_;  // parameter index of each series' t0, -1 if not fitted
  Law law_;
  FitOptions options_;
  int material_count_ = 0;
  int prior_index_ = -1;
  int consistency_index_ = -1;  // parameter index of the consistency (or viscosity), -1 if the law has none
  bool consistency_log_ = true;  // ... fitted as its logarithm
  int release_rows_ = 0;  // rows at 0 s left out (the release marker)  // parameter index of the flow index when a prior applies
  int points_ = 0;
  bool sigma_stated_ = true;
  Eigen::VectorXd lower_, upper_;
  std::vector<std::string> names_;
  mutable std::atomic<int> evaluations_{0};  // residuals may run on several threads (Jacobian columns)
};

}  // namespace spreadfit::fit
