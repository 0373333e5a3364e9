#include "src/fit/fit_problem.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "src/fit/parameter_names.hpp"

namespace spreadfit::fit {

namespace {
// The material parameters' box comes from the parameter table (src/fit/parameter_names.hpp), each searched on its
// logarithm or linearly as the table says.
double to_fit_space(const ParameterInfo& p, double si) { return p.log_space ? std::log(si) : si; }
double from_fit_space(const ParameterInfo& p, double x) { return p.log_space ? std::exp(x) : x; }
// Reading weight when no resolution is stated: the variance is then estimated from the residuals, so this only
// fixes the scale of the weighted sum.
constexpr double nominal_sigma = 1e-3;
}  // namespace

FitProblem::FitProblem(const std::vector<FitSeries>& series, Law law, const FitOptions& options)
    : series_(series), law_(law), options_(options) {
  std::vector<double> lo, hi;
  auto add = [&](const std::string& name, double a, double b) {
    names_.push_back(name);
    lo.push_back(a);
    hi.push_back(b);
  };
  const std::span<const Parameter> layout = law_parameters(law);
  for (std::size_t i = 0; i < layout.size(); ++i) {
    const ParameterInfo& p = parameter_info(layout[i]);
    add(std::string(p.name), to_fit_space(p, p.fit_lower), to_fit_space(p, p.fit_upper));
    if (p.id == Parameter::FlowIndex && options.flow_index_prior) prior_index_ = int(i);
    if (p.member == &Material::consistency) {
      consistency_index_ = int(i);
      consistency_log_ = p.log_space;
    }
  }
  material_count_ = int(names_.size());

  for (const FitSeries& s : series_) {
    std::vector<double> t, v;
    for (std::size_t i = 0; i < s.times.size(); ++i)
      if (s.times[i] <= 0.0 && options.fit_time_origin) {
        // A row at 0 s is what technicians write at the gate opening or ring lift ("0,0"): it marks the start of
        // the clock, not a reading of the flow, and the moment of release is fitted as the release time anyway.
        ++release_rows_;
      } else if (s.times[i] >= options.ignore_before) {
        t.push_back(s.times[i]);
        v.push_back(s.values[i]);
      }
    points_ += int(t.size());
    sigma_.push_back(s.sigma.value_or(nominal_sigma));
    if (!s.sigma) sigma_stated_ = false;
    // A release time needs a curve to be identified: at least three points on a rig that evolves in time.
    const bool timed = rig_is_timed(s.setup.rig);
    if (options.fit_time_origin && timed && t.size() >= 3) {
      origin_index_.push_back(int(names_.size()));
      const double first = t.front();
      const double span = t.back() - first;
      // Reading times are counted from the release (the interface's contract), so the virtual release lies within
      // a few seconds of 0: at most 5 s before (a clock started late, an inertial start) and 2 s after (a
      // stopwatch started early; the inertial start is a fraction of a second, DEVELOPERS.md, "Numerics"): common
      // practice, no source. A release far from 0 opens false valleys: a late one lets a fast, strongly
      // shear-thinning flow mimic a sample coming to rest, an early one lets a flow without yield stress mimic
      // slow spreading. Readings whose clock starts elsewhere are the exception the wide range below keeps.
      double low = first - std::max(5.0, 0.5 * span);
      double high = first - 1e-3 * std::max(span, 1.0);
      if (std::min(high, 2.0) > std::max(low, -5.0) + 1.0) {
        low = std::max(low, -5.0);
        high = std::min(high, 2.0);
      }
      add(std::string(parameter_name(Parameter::TimeOrigin)), low, high);
    } else {
      origin_index_.push_back(-1);
    }
    times_.push_back(std::move(t));
    values_.push_back(std::move(v));
  }
  lower_ = Eigen::Map<Eigen::VectorXd>(lo.data(), Eigen::Index(lo.size()));
  upper_ = Eigen::Map<Eigen::VectorXd>(hi.data(), Eigen::Index(hi.size()));
}

Material FitProblem::material(const Eigen::VectorXd& theta) const {
  Material m;
  Eigen::Index i = 0;
  for (const Parameter id : law_parameters(law_)) {
    const ParameterInfo& p = parameter_info(id);
    double value = from_fit_space(p, theta[i++]);
    // exp(log(2)) may round above 2, which the law's own range check refuses.
    if (id == Parameter::FlowIndex) value = std::min(value, p.fit_upper);
    m.*p.member = value;
  }
  return m;
}

std::vector<double> FitProblem::time_origins(const Eigen::VectorXd& theta) const {
  std::vector<double> t0;
  for (int idx : origin_index_) t0.push_back(idx >= 0 ? theta[idx] : 0.0);
  return t0;
}

Eigen::VectorXd FitProblem::parameters(const Material& m, const std::vector<double>& t0) const {
  Eigen::VectorXd theta(size());
  Eigen::Index i = 0;
  // A value below the box (a yield stress of 0) starts at its lower bound.
  for (const Parameter id : law_parameters(law_)) {
    const ParameterInfo& p = parameter_info(id);
    theta[i++] = to_fit_space(p, std::max(m.*p.member, p.fit_lower));
  }
  for (std::size_t s = 0; s < origin_index_.size(); ++s)
    if (origin_index_[s] >= 0) theta[origin_index_[s]] = s < t0.size() ? t0[s] : 0.0;
  return theta.cwiseMax(lower_).cwiseMin(upper_);
}

std::vector<double> FitProblem::shifted(const std::vector<double>& t, double t0) const {
  std::vector<double> out(t.size());
  for (std::size_t i = 0; i < t.size(); ++i) out[i] = std::max(t[i] - t0, 0.0);
  return out;
}

bool FitProblem::predict(const Eigen::VectorXd& theta, std::size_t s, const std::vector<double>& times,
                         std::vector<double>& out, std::string* failure, std::vector<double>* rates) const {
  const int idx = origin_index_[s];
  const double t0 = idx >= 0 ? theta[idx] : 0.0;
  ++evaluations_;
  ForwardOptions forward = options_.forward;
  forward.rates = rates != nullptr;
  ForwardResult r = predict_readings(series_[s].setup, material(theta), shifted(times, t0), forward);
  if (!r.ok()) {
    if (failure) *failure = r.message;
    return false;
  }
  out = std::move(r.readings);
  if (rates) *rates = std::move(r.rates);
  return true;
}

bool FitProblem::residuals(const Eigen::VectorXd& theta, Eigen::VectorXd& r, std::string* failure) const {
  return residuals(theta, r, failure, nullptr);
}

bool FitProblem::residuals(const Eigen::VectorXd& theta, Eigen::VectorXd& r, std::string* failure,
                           Eigen::MatrixXd* columns) const {
  r.resize(points_);
  if (columns) columns->setConstant(residual_count(), size(), std::numeric_limits<double>::quiet_NaN());
  const Material m = material(theta);
  Eigen::Index k = 0;
  std::vector<double> pred, rates;
  for (std::size_t s = 0; s < series_.size(); ++s) {
    if (times_[s].empty()) continue;
    if (!predict(theta, s, times_[s], pred, failure, columns ? &rates : nullptr)) return false;
    const bool with_rates = columns && rates.size() == pred.size();
    const int idx = origin_index_[s];
    const double t0 = idx >= 0 ? theta[idx] : 0.0;
    for (std::size_t i = 0; i < pred.size(); ++i, ++k) {
      r[k] = (pred[i] - values_[s][i]) / sigma_[s];
      if (!with_rates) continue;
      // The reading at t is the model's at t - t0 (0 before the release, where nothing depends on t0 or K).
      const double since_release = times_[s][i] - t0;
      const double rate = since_release > 0 ? rates[i] / sigma_[s] : 0.0;
      for (int o : origin_index_)
        if (o >= 0) (*columns)(k, o) = o == idx ? -rate : 0.0;
      if (consistency_index_ >= 0) {
        const double d_log = reading_derivative_log_consistency(std::max(since_release, 0.0), rate, m.flow_index);
        (*columns)(k, consistency_index_) = consistency_log_ ? d_log : d_log / m.consistency;
      }
    }
  }
  if (prior_index_ >= 0) {
    // The prior as one more observation of n: its square adds (n - typical)^2 / spread^2 to chi^2 in units of the
    // residual variance (the scale is that variance's root when the variance is estimated from the residuals).
    const FlowIndexPrior& prior = *options_.flow_index_prior;
    r.conservativeResize(points_ + 1);
    r[points_] = options_.prior_scale * (std::exp(theta[prior_index_]) - prior.typical) / prior.spread;
    if (columns)  // the prior is on n alone
      for (Eigen::Index j = 0; j < size(); ++j)
        if (j == consistency_index_ || std::find(origin_index_.begin(), origin_index_.end(), int(j)) != origin_index_.end())
          (*columns)(points_, j) = 0.0;
  }
  return r.allFinite();
}

std::vector<std::string> FitProblem::notes(const Eigen::VectorXd& theta) const {
  std::vector<std::string> out;
  if (release_rows_ > 0)
    out.push_back(release_rows_ == 1 ? "the row at 0 s marks the release and is not fitted (the release time is)"
                                     : "the rows at 0 s mark the releases and are not fitted (the release times are)");
  for (std::size_t s = 0; s < series_.size(); ++s) {
    if (times_[s].empty()) continue;
    const int idx = origin_index_[s];
    ++evaluations_;
    const ForwardResult r = predict_readings(series_[s].setup, material(theta),
                                             shifted(times_[s], idx >= 0 ? theta[idx] : 0.0), options_.forward);
    for (const std::string& n : r.notes)
      if (std::find(out.begin(), out.end(), n) == out.end()) out.push_back(n);
  }
  return out;
}

void FitProblem::surrogate_residuals(const Eigen::VectorXd& theta, Eigen::VectorXd& r) const {
  r.resize(points_);
  Eigen::Index k = 0;
  const Material m = material(theta);
  // The surrogate stage ignores a prior: it only finds the basin; the full model's polish applies it.
  for (std::size_t s = 0; s < series_.size(); ++s) {
    if (times_[s].empty()) continue;
    const int idx = origin_index_[s];
    const std::vector<double> pred =
        predict_readings_low_order(series_[s].setup, m, shifted(times_[s], idx >= 0 ? theta[idx] : 0.0));
    for (std::size_t i = 0; i < pred.size(); ++i) r[k++] = (pred[i] - values_[s][i]) / sigma_[s];
  }
}

}  // namespace spreadfit::fit
