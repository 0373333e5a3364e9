#include "src/fit/test_design.hpp"

#include <Eigen/Eigenvalues>
#include <cmath>
#include <limits>

namespace spreadfit {

DesignEstimate expected_intervals(const TestSetup& setup, Law law, const Material& guess,
                                  const std::vector<double>& times, double sigma, bool fit_time_origin) {
  DesignEstimate out;
  const bool has_tau = law == Law::Bingham || law == Law::HerschelBulkley;
  const bool has_n = law == Law::PowerLaw || law == Law::HerschelBulkley;
  if (has_tau) out.names.push_back("yield_stress");
  out.names.push_back(has_n ? "consistency" : "viscosity");
  if (has_n) out.names.push_back("flow_index");
  const int pm = int(out.names.size());
  const int p = pm + (fit_time_origin ? 1 : 0);
  auto readings = [&](const Eigen::VectorXd& theta, std::vector<double>& r) {
    Material m = guess;
    int i = 0;
    if (has_tau) m.yield_stress = std::exp(theta[i++]);
    m.consistency = std::exp(theta[i++]);
    if (has_n) m.flow_index = std::exp(theta[i++]);
    const double t0 = fit_time_origin ? theta[pm] : 0.0;
    std::vector<double> shifted(times.size());
    for (std::size_t k = 0; k < times.size(); ++k) shifted[k] = std::max(times[k] - t0, 0.0);
    ++out.solves;
    const ForwardResult res = predict_readings(setup, m, shifted);
    r = res.readings;
    return res.ok();
  };
  Eigen::VectorXd theta(p);
  {
    int i = 0;
    if (has_tau) theta[i++] = std::log(std::max(guess.yield_stress, 1e-3));
    theta[i++] = std::log(guess.consistency);
    if (has_n) theta[i++] = std::log(guess.flow_index);
    if (fit_time_origin) theta[pm] = 0.0;
  }
  // Central differences: 2% in log parameters, 0.05 s in the release time.
  Eigen::MatrixXd J(Eigen::Index(times.size()), p);
  std::vector<double> up, down;
  for (int j = 0; j < p; ++j) {
    const double h = j < pm ? 0.02 : 0.05;
    Eigen::VectorXd a = theta, b = theta;
    a[j] += h;
    b[j] -= h;
    if (!readings(a, up) || !readings(b, down)) {
      out.ok = false;
      return out;
    }
    for (std::size_t k = 0; k < times.size(); ++k) J(Eigen::Index(k), j) = (up[k] - down[k]) / (2 * h);
  }
  const Eigen::MatrixXd F = J.transpose() * J / (sigma * sigma);
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(F);
  const double top = eig.eigenvalues().maxCoeff();
  Eigen::MatrixXd cov = Eigen::MatrixXd::Zero(p, p);
  bool singular = false;
  for (int i = 0; i < p; ++i) {
    if (eig.eigenvalues()[i] <= 1e-12 * top) {
      singular = true;
      continue;
    }
    cov += eig.eigenvectors().col(i) * eig.eigenvectors().col(i).transpose() / eig.eigenvalues()[i];
  }
  for (int i = 0; i < pm; ++i) {
    const double se = std::sqrt(cov(i, i));
    out.interval_ratio.push_back(singular || !std::isfinite(se) ? std::numeric_limits<double>::infinity()
                                                                 : std::exp(2 * 1.96 * se));
  }
  return out;
}

}  // namespace spreadfit
