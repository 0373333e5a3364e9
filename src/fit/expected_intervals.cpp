#include "src/fit/expected_intervals.hpp"

#include <Eigen/Eigenvalues>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "src/parallel_for.hpp"

namespace spreadfit::fit {

DesignEstimate expected_intervals(const TestSetup& setup, Law law, const Material& guess,
                                  const std::vector<double>& times, double sigma, bool fit_time_origin,
                                  const ForwardOptions& forward) {
  DesignEstimate out;
  const bool has_tau = law == Law::Bingham || law == Law::HerschelBulkley;
  const bool has_n = law == Law::PowerLaw || law == Law::HerschelBulkley;
  out.names = law_parameter_names(law);  // yield_stress, then consistency or viscosity, then flow_index
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
    const ForwardResult res = predict_readings(setup, m, shifted, forward);
    r = res.readings;
    if (!res.ok() && out.message.empty()) out.message = res.message;
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
  // The guess's own readings, and one a decade after the last: whether the sample stops within the test is part
  // of the plan's explanation. The approach to arrest decays like t^-n (Matson & Hogg 2007, J. Non-Newt. Fluid
  // Mech. 142), so for n <= 1 a further decade shows most of the motion still to come; two closely spaced last
  // readings could hide a slow creep.
  {
    std::vector<double> with_late = times;
    if (!times.empty()) with_late.push_back(10 * times.back());
    ++out.solves;
    const ForwardResult res = predict_readings(setup, guess, with_late, forward);
    if (!res.ok() || res.readings.size() != with_late.size() || times.empty()) {
      out.ok = false;
      out.message = res.ok() ? "no reading times" : res.message;
      return out;
    }
    out.late_reading = res.readings.back();
    out.readings.assign(res.readings.begin(), res.readings.end() - 1);
    out.stopped = std::abs(out.late_reading - out.readings.back()) < sigma;
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

double design_score(const std::vector<double>& interval_ratio) {
  if (interval_ratio.empty()) return std::numeric_limits<double>::infinity();
  double sum = 0;
  for (double ratio : interval_ratio) {
    if (!(ratio < undetermined_ratio)) return std::numeric_limits<double>::infinity();
    sum += std::log(ratio);
  }
  return sum / double(interval_ratio.size());
}

double WorstCaseEstimate::score() const {
  return ok() ? design_score(worst_ratio) : std::numeric_limits<double>::infinity();
}

WorstCaseEstimate worst_case_intervals(const TestSetup& setup, Law law, const std::vector<Material>& guesses,
                                       const std::vector<double>& times, double sigma, bool fit_time_origin,
                                       const ForwardOptions& forward) {
  if (guesses.empty()) throw std::invalid_argument("guesses: expected at least one material");
  WorstCaseEstimate out;
  // The guesses are independent forward solves: spread over the cores, each writing only its own slot.
  out.guesses.resize(guesses.size());
  parallel_for(guesses.size(), [&](std::size_t g) {
    out.guesses[g] = expected_intervals(setup, law, guesses[g], times, sigma, fit_time_origin, forward);
  });
  out.names = out.guesses.front().names;
  for (std::size_t g = 0; g < guesses.size(); ++g) {
    const DesignEstimate& e = out.guesses[g];
    if (!e.ok) {
      if (out.failed++ == 0) out.first_failure = g;
      continue;
    }
    if (e.stopped) ++out.stopped;
    if (out.worst_ratio.empty()) {
      out.worst_ratio = e.interval_ratio;
      out.worst_guess.assign(e.interval_ratio.size(), g);
    }
    // Worst case per parameter; a NaN never occurs (the ratios are exp of a square root or infinity).
    for (std::size_t i = 0; i < e.interval_ratio.size(); ++i)
      if (e.interval_ratio[i] > out.worst_ratio[i]) {
        out.worst_ratio[i] = e.interval_ratio[i];
        out.worst_guess[i] = g;
      }
  }
  if (out.failed > 0) {
    out.worst_ratio.clear();
    out.worst_guess.clear();
  }
  return out;
}

}  // namespace spreadfit::fit
