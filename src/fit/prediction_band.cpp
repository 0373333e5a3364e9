#include "src/fit/prediction_band.hpp"

#include <Eigen/Cholesky>
#include <algorithm>
#include <cmath>
#include <random>
#include <stdexcept>
#include <tuple>

#include "src/fit/parameter_names.hpp"
#include "src/parallel_for.hpp"

namespace spreadfit::fit {

namespace {

// Material and release time of one parameter vector (names give the layout).
void unpack(const FitResult& fit, const Eigen::VectorXd& x, std::size_t series_index, Material& m, double& t0) {
  m = fit.material;
  t0 = 0.0;
  std::size_t origin = 0;
  for (std::size_t i = 0; i < fit.names.size(); ++i) {
    const std::string& name = fit.names[i];
    const double v = x[Eigen::Index(i)];
    if (!is_parameter(name, Parameter::TimeOrigin)) {
      m = with_parameter(m, name, std::exp(v));
    } else {
      if (origin == series_index || (origin == 0 && t0 == 0.0)) t0 = v;
      ++origin;
    }
  }
}

enum class Outcome { Solved, OutsideLaw, Failed };

Outcome run(const TestSetup& setup, const Material& m, double t0, const std::vector<double>& times,
            std::vector<double>& out) {
  std::vector<double> shifted(times.size());
  for (std::size_t i = 0; i < times.size(); ++i) shifted[i] = std::max(times[i] - t0, 0.0);
  try {
    validate(m);
  } catch (const std::invalid_argument&) {
    return Outcome::OutsideLaw;
  }
  const ForwardResult r = predict_readings(setup, m, shifted);
  if (!r.ok()) return Outcome::Failed;
  out = r.readings;
  return Outcome::Solved;
}

}  // namespace

std::pair<double, double> central_95_range(std::vector<double> values) {
  if (values.empty()) throw std::invalid_argument("central_95_range: no values");
  std::sort(values.begin(), values.end());
  const double last = double(values.size() - 1);
  return {values[std::size_t(std::floor(0.025 * last))], values[std::size_t(std::ceil(0.975 * last))]};
}

FitResult material_only(const FitResult& fit) {
  FitResult out = fit;
  std::vector<Eigen::Index> keep;
  for (std::size_t i = 0; i < fit.names.size(); ++i)
    if (!is_parameter(fit.names[i], Parameter::TimeOrigin)) keep.push_back(Eigen::Index(i));
  const Eigen::Index k = Eigen::Index(keep.size());
  out.names.clear();
  out.estimate.resize(k);
  out.covariance.resize(k, k);
  for (Eigen::Index a = 0; a < k; ++a) {
    out.names.push_back(fit.names[std::size_t(keep[std::size_t(a)])]);
    out.estimate[a] = fit.estimate[keep[std::size_t(a)]];
    for (Eigen::Index b = 0; b < k; ++b)
      out.covariance(a, b) = fit.covariance(keep[std::size_t(a)], keep[std::size_t(b)]);
  }
  auto restrict = [&](const std::vector<Eigen::VectorXd>& from, std::vector<Eigen::VectorXd>& to) {
    to.clear();
    for (const Eigen::VectorXd& d : from) {
      if (d.size() != fit.estimate.size()) continue;
      Eigen::VectorXd kept(k);
      for (Eigen::Index a = 0; a < k; ++a) kept[a] = d[keep[std::size_t(a)]];
      to.push_back(kept);
    }
  };
  restrict(fit.draws, out.draws);
  restrict(fit.ridge, out.ridge);
  out.time_origins = {0.0};
  return out;
}

PredictionBand prediction_band(const FitResult& fit, const TestSetup& setup, const std::vector<double>& times,
                               std::size_t series_index, int samples, unsigned seed) {
  PredictionBand band;
  band.times = times;
  Material m;
  double t0 = 0;
  if (fit.estimate.size() == 0) {  // a closed-form result (final reading): no curve parameters to draw
    m = fit.material;
  } else {
    unpack(fit, fit.estimate, series_index, m, t0);
  }
  if (run(setup, m, t0, times, band.reading) != Outcome::Solved) {
    band.ok = false;
    return band;
  }
  band.lower = band.upper = band.reading;
  const Eigen::Index p = fit.estimate.size();
  if (samples <= 0 || p == 0) return band;
  std::vector<Eigen::VectorXd> parameters;
  if (!fit.draws.empty()) {
    // The fit's own draws from its likelihood (src/fit/likelihood_draws.hpp), up to `samples` of them.
    for (const Eigen::VectorXd& d : fit.draws)
      if (d.size() == p && int(parameters.size()) < samples) parameters.push_back(d);
  } else {
    // A result without likelihood draws (quadratic intervals only): the log-space normal approximation.
    if (!fit.covariance.allFinite()) return band;
    const Eigen::LLT<Eigen::MatrixXd> llt(fit.covariance + 1e-12 * Eigen::MatrixXd::Identity(p, p));
    if (llt.info() != Eigen::Success) return band;
    const Eigen::MatrixXd L = llt.matrixL();
    // Draws first, from one generator in a fixed order (reproducible), then the solves on every core.
    std::mt19937 rng(seed);
    std::normal_distribution<double> normal(0.0, 1.0);
    for (int k = 0; k < samples; ++k) {
      Eigen::VectorXd z(p);
      for (Eigen::Index i = 0; i < p; ++i) z[i] = normal(rng);
      parameters.push_back(fit.estimate + L * z);
    }
  }
  std::vector<std::vector<double>> solved(parameters.size());
  std::vector<Outcome> outcome(parameters.size());
  parallel_for(parameters.size(), [&](std::size_t k) {
    Material mk;
    double tk = 0;
    unpack(fit, parameters[k], series_index, mk, tk);
    outcome[k] = run(setup, mk, tk, times, solved[k]);
  });
  std::vector<std::vector<double>> draws;
  for (std::size_t k = 0; k < parameters.size(); ++k) {
    if (outcome[k] == Outcome::Solved)
      draws.push_back(std::move(solved[k]));
    else if (outcome[k] == Outcome::OutsideLaw)
      ++band.outside_law;
    else
      ++band.failed;
  }
  band.samples = int(draws.size());
  if (draws.size() >= 10) {
    std::vector<double> column(draws.size());
    for (std::size_t i = 0; i < times.size(); ++i) {
      for (std::size_t k = 0; k < draws.size(); ++k) column[k] = draws[k][i];
      std::tie(band.lower[i], band.upper[i]) = central_95_range(column);
    }
  }
  // The band reaches every point of the likelihood region the profile walks found (FitResult::ridge).
  std::vector<std::vector<double>> ridge(fit.ridge.size());
  std::vector<Outcome> ridge_outcome(fit.ridge.size(), Outcome::Failed);
  parallel_for(fit.ridge.size(), [&](std::size_t k) {
    if (fit.ridge[k].size() != p) return;
    Material mk;
    double tk = 0;
    unpack(fit, fit.ridge[k], series_index, mk, tk);
    ridge_outcome[k] = run(setup, mk, tk, times, ridge[k]);
  });
  for (std::size_t k = 0; k < ridge.size(); ++k)
    if (ridge_outcome[k] == Outcome::Solved)
      for (std::size_t i = 0; i < times.size(); ++i) {
        band.lower[i] = std::min(band.lower[i], ridge[k][i]);
        band.upper[i] = std::max(band.upper[i], ridge[k][i]);
      }
  return band;
}

}  // namespace spreadfit::fit
