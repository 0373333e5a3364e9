#include "src/fit/fit_law.hpp"

#include <Eigen/Eigenvalues>
#include <Eigen/LU>
#include <algorithm>
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <cstdlib>
#include <exception>
#include <fmt/format.h>
#include <future>
#include <limits>
#include <mutex>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "src/fit/fit_problem.hpp"
#include "src/fit/parameter_names.hpp"
#include "src/fit/levenberg_marquardt.hpp"
#include "src/fit/profile_likelihood.hpp"
#include "src/fit/fit_quality.hpp"
#include "src/fit/final_only.hpp"
#include "src/fit/likelihood_draws.hpp"
#include "src/fit/surrogate_start.hpp"
#include "src/parallel_for.hpp"

namespace spreadfit::fit {

std::string_view fit_status_name(FitStatus s) {
  switch (s) {
    case FitStatus::Converged: return "converged";
    case FitStatus::NotConverged: return "not converged";
    case FitStatus::NotIdentifiable: return "not identifiable";
    case FitStatus::ForwardFailure: return "forward model failed";
    case FitStatus::InsufficientData: return "insufficient data";
  }
  return "unknown";
}

void FitOptions::validate() const {
  if (!(ignore_before >= 0)) throw std::invalid_argument("fit option ignore_before must be >= 0 s");
  if (max_iterations < 1) throw std::invalid_argument("fit option max_iterations must be >= 1");
  if (global_evaluations < 0) throw std::invalid_argument("fit option global_evaluations must be >= 0");
}

double aicc(double ssr, int n, int k) {
  const double base = n * std::log(std::max(ssr, 1e-300) / n) + 2.0 * k;
  return n - k - 1 > 0 ? base + 2.0 * k * (k + 1) / (n - k - 1) : std::numeric_limits<double>::infinity();
}

namespace {

std::string plain_name(const std::string& name) { return parameter_plain_name(name); }

Eigen::VectorXd fd_steps(const FitProblem& problem) {
  Eigen::VectorXd h(problem.size());
  for (int i = 0; i < problem.size(); ++i)
    h[i] = i < problem.material_parameters() ? 2e-2 : 5e-3 * std::max(1.0, problem.upper()[i] - problem.lower()[i]);
  return h;
}

// Quadratic (Wald) covariance s^2 (J^T J)^-1 in log space; directions the readings do not determine (eigenvalues
// below 1e-12 of the largest) are infinite.
Eigen::MatrixXd wald_covariance(const Eigen::MatrixXd& J, double s2) {
  const Eigen::Index p = J.cols();
  const Eigen::MatrixXd JtJ = J.transpose() * J;
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(JtJ);
  const double max_ev = eig.eigenvalues().maxCoeff();
  Eigen::MatrixXd cov = Eigen::MatrixXd::Zero(p, p);
  for (Eigen::Index i = 0; i < p; ++i) {
    const double ev = eig.eigenvalues()[i];
    if (!(ev > 1e-12 * max_ev)) {
      for (Eigen::Index a = 0; a < p; ++a)
        for (Eigen::Index b = 0; b < p; ++b)
          if (std::abs(eig.eigenvectors()(a, i) * eig.eigenvectors()(b, i)) > 1e-6)
            cov(a, b) = std::numeric_limits<double>::infinity();
      continue;
    }
    cov += s2 / ev * eig.eigenvectors().col(i) * eig.eigenvectors().col(i).transpose();
  }
  return cov;
}

// Both sides of every material parameter's profile-likelihood interval (src/fit/profile_likelihood.hpp), on
// the machine's cores. Returns the sides in the order (parameter 0 lower, parameter 0 upper, parameter 1 lower,
// ...), and a point below the optimum if a refit found one.
struct Profiles {
  std::vector<ProfileSide> sides;
  std::optional<Eigen::VectorXd> better;
  double better_by = 0;  // how far below the profiled optimum's cost `better` lies
  int refits = 0;
};

Profiles profile_material(const FitProblem& problem, const LmResult& best, double s2, double q,
                          const Eigen::MatrixXd& cov, double reference_cost) {
  const ResidualColumnsFunction f = [&problem](const Eigen::VectorXd& x, Eigen::VectorXd& r, Eigen::MatrixXd* columns) {
    return problem.residuals(x, r, nullptr, columns);
  };
  const ProfileLikelihood profile(f, problem.lower(), problem.upper(), fd_steps(problem), best.x, reference_cost, s2,
                                  q, cov, {}, best.jacobian);
  Profiles out;
  const int pm = problem.material_parameters();
  out.sides.resize(std::size_t(2 * pm));
  parallel_for(out.sides.size(), [&](std::size_t k) {
    out.sides[k] = profile.side(int(k / 2), k % 2 == 0 ? -1 : +1);
  });
  for (const ProfileSide& s : out.sides) out.refits += s.refits;
  out.better = profile.better_point();
  out.better_by = reference_cost - profile.better_cost();
  return out;
}

// The profile t of the fine problem at `theta` with parameter j held: the fine residuals there, the other
// parameters moved by one Gauss-Newton step on the coarse walk's Jacobian `jacobian` (the coarse and fine
// conditional optima differ by the models' small difference; a step that would leave the box leaves that
// parameter where it is), and the lower of the two real costs (never a linear prediction, so tau errs high by a
// hair, never low). Moves `theta` to the point taken. NaN where the fine model cannot be solved.
double fine_tau(const FitProblem& fine, int j, const Eigen::MatrixXd& jacobian, double best_cost, double s2,
                Eigen::VectorXd& theta) {
  const Eigen::Index p = theta.size();
  Eigen::VectorXd r;
  if (!fine.residuals(theta, r) || !r.allFinite()) return std::numeric_limits<double>::quiet_NaN();
  double cost = 0.5 * r.squaredNorm();
  if (jacobian.rows() == r.size() && jacobian.cols() == p - 1 && p > 1) {
    std::vector<Eigen::Index> free;  // indices into the rest that may move
    for (Eigen::Index k = 0; k < p - 1; ++k) free.push_back(k);
    auto index = [&](Eigen::Index k) { return k < j ? k : k + 1; };  // rest index -> full index
    Eigen::VectorXd step = Eigen::VectorXd::Zero(p);
    for (int pass = 0; pass < 2 && !free.empty(); ++pass) {
      Eigen::MatrixXd a(r.size(), Eigen::Index(free.size()));
      for (std::size_t c = 0; c < free.size(); ++c) a.col(Eigen::Index(c)) = jacobian.col(free[c]);
      const Eigen::VectorXd d = a.colPivHouseholderQr().solve(-r);
      step.setZero();
      std::vector<Eigen::Index> inside;
      for (std::size_t c = 0; c < free.size(); ++c) {
        const Eigen::Index i = index(free[c]);
        const double moved = theta[i] + d[Eigen::Index(c)];
        if (moved >= fine.lower()[i] && moved <= fine.upper()[i]) inside.push_back(free[c]);
        step[i] = d[Eigen::Index(c)];
      }
      if (inside.size() == free.size()) break;
      free = inside;
      step.setZero();
    }
    if (step.allFinite() && step.squaredNorm() > 0) {
      const Eigen::VectorXd moved = theta + step;
      Eigen::VectorXd rm;
      if (fine.residuals(moved, rm) && rm.allFinite() && 0.5 * rm.squaredNorm() < cost) {
        cost = 0.5 * rm.squaredNorm();
        theta = moved;
      }
    }
  }
  return std::sqrt(2.0 * std::max(cost - best_cost, 0.0) / s2);
}

// The profiles run on the coarse problem; each crossed limit is then re-evaluated on the fine one: the fine
// profile t at the coarse limit (fine_tau), then at most two secant steps towards the cut-off along the walk's
// ridge (the other parameters moved with the limit along the bracket's direction), the first on the coarse
// slope of tau, the next on the fine one. Moving the coarse limits by the difference of the two optima instead is
// exact only where the likelihood is quadratic: in a flat valley (a yield stress traded against the flow index)
// the two optima lie far apart along the valley while the wall that bounds it has hardly moved, and the moved
// limit landed beyond the wall (tests/fit/test_profile_stability.cpp). Where the fine tau does not rise outward
// or the fine model fails, the evaluated point nearest the cut-off is kept; a limit the fine model cannot be
// solved at at all is moved by the difference of the fine optimum x_best and the coarse one `coarse_best`. Every
// crossed limit is in the fine problem's coordinates afterwards. Two fine solves per evaluation.
void limits_on_fine(const FitProblem& fine, double best_cost, double s2, double q, const Eigen::VectorXd& x_best,
                    const Eigen::VectorXd& coarse_best, Profiles& profiles) {
  constexpr double tolerance = 0.04;  // as ProfileOptions::tolerance
  parallel_for(profiles.sides.size(), [&](std::size_t k) {
    ProfileSide& side = profiles.sides[k];
    const int j = int(k / 2);
    const double dir = k % 2 == 0 ? -1.0 : 1.0;
    const Eigen::Index p = x_best.size();
    if (side.end != ProfileEnd::Crossed) return;
    const double moved = side.limit + x_best[j] - coarse_best[j];
    // u: outward distance from the coarse limit. It may move inward at most to a twentieth of the way from the
    // fine optimum, and outward at most as far again as the limit is from it.
    const double reach = dir * (side.limit - x_best[j]);
    if (side.at_limit.size() != p || side.limit_direction.size() != p || !(side.limit_slope > 0) ||
        !side.limit_direction.allFinite() || !(reach > 0)) {
      side.limit = moved;
      return;
    }
    const double u_min = -0.95 * reach, u_max = reach;
    double u_prev = 0, tau_prev = 0, u = 0;
    double closest_u = 0, closest_miss = std::numeric_limits<double>::infinity();  // best evaluated so far
    bool evaluated = false;
    for (int round = 0; round < 3; ++round) {
      Eigen::VectorXd theta = (side.at_limit + u * side.limit_direction).cwiseMax(fine.lower()).cwiseMin(fine.upper());
      theta[j] = side.limit + dir * u;
      const double tau = theta[j] >= fine.lower()[j] && theta[j] <= fine.upper()[j]
                             ? fine_tau(fine, j, side.limit_jacobian, best_cost, s2, theta)
                             : std::numeric_limits<double>::quiet_NaN();
      if (!std::isfinite(tau)) {
        u = closest_u;
        break;
      }
      evaluated = true;
      // The coarse walk put tau at the cut-off here, and the two models' readings differ by about 0.1%: a fine tau
      // far past it says that the point (the coarse conditional optimum and one Gauss-Newton step) is off the fine
      // ridge, not that the limit lies inward. Its secant moved a channel's consistency bound from 0.50 to 3.27
      // Pa.s^n, where the fine profile t is 0.25 (the crossing is near 0.77). The coarse limit stands.
      if (round == 0 && tau > 1.5 * q) break;
      if (std::abs(tau - q) < closest_miss) closest_miss = std::abs(tau - q), closest_u = u;
      if (std::abs(tau / q - 1.0) <= tolerance) break;
      const double slope = round == 0 ? side.limit_slope : (tau - tau_prev) / (u - u_prev);
      if (!(slope > 0)) {  // fine tau not rising outward here: no basis for a step
        u = closest_u;
        break;
      }
      u_prev = u;
      tau_prev = tau;
      u = std::clamp(u + (q - tau) / slope, u_min, u_max);  // after the third: the secant's estimate
    }
    side.limit = evaluated ? side.limit + dir * u : moved;
  });
}

// The plain warning a material parameter's interval calls for: an upper bound only (a yield stress the readings do
// not need), undetermined, or open on one side; none for a closed interval within a factor of 100. (A yield stress
// that is an upper bound and undetermined is open on both sides.)
std::optional<std::string> interval_warning(const ParameterEstimate& e) {
  if (e.upper_only && e.identifiable)
    return fmt::format("the readings need no yield stress: only an upper bound ({:.3g} Pa) is supported; if the "
                       "sample was still spreading when readings ended, continue them until it stops",
                       e.upper);
  if (!e.identifiable && e.lower_open && e.upper_open)
    return fmt::format("the {} is not determined by these readings: its 95% interval spans its whole range ({:.3g} "
                       "to {:.3g} {})",
                       plain_name(e.name), e.lower, e.upper, e.unit);
  if (e.lower_open)
    return fmt::format("the readings set no lower limit on the {} (95% interval reaches the end of its range, {:.3g} "
                       "{})",
                       plain_name(e.name), e.lower, e.unit);
  if (e.upper_open)
    return fmt::format("the readings set no upper limit on the {} (95% interval reaches the end of its range, {:.3g} "
                       "{})",
                       plain_name(e.name), e.upper, e.unit);
  if (!e.identifiable)
    return fmt::format("the {} is not determined by these readings (95% interval spans more than a factor of 100)",
                       plain_name(e.name));
  return std::nullopt;
}

// A sample at rest from the first reading on (a stiff paste that stopped within seconds): the curve carries no
// rate information, and the refits of a profile cannot move its nearly static layer, but the arrested reading
// itself gives the yield stress by the rig's plastic-limit relation (src/fit/final_only.hpp; Roussel & Coussot
// 2005 on the plate). Applies to one channel or plate series whose readings scatter about their mean no more
// than the reading uncertainty allows; replaces the undetermined yield-stress estimate of `out`. Returns whether
// it did.
bool arrested_yield_stress(const std::vector<FitSeries>& series, const FitProblem& problem, FitResult& out) {
  if (series.size() != 1) return false;
  const FitSeries& s = series.front();
  const std::optional<double> exponent = arrest_extent_exponent(s.setup.rig);
  if (!exponent) return false;
  const std::vector<double>& v = problem.fitted_values()[0];
  if (v.size() < 3) return false;
  double mean = 0;
  for (double x : v) mean += x;
  mean /= double(v.size());
  const double sigma = s.sigma ? *s.sigma : out.rmse;
  if (!(sigma > 0)) return false;
  // At rest: the readings scatter about their mean no more than the reading uncertainty allows (chi-square at the
  // 1% level on n - 1 degrees of freedom).
  double chi2 = 0;
  for (double x : v) chi2 += (x - mean) * (x - mean) / (sigma * sigma);
  if (chi2 > boost::math::quantile(boost::math::chi_squared(double(v.size() - 1)), 0.99)) return false;
  const auto [lo, hi] = std::minmax_element(v.begin(), v.end());
  // The mean of n readings at rest has standard uncertainty sigma / sqrt(n).
  const FitResult arrested = fit_final_reading(s.setup, mean, sigma / std::sqrt(double(v.size())));
  if (!arrested.converged() || arrested.parameters.empty()) return false;
  // The plastic-limit relation holds the thin-film model's arrested extent to within 1% where the whole sample
  // yields (tests/models/test_thin_film.cpp); the yield stress goes as the extent to the power -5 on a plate and
  // -3 on a channel, so that 1% (taken as a 95% bound) is added to the reading's own uncertainty in log space.
  const double model_sd = *exponent * 0.01 / 1.959964;
  ParameterEstimate tau = arrested.parameters.front();
  if (tau.upper_open) {
    // Stopped too soon for the relation to hold (partial_yield): a lower bound, taken 1% lower still.
    tau.lower *= std::exp(-model_sd * 1.959964);
    tau.value = tau.lower;
    if (const std::optional<std::string> why = partial_yield(s.setup, mean)) out.warnings.push_back(*why);
  } else {
    const double reading_sd = std::log(tau.upper / tau.lower) / (2.0 * 1.959964);
    const double half = 1.959964 * std::sqrt(reading_sd * reading_sd + model_sd * model_sd);
    tau.lower = tau.value * std::exp(-half);
    tau.upper = tau.value * std::exp(half);
  }
  for (ParameterEstimate& e : out.parameters)
    if (is_parameter(e.name, Parameter::YieldStress)) {
      // The curve's own finding on the yield stress (undetermined, or open on a side) no longer applies.
      if (const std::optional<std::string> was = interval_warning(e)) std::erase(out.warnings, *was);
      e = tau;
      out.warnings.push_back(fmt::format(
          "the sample was at rest from the first reading on (readings within {:.2g} mm, as scattered as the "
          "reading uncertainty allows): the yield stress comes "
          "from the arrested reading by the plastic-limit relation, as for a final-only test; read from the "
          "release to determine the other parameters",
          (*hi - *lo) * 1e3));
      return true;
    }
  return false;
}

// The reported estimates and their 95% limits, with a plain warning for every open side or undetermined
// parameter: profile-likelihood limits of the material parameters (their hull over every valley within the
// cut-off) when `profiles` is given, else quadratic ones; the release times keep quadratic limits. The profile
// limits are in the fine problem's coordinates (limits_on_fine).
// Returns how many material parameters the readings determine.
int interval_estimates(const FitProblem& problem, const Eigen::VectorXd& x_best, const Eigen::MatrixXd& cov, double q,
                       const Profiles* profiles, const std::vector<Profiles>& other_basins,
                       const std::vector<Eigen::VectorXd>& inside, FitResult& out) {
  int identifiable = 0;
  const int p = problem.size();
  for (int i = 0; i < p; ++i) {
    ParameterEstimate e;
    e.name = problem.names()[i];
    e.unit = parameter_unit(e.name);
    const bool log_scale = i < problem.material_parameters();
    const double x = x_best[i];
    const double se = std::sqrt(cov(i, i));
    const double lo_box = problem.lower()[i], hi_box = problem.upper()[i];
    double lo = x - q * se, hi = x + q * se;
    bool lo_open = !std::isfinite(lo) || lo <= lo_box, hi_open = !std::isfinite(hi) || hi >= hi_box;
    if (profiles && log_scale) {
      e.profiled = true;
      lo_open = profiles->sides[std::size_t(2 * i)].end != ProfileEnd::Crossed;
      hi_open = profiles->sides[std::size_t(2 * i + 1)].end != ProfileEnd::Crossed;
      lo = lo_open ? lo_box : profiles->sides[std::size_t(2 * i)].limit;
      hi = hi_open ? hi_box : profiles->sides[std::size_t(2 * i + 1)].limit;
      // The hull with the other valleys' intervals.
      for (const Profiles& other : other_basins) {
        const ProfileSide& d = other.sides[std::size_t(2 * i)];
        const ProfileSide& u = other.sides[std::size_t(2 * i + 1)];
        if (d.end != ProfileEnd::Crossed) lo_open = true, lo = lo_box;
        else if (!lo_open) lo = std::min(lo, d.limit);
        if (u.end != ProfileEnd::Crossed) hi_open = true, hi = hi_box;
        else if (!hi_open) hi = std::max(hi, u.limit);
      }
      // Points known to lie within the cut-off (the special cases' optima) lie within the interval: a profile
      // walk that lost its way (a refit stuck in another valley) cannot leave them out. One at the box's end
      // opens that side (a power law within the cut-off: no yield stress is needed).
      for (const Eigen::VectorXd& point : inside) {
        const double v = point[i], slack = 1e-9 * (hi_box - lo_box);
        if (v <= lo_box + slack) lo_open = true, lo = lo_box;
        else if (!lo_open) lo = std::min(lo, v);
        if (v >= hi_box - slack) hi_open = true, hi = hi_box;
        else if (!hi_open) hi = std::max(hi, v);
      }
      // The coarse optimum and the fine one differ slightly; a limit can never be on the wrong side of the value.
      lo = std::min(lo, x);
      hi = std::max(hi, x);
    }
    lo = std::max(lo, lo_box);
    hi = std::min(hi, hi_box);
    if (log_scale) {
      e.value = std::exp(x);
      e.lower = std::exp(lo);
      e.upper = std::exp(hi);
      if (is_parameter(e.name, Parameter::FlowIndex)) e.upper = std::min(e.upper, 2.0);
    } else {
      e.value = x;
      e.lower = lo;
      e.upper = hi;
    }
    e.lower_open = lo_open;
    e.upper_open = hi_open;
    if (is_parameter(e.name, Parameter::YieldStress) && lo_open) {
      // A yield stress the readings do not need: the honest statement is an upper bound.
      e.upper_only = true;
      e.lower = 0.0;
      e.identifiable = !hi_open;
    } else if (log_scale) {
      e.identifiable = !lo_open && !hi_open && hi - lo < std::log(100.0);
    } else {
      e.identifiable = std::isfinite(se);
    }
    if (log_scale) {
      if (const std::optional<std::string> w = interval_warning(e)) out.warnings.push_back(*w);
      if (e.identifiable) ++identifiable;
    }
    out.parameters.push_back(e);
  }
  return identifiable;
}

// Parameter vectors drawn from the likelihood for bands (src/fit/likelihood_draws.hpp), on `sampled` (the coarse
// problem, like the profiles) around its optimum `around`, moved to the fine optimum `x_best`; and the profile
// walks' points inside the 95% region (FitResult::ridge).
void draw_for_bands(const FitProblem& sampled, const FitProblem& problem, const LmResult& around,
                    const Eigen::VectorXd& x_best, double s2, double q, const Profiles& profiles,
                    const std::vector<Profiles>& other_basins, int count, FitResult& out) {
  const int p = problem.size();
  Eigen::VectorXd lo(p), hi(p);
  for (int i = 0; i < p; ++i) {
    const ParameterEstimate& e = out.parameters[std::size_t(i)];
    const bool log_scale = i < problem.material_parameters();
    lo[i] = log_scale ? (e.lower > 0 ? std::log(e.lower) : problem.lower()[i]) : e.lower;
    hi[i] = log_scale ? std::log(e.upper) : e.upper;
    lo[i] += around.x[i] - x_best[i];
    hi[i] += around.x[i] - x_best[i];
  }
  std::vector<Eigen::VectorXd> centres;
  for (const ProfileSide& side : profiles.sides) centres.insert(centres.end(), side.trace.begin(), side.trace.end());
  for (const Profiles& other : other_basins)
    for (const ProfileSide& side : other.sides) centres.insert(centres.end(), side.trace.begin(), side.trace.end());
  const LikelihoodDraws d =
      likelihood_draws(sampled, around.x, around.cost, s2, wald_covariance(around.jacobian, s2), lo, hi, centres,
                       2 * count, count);
  for (const Eigen::VectorXd& t : d.draws)
    out.draws.push_back((t + x_best - around.x).cwiseMax(problem.lower()).cwiseMin(problem.upper()));
  // The walks' points within the cut-off are inside the likelihood region by construction; a band that misses
  // one of them understates the uncertainty (the resampled draws are few where the ridge is long and thin).
  auto add_ridge = [&](const Profiles& set) {
    for (const ProfileSide& side : set.sides)
      for (std::size_t k = 0; k < side.trace.size(); ++k)
        if (side.trace_tau[k] <= q)
          out.ridge.push_back((side.trace[k] + x_best - around.x).cwiseMax(problem.lower()).cwiseMin(problem.upper()));
  };
  add_ridge(profiles);
  for (const Profiles& other : other_basins) add_ridge(other);
  out.draws_effective_size = d.effective_size;
}

// Plain-words findings on the fit at its optimum: parameters hard to separate, the forward model's validity
// notes, and the fit-quality findings (src/fit/fit_quality.hpp).
void describe_fit(const std::vector<FitSeries>& series, const FitProblem& problem, const Eigen::VectorXd& x_best,
                  const Eigen::VectorXd& residuals_at_best, FitResult& out) {
  {
    std::string pairs;
    for (int a = 0; a < problem.material_parameters(); ++a)
      for (int b = a + 1; b < problem.material_parameters(); ++b)
        if (std::abs(out.correlation(a, b)) > 0.95)
          pairs += fmt::format("{}{} and {} ({:.2f})", pairs.empty() ? "" : ", ", plain_name(problem.names()[a]),
                               plain_name(problem.names()[b]), out.correlation(a, b));
    if (!pairs.empty())
      out.warnings.push_back(fmt::format(
          "hard to separate from these readings (correlation): {}; readings until the sample stops, a longer test, "
          "a second fill volume or rig, or the product's prior flow index would separate them",
          pairs));
  }
  for (std::string& note : problem.notes(x_best)) out.warnings.push_back(std::move(note));
  {
    std::vector<SeriesResiduals> residuals;
    Eigen::Index k = 0;
    for (std::size_t s = 0; s < series.size(); ++s) {
      SeriesResiduals sr;
      sr.label = series[s].label;
      sr.times = problem.fitted_times()[s];
      sr.readings = problem.fitted_values()[s];
      sr.sigma = problem.sigma_stated() ? problem.weight_sigma(s) : 0.0;
      for (std::size_t i = 0; i < sr.times.size(); ++i, ++k) sr.residuals.push_back(residuals_at_best[k] * problem.weight_sigma(s));
      residuals.push_back(std::move(sr));
    }
    for (QualityFinding& finding : judge_fit_quality(residuals, problem.size())) {
      out.quality.push_back(finding.kind);
      out.warnings.push_back(std::move(finding.message));
    }
  }
}

// The polish starts from whichever candidate fits the full model best: the global stage's point, the related
// fits' materials, and, should the full model fail at all of those (a stiff, nearly arrested flow at an extreme
// corner of the box), points moved halfway, then all the way, to the centre of the box.
Eigen::VectorXd polish_start(const FitProblem& problem, const ResidualColumnsFunction& f, Eigen::VectorXd start,
                             const std::vector<FitResult>& hints) {
  const int p = problem.size();
  Eigen::VectorXd r;
  double best_cost = std::numeric_limits<double>::infinity();
  std::vector<Eigen::VectorXd> candidates{start};
  for (const FitResult& h : hints)
    if (h.status == FitStatus::Converged || h.status == FitStatus::NotIdentifiable)
      candidates.push_back(problem.parameters(h.material, h.time_origins));
  const Eigen::VectorXd centre = 0.5 * (problem.lower() + problem.upper());
  const std::size_t first_fallback = candidates.size();
  for (double w : {0.5, 1.0}) {
    Eigen::VectorXd moved = (1.0 - w) * start + w * centre;
    for (int i = problem.material_parameters(); i < p; ++i) moved[i] = start[i];  // release times stay
    candidates.push_back(moved);
  }
  for (std::size_t c = 0; c < candidates.size(); ++c) {
    if (c >= first_fallback && std::isfinite(best_cost)) break;
    if (f(candidates[c], r, nullptr) && r.squaredNorm() < best_cost) {
      best_cost = r.squaredNorm();
      start = candidates[c];
    }
  }
  return start;
}

// --- the stages of fit_law ------------------------------------------------------------------------------------

// What fit_law's stages share: the problem at the default resolution and its coarse twin (half the cells), the
// optima on both, the covariance at the optimum, and the profiles.
struct LawFit {
  LawFit(const FitOptions& o, const FitProblem& fine, const ResidualColumnsFunction& residuals)
      : options(o), problem(fine), f(residuals) {}

  const FitOptions& options;
  const FitProblem& problem;
  const ResidualColumnsFunction& f;  // the fine residuals (and known columns), recording why the model failed
  std::optional<FitProblem> coarse;
  LmOptions lm;
  LmResult best, coarse_best;
  bool coarse_ok = false;
  Eigen::MatrixXd cov;
  Profiles profiles;
  std::vector<Profiles> other_basins;  // profiles around other local optima within the cut-off
  std::vector<Eigen::VectorXd> inside;  // special cases' optima within the cut-off (other_valleys)
  double q = 0;                         // two-sided 95% Student-t quantile of the residual degrees of freedom
  int n = 0, dof = 0;

  // Residual variance from the readings alone (a prior's residual is not a reading).
  double variance(const LmResult& r) const {
    const double chi2 = r.r.head(n).squaredNorm();
    return problem.sigma_stated() ? std::max(1.0, chi2 / dof) : chi2 / dof;
  }
  bool usable(const LmResult& r) const {
    const int m = problem.residual_count();
    return r.r.size() == m && r.jacobian.rows() == m;
  }
  ResidualColumnsFunction coarse_residuals() const {
    return [this](const Eigen::VectorXd& x, Eigen::VectorXd& r, Eigen::MatrixXd* columns) {
      return coarse->residuals(x, r, nullptr, columns);
    };
  }
};

// `again` (a search continued or restarted) replaces `kept`, its iterations added, when it solved with m residuals
// and costs no more, or when `kept` has no usable result.
void keep_if_no_worse(LmResult& kept, LmResult again, int m) {
  if (again.r.size() != m || (kept.r.size() == m && again.cost > kept.cost)) return;
  again.iterations += kept.iterations;
  kept = std::move(again);
}

// Coarse-to-fine Levenberg-Marquardt from `start`: most iterations run on a coarse model, then the default model
// polishes the last digits and supplies the Jacobian for the intervals. Coarse: with the default extrapolation,
// the same extrapolation on 8 and 16 cells (about 0.75 of the cost, 0.1% mean model error; the 20-cell grid alone,
// 0.7% mean error, moved a profile limit by a quarter of its width between two nearly equal readings sets in
// tests/fit/test_profile_stability.cpp); without it, half the cells. Sets s.best and s.coarse_best.
void optimise(LawFit& s, const std::vector<FitSeries>& series, Law law, Eigen::VectorXd start) {
  const FitProblem& problem = s.problem;
  s.lm.max_iterations = s.options.max_iterations;
  s.lm.fd_step = fd_steps(problem);
  if (s.options.forward.extrapolate || s.options.forward.cells >= 32) {
    FitOptions coarse_options = s.options;
    if (s.options.forward.extrapolate)
      coarse_options.forward.cells = 16;
    else
      coarse_options.forward.cells = s.options.forward.cells / 2;
    s.coarse.emplace(series, law, coarse_options);
    s.coarse_best = levenberg_marquardt(s.coarse_residuals(), start, problem.lower(), problem.upper(), s.lm);
    // Along a long curved valley the coarse search may run out of iterations while still lowering the cost step
    // after step: one more budget from where it stopped. Without it the fine polish, damped for a nearby optimum,
    // took tiny steps there and stalled: a channel fit reported the iteration limit (or a point at twice the
    // optimum's chi-square) where 45 more iterations reach the optimum.
    if (s.coarse_best.status == LmStatus::MaxIterations && s.coarse_best.r.size() == problem.residual_count())
      keep_if_no_worse(
          s.coarse_best,
          levenberg_marquardt(s.coarse_residuals(), s.coarse_best.x, problem.lower(), problem.upper(), s.lm),
          problem.residual_count());
    // The coarse optimum starts the fine polish, unless the fine model fails there (a stiff corner that the
    // coarser grid still solves): then the fine polish starts where the coarse one did.
    Eigen::VectorXd probe;
    if (s.coarse_best.r.size() == problem.residual_count() && problem.residuals(s.coarse_best.x, probe))
      start = s.coarse_best.x;
    s.lm.max_iterations = std::max(8, s.options.max_iterations / 3);
    s.lm.initial_damping = 1e-6;
  }
  const int m = problem.residual_count();
  s.best = levenberg_marquardt(s.f, start, problem.lower(), problem.upper(), s.lm);
  // Along the long curved ridges of a thin-film fit the polish may run out of iterations while still improving:
  // one more budget from where it stopped (still bounded).
  if (!s.best.converged && !s.best.model_failed && s.best.r.size() == m) {
    LmOptions more = s.lm;
    more.max_iterations = s.options.max_iterations;
    keep_if_no_worse(s.best, levenberg_marquardt(s.f, s.best.x, problem.lower(), problem.upper(), more), m);
  }
  // The profiles walk from the coarse optimum, which must lie in the fine one's valley: one that stopped short
  // of where the fine polish went on to (a channel fit's coarse search ended in a flat stretch at 3.5 times the
  // fine optimum's cost) would have them measure every limit from the wrong place and find "better" points all
  // along. Then it is polished again from the fine optimum. In one valley the two optima may lie apart along it
  // (the models differ slightly) but their costs agree within a fraction of the cut-off; the test is on the cost,
  // against about the cut-off (2 residual variances, at least 2 with a stated resolution).
  const double variance = std::max(1.0, 2.0 * s.best.cost / double(std::max(1, m - problem.size())));
  const bool same_valley = s.coarse_best.r.size() == m && s.coarse_best.cost < s.best.cost + 2.0 * variance;
  if (s.coarse && !same_valley && s.best.r.size() == m) {
    LmOptions near = s.lm;
    near.initial_damping = 1e-6;
    keep_if_no_worse(s.coarse_best,
                     levenberg_marquardt(s.coarse_residuals(), s.best.x, problem.lower(), problem.upper(), near), m);
  }
}

// Other valleys: with a flow index, a fit that starts far from n can settle in a second local optimum (a
// strongly shear-thinning flow released late against a nearly Newtonian one released early). The likelihood
// interval is the set of all parameter values within the cut-off, so every such optimum within it adds its
// own profile to the interval (their hull). Found by polishing from the optimum with n moved to 0.35 and to
// 1 (common shear-thinning and Newtonian values), and from every special case's fit (`relatives`: Newtonian,
// power law, Bingham) that lies within the cut-off: each is a point of this law's parameter space inside the
// likelihood region, often in a valley of its own (a creeping, nearly Newtonian squeeze against an arrested
// stiff one: the profile walked from the arrested optimum lost the creeping valley, and a yield-stress interval
// of 18-51 Pa excluded the true 1.15 Pa that fits as well). A lower optimum found this way becomes the best.
// Returns the coarse optima within the cut-off.
std::vector<LmResult> other_valleys(LawFit& s, const std::vector<FitResult>& relatives) {
  const FitProblem& problem = s.problem;
  const int m = problem.residual_count();
  std::vector<LmResult> basins;
  if (!s.coarse_ok) return basins;
  const int n_index = [&] {
    for (int i = 0; i < problem.material_parameters(); ++i)
      if (is_parameter(problem.names()[i], Parameter::FlowIndex)) return i;
    return -1;
  }();
  LmOptions polish = s.lm;
  polish.initial_damping = 1e-6;
  const double cutoff = 0.5 * s.q * s.q * s.variance(s.best);
  std::vector<Eigen::VectorXd> starts;
  if (n_index >= 0)
    for (double n_try : {0.35, 1.0}) {
      Eigen::VectorXd x0 = s.coarse_best.x;
      if (std::abs(x0[n_index] - std::log(n_try)) < 0.4) continue;
      x0[n_index] = std::log(n_try);
      starts.push_back(x0);
    }
  for (const FitResult& r : relatives) {
    if (r.law == problem.law() || !r.converged() || !(r.cost < s.best.cost + cutoff)) continue;
    const Eigen::VectorXd x0 =
        problem.parameters(r.material, r.time_origins).cwiseMax(problem.lower()).cwiseMin(problem.upper());
    s.inside.push_back(x0);
    if ((x0 - s.coarse_best.x).head(problem.material_parameters()).cwiseAbs().maxCoeff() < 0.1) continue;
    starts.push_back(x0);
  }
  for (const Eigen::VectorXd& x0 : starts) {
    LmOptions search = s.lm;
    search.max_iterations = std::max(8, s.options.max_iterations / 2);
    LmResult b = levenberg_marquardt(s.coarse_residuals(), x0, problem.lower(), problem.upper(), search);
    if (b.r.size() != m || b.jacobian.rows() != m) continue;
    const double distance = (b.x - s.coarse_best.x).head(problem.material_parameters()).cwiseAbs().maxCoeff();
    if (distance < 0.1) continue;  // the same valley
    bool seen = false;             // a valley another start found already
    for (const LmResult& other : basins)
      seen = seen || (b.x - other.x).head(problem.material_parameters()).cwiseAbs().maxCoeff() < 0.1;
    if (seen) continue;
    if (b.cost < s.coarse_best.cost - 0.01 * s.variance(s.best)) {
      // A lower valley: polish it on the fine problem and make it the optimum.
      LmResult fine = levenberg_marquardt(s.f, b.x, problem.lower(), problem.upper(), polish);
      if (fine.r.size() == m && fine.jacobian.rows() == m && fine.cost < s.best.cost) {
        fine.iterations += s.best.iterations;
        s.best = std::move(fine);
        s.cov = wald_covariance(s.best.jacobian, s.variance(s.best));
        std::swap(b, s.coarse_best);
      }
    }
    if (b.cost < s.coarse_best.cost + cutoff) basins.push_back(std::move(b));
  }
  return basins;
}

// The profiles of every material parameter around the optimum (on the coarse problem when it solved there). A
// refit that finds a clearly lower cost means the polish had stopped short of the optimum: polish from there on
// both resolutions and profile again (once).
void profile_optimum(LawFit& s) {
  const FitProblem& problem = s.problem;
  const int m = problem.residual_count();
  LmOptions polish = s.lm;
  polish.initial_damping = 1e-6;
  for (int round = 0; round < 2; ++round) {
    const FitProblem& profiled = s.coarse_ok ? *s.coarse : problem;
    const LmResult& around = s.coarse_ok ? s.coarse_best : s.best;
    s.profiles = profile_material(profiled, around, s.variance(s.best), s.q,
                                  wald_covariance(around.jacobian, s.variance(s.best)), around.cost);
    if (!s.profiles.better || round == 1) break;
    LmResult again = levenberg_marquardt(s.f, *s.profiles.better, problem.lower(), problem.upper(), polish);
    if (again.r.size() != m || again.jacobian.rows() != m || again.cost >= s.best.cost) break;
    again.iterations += s.best.iterations;
    s.best = std::move(again);
    s.cov = wald_covariance(s.best.jacobian, s.variance(s.best));
    if (s.coarse_ok) {
      s.coarse_best = levenberg_marquardt(s.coarse_residuals(), s.best.x, problem.lower(), problem.upper(), polish);
      s.coarse_ok = s.coarse_best.r.size() == m && s.coarse_best.jacobian.rows() == m;
    }
  }
}

// The profiles around the other valleys within the cut-off; their sides are limits of that valley, recorded as
// absolute values (ProfileSide::limit is absolute).
void profile_other_valleys(LawFit& s, const std::vector<LmResult>& basins) {
  if (!s.coarse_ok) return;
  for (const LmResult& b : basins) {
    if (b.cost > s.coarse_best.cost + 0.5 * s.q * s.q * s.variance(s.best)) continue;
    s.other_basins.push_back(profile_material(*s.coarse, b, s.variance(s.best), s.q,
                                              wald_covariance(b.jacobian, s.variance(s.best)), s.coarse_best.cost));
  }
}

// The optimum's figures: material, release times, residual statistics (unweighted rmse over all series; the
// variance from the residuals unless stated), AICc, estimate, covariance and correlation.
void describe_optimum(const LawFit& s, const std::vector<FitSeries>& series, FitResult& out) {
  const FitProblem& problem = s.problem;
  const LmResult& best = s.best;
  const int p = problem.size();
  out.iterations = best.iterations;
  out.cost = best.cost;
  out.material = problem.material(best.x);
  out.time_origins = problem.time_origins(best.x);
  out.prior = problem.has_prior() ? s.options.flow_index_prior : std::nullopt;
  double sq = 0.0;
  {
    Eigen::Index k = 0;
    for (std::size_t i = 0; i < series.size(); ++i)
      for (std::size_t j = 0; j < problem.fitted_times()[i].size(); ++j, ++k)
        sq += std::pow(best.r[k] * problem.weight_sigma(i), 2);
  }
  out.rmse = std::sqrt(sq / s.n);
  const double chi2 = best.r.head(s.n).squaredNorm();
  out.sigma = std::sqrt(s.variance(best)) * problem.weight_sigma(0);
  out.aicc = aicc(chi2, s.n, p + 1);
  out.estimate = best.x;
  out.covariance = s.cov;
  out.correlation = Eigen::MatrixXd::Identity(p, p);
  for (int a = 0; a < p; ++a)
    for (int b = 0; b < p; ++b)
      if (a != b) {
        const double c = s.cov(a, b) / std::sqrt(s.cov(a, a) * s.cov(b, b));
        out.correlation(a, b) = std::isfinite(c) ? c : 1.0;
      }
}

}  // namespace

FitResult fit_law(const std::vector<FitSeries>& series, Law law, const FitOptions& options,
                  const std::vector<FitResult>& hints) {
  options.validate();
  if (series.empty()) throw std::invalid_argument("fit: no readings");
  FitResult out;
  out.law = law;
  const FitProblem problem(series, law, options);
  const int p = problem.size();
  const int n = problem.points();
  out.points = n;
  out.names = problem.names();
  if (n < p + 1) {
    out.status = FitStatus::InsufficientData;
    out.reason = fmt::format("{} reading{} cannot determine {} parameters and a reading uncertainty", n,
                             n == 1 ? "" : "s", p);
    return out;
  }
  Eigen::VectorXd start = global_start(problem, options.global_evaluations);

  std::string failure;
  std::mutex failure_lock;  // Jacobian columns run on several threads
  const ResidualColumnsFunction f = [&](const Eigen::VectorXd& x, Eigen::VectorXd& r, Eigen::MatrixXd* columns) {
    std::string why;
    if (problem.residuals(x, r, &why, columns)) return true;
    const std::lock_guard<std::mutex> hold(failure_lock);
    failure = why;
    return false;
  };
  start = polish_start(problem, f, start, hints);
  LawFit s(options, problem, f);
  optimise(s, series, law, start);
  auto solves = [&] { return problem.evaluations() + (s.coarse ? s.coarse->evaluations() : 0); };
  out.iterations = s.best.iterations;
  if (!s.usable(s.best)) {
    out.status = FitStatus::ForwardFailure;
    out.reason = s.best.message + (failure.empty() ? "" : ": " + failure);
    out.evaluations = solves();
    return out;
  }
  s.n = n;
  s.dof = n - p;
  s.q = boost::math::quantile(boost::math::complement(boost::math::students_t(double(s.dof)), 0.025));
  // The profiles run on the coarse problem around its own optimum (half the cost of a fine solve; the interval's
  // width, not its centre, is taken from it).
  s.coarse_ok = s.coarse && s.usable(s.coarse_best);
  s.cov = wald_covariance(s.best.jacobian, s.variance(s.best));
  if (options.profile_intervals) {
    const std::vector<LmResult> basins = other_valleys(s, hints);
    profile_optimum(s);
    profile_other_valleys(s, basins);
    if (s.coarse_ok) {
      limits_on_fine(problem, s.best.cost, s.variance(s.best), s.q, s.best.x, s.coarse_best.x, s.profiles);
      for (Profiles& other : s.other_basins)
        limits_on_fine(problem, s.best.cost, s.variance(s.best), s.q, s.best.x, s.coarse_best.x, other);
    }
  }
  describe_optimum(s, series, out);

  const bool profiled = options.profile_intervals && !s.profiles.sides.empty();
  const int identifiable = interval_estimates(problem, s.best.x, s.cov, s.q, profiled ? &s.profiles : nullptr,
                                              s.other_basins, s.inside, out);
  if (profiled && options.likelihood_draws > 0)
    draw_for_bands(s.coarse_ok ? *s.coarse : problem, problem, s.coarse_ok ? s.coarse_best : s.best, s.best.x,
                   s.variance(s.best), s.q, s.profiles, s.other_basins, options.likelihood_draws, out);
  describe_fit(series, problem, s.best.x, s.best.r, out);
  out.evaluations = solves();
  // Stopped on the iteration limit in a flat valley, but no profile refit found a lower cost (by 1% of the
  // cut-off scale) anywhere along six traces through it: the point is an optimum for every purpose of the
  // intervals, which come from the likelihood itself.
  // Or a refit found a lower cost, but by under 5% of the cut-off even after the re-polish of profile_optimum (a
  // valley so flat that the polish creeps along it): the limits, measured from a cost that high, are wider than
  // the exact ones by that much at most (conservative), so they stand.
  const double cutoff = 0.5 * s.q * s.q * s.variance(s.best);
  const bool optimum =
      s.best.converged || (profiled && (!s.profiles.better || s.profiles.better_by < 0.05 * cutoff));
  if (!optimum) {
    out.status = FitStatus::NotConverged;
    out.reason = s.best.message;
  } else if (identifiable == 0 && !arrested_yield_stress(series, problem, out)) {
    out.status = FitStatus::NotIdentifiable;
    out.reason = "no material parameter is determined by these readings";
  } else {
    out.status = FitStatus::Converged;
  }
  return out;
}

FitResult with_likelihood_draws(const std::vector<FitSeries>& series, FitResult fit, const FitOptions& options) {
  if (options.likelihood_draws <= 0 || !options.profile_intervals || !fit.draws.empty() || !fit.converged())
    return fit;
  FitOptions again = options;
  again.global_evaluations = 0;  // `fit` is the start
  const FitResult refit = fit_law(series, fit.law, again, {fit});
  fit.evaluations += refit.evaluations;
  if (refit.converged()) {
    fit.draws = refit.draws;
    fit.ridge = refit.ridge;
    fit.draws_effective_size = refit.draws_effective_size;
  }
  return fit;
}

int ModelChoice::index_of(Law law) const {
  for (std::size_t i = 0; i < candidates.size(); ++i)
    if (candidates[i].law == law) return int(i);
  return -1;
}

const FitResult* ModelChoice::candidate(Law law) const {
  const int i = index_of(law);
  return i >= 0 ? &candidates[std::size_t(i)] : nullptr;
}

namespace {
/// The laws a law's fit starts from: its special cases with one parameter fewer (Newtonian for the power law and
/// Bingham; both of those for Herschel-Bulkley).
std::vector<Law> simpler_relatives(Law law) {
  switch (law) {
    case Law::Newtonian: return {};
    case Law::PowerLaw: return {Law::Newtonian};
    case Law::Bingham: return {Law::Newtonian};
    case Law::HerschelBulkley: return {Law::Bingham, Law::PowerLaw};
  }
  return {};
}

/// Whether `law` is `of` or one of its special cases (all the way down).
bool is_relative(Law law, Law of) {
  if (law == of) return true;
  for (const Law r : simpler_relatives(of))
    if (is_relative(law, r)) return true;
  return false;
}

/// Quick fits (quadratic intervals) of `law` and of all its special cases, in all_laws() order (every law after
/// its simpler relatives), each started from its simpler relatives' fits: the candidates of fit_auto, and of a
/// named law.
ModelChoice quick_candidates(const std::vector<FitSeries>& series, const FitOptions& options, Law law) {
  ModelChoice choice;
  FitOptions quick = options;
  quick.profile_intervals = false;
  for (const Law l : all_laws()) {
    if (!is_relative(l, law)) continue;
    std::vector<FitResult> starts;
    for (const Law relative : simpler_relatives(l)) starts.push_back(*choice.candidate(relative));
    choice.candidates.push_back(fit_law(series, l, quick, starts));
  }
  return choice;
}

/// The reported fit of `law` with the options' intervals, started from its quick candidate and its simpler
/// relatives' (as fitted): that candidate has been through the global stage and the polish already, so the box is
/// not searched again unless it failed; a candidate stopped on the iteration limit in a flat valley goes on from
/// where it stopped. Its solves include its own and the candidate's (a caller adds the other candidates').
FitResult refit_reported(const std::vector<FitSeries>& series, const FitOptions& options, const ModelChoice& quick,
                         Law law) {
  const FitResult& candidate = *quick.candidate(law);
  // The law's own candidate, then every special case's (each a start, and a point of its parameter space whose
  // valley other_valleys looks into).
  std::vector<FitResult> starts{candidate};
  for (const FitResult& c : quick.candidates)
    if (c.law != law && is_relative(c.law, law)) starts.push_back(c);
  FitOptions reported = options;
  if (candidate.converged()) reported.global_evaluations = 0;
  FitResult r = fit_law(series, law, reported, starts);
  r.evaluations += candidate.evaluations;
  return r;
}
}  // namespace

FitResult fit_named(const std::vector<FitSeries>& series, Law law, const FitOptions& options) {
  if (simpler_relatives(law).empty()) return fit_law(series, law, options);
  const ModelChoice quick = quick_candidates(series, options, law);
  FitResult r = refit_reported(series, options, quick, law);
  for (const FitResult& c : quick.candidates)
    if (c.law != law) r.evaluations += c.evaluations;
  return r;
}

ModelChoice fit_auto(const std::vector<FitSeries>& series, const FitOptions& options) {
  // Every law is fitted with quadratic intervals, for the comparison by AICc; nested laws start from their
  // simpler relatives (Newtonian -> power law, Bingham -> Herschel-Bulkley).
  ModelChoice choice = quick_candidates(series, options, Law::HerschelBulkley);
  auto index_of = [&](Law law) { return choice.index_of(law); };
  double best = std::numeric_limits<double>::infinity();
  // Best description: the simplest law whose AICc is within 2 of the best (all_laws() is ordered simplest first;
  // power law and Bingham have the same size, so the lower AICc of the two wins among them); and the Akaike
  // weights (Burnham & Anderson 2002, section 2.9): the relative support of each law.
  auto rank = [&] {
    best = std::numeric_limits<double>::infinity();
    for (const FitResult& r : choice.candidates)
      if (r.converged()) best = std::min(best, r.aicc);
    choice.best_description = -1;
    for (std::size_t i = 0; i < choice.candidates.size(); ++i) {
      const FitResult& r = choice.candidates[i];
      if (!r.converged() || r.aicc > best + 2.0) continue;
      if (choice.best_description < 0) {
        choice.best_description = int(i);
        continue;
      }
      const FitResult& c = choice.candidates[std::size_t(choice.best_description)];
      if (r.parameters.size() == c.parameters.size() && r.aicc < c.aicc) choice.best_description = int(i);
    }
    double total = 0.0;
    for (const FitResult& r : choice.candidates) total += r.converged() ? std::exp(-0.5 * (r.aicc - best)) : 0.0;
    choice.weights.clear();
    for (const FitResult& r : choice.candidates)
      choice.weights.push_back(r.converged() && total > 0 ? std::exp(-0.5 * (r.aicc - best)) / total : 0.0);
  };
  rank();

  // The reported parameters: those of the general law, Herschel-Bulkley, with profile-likelihood intervals, so
  // that every batch of a product has the same parameter set (Bingham and the power law are its special cases)
  // and the intervals carry the uncertainty of the law: the simpler laws are points of its parameter space, and
  // the profile of the yield stress re-optimises the flow index instead of fixing it at 1. (A simpler law's
  // conditional interval missed the true yield stress of shear-thinning pastes a third of the time.) A liquid
  // best described as Newtonian reports its viscosity instead: it has no yield stress to judge.
  // A liquid: best described as Newtonian, and the power law settles its flow index near 1 (the 95% interval
  // within 0.8 to 1.25). Where the power law leaves n open, the readings cannot tell a liquid from a paste (a
  // squeeze test that closed before its first reading reads the same for either): the general law is reported,
  // with intervals that say so. (The Newtonian viscosity alone was reported for such squeeze tests of 170 Pa
  // pastes, its interval far from any parameter of the material.)
  const int newtonian_index = index_of(Law::Newtonian);
  const bool liquid = choice.best_description == newtonian_index && [&] {
    const FitResult& pl = choice.candidates[std::size_t(index_of(Law::PowerLaw))];
    if (!pl.converged()) return false;
    for (const auto& p : pl.parameters)
      if (is_parameter(p.name, Parameter::FlowIndex)) return p.identifiable && p.lower >= 0.8 && p.upper <= 1.25;
    return false;
  }();
  const int reported = liquid ? newtonian_index : index_of(Law::HerschelBulkley);
  FitResult general = refit_reported(series, options, choice, choice.candidates[std::size_t(reported)].law);
  const bool usable = general.status == FitStatus::Converged;
  if (usable) {
    // The reported law's refit searched further (its special cases' valleys, the profiles' better points) and can
    // end lower than its quick candidate: the laws are ranked again on what is reported, so that the weights and
    // the best description are those of the fits shown. (A point fit can stop in a worse valley: the bench's
    // channel paste fitted without its special cases as starts ended 1 to 4 cost units above the profiled fit in
    // 7 of 8 seeds. With them, as here, the bench's weights moved by 0.01 at most.)
    choice.candidates[std::size_t(reported)] = std::move(general);
    choice.chosen = reported;
    rank();
  } else if (choice.best_description >= 0) {
    // The general law could not be fitted: report the best description, refitted with profile intervals, and say
    // that its intervals assume that law.
    const int fallback = choice.best_description;
    FitResult refit = fit_law(series, choice.candidates[std::size_t(fallback)].law, options,
                              {choice.candidates[std::size_t(fallback)]});
    if (refit.converged()) choice.candidates[std::size_t(fallback)] = std::move(refit);
    choice.chosen = fallback;
    FitResult& r = choice.candidates[std::size_t(fallback)];
    r.warnings.push_back(fmt::format("the {} fit failed ({}): these intervals assume the {} law and do not "
                                     "include the uncertainty of the law",
                                     law_name(choice.candidates[std::size_t(reported)].law),
                                     general.reason.empty() ? fit_status_name(general.status) : general.reason,
                                     law_name(r.law)));
  }
  if (choice.chosen < 0) {
    choice.explanation = "no law could be fitted to these readings";
    return choice;
  }
  if (choice.best_description < 0) choice.best_description = choice.chosen;
  const FitResult& described = choice.candidates[std::size_t(choice.best_description)];
  const FitResult& c = choice.candidates[std::size_t(choice.chosen)];
  const double weight = choice.weights[std::size_t(choice.best_description)];
  std::string why;
  if (described.aicc > best + 0.05)
    why = fmt::format("within {:.1f} of the best AICc with fewer parameters", described.aicc - best);
  else
    why = "lowest AICc";
  if (choice.chosen == choice.best_description)
    choice.explanation = fmt::format("{}: {} (Akaike weight {:.2f})", law_name(c.law), why, weight);
  else
    choice.explanation = fmt::format("best described as {} ({}, Akaike weight {:.2f}); parameters and intervals of "
                                     "the general {} law, so they include the uncertainty of the law",
                                     law_name(described.law), why, weight, law_name(c.law));
  return choice;
}

}  // namespace spreadfit::fit
