// The Jacobian columns a fit knows in closed form (FitProblem::residuals with columns): each release time's and the
// consistency's (or viscosity's), from the readings' rates and the consistency's time scaling (models/forward.hpp;
// the scaling's own defining-property test is tests/models/test_reading_rates.cpp). Checked against central
// differences of the same residuals on converged solutions, for several series at once (each with its own release
// time), a flow-index prior, and each law; the structure exactly (NaN where a column is left to differences, 0
// where a residual cannot depend on the parameter).
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <string>

#include "src/fit/fit_problem.hpp"
#include "tests/fit/fit_test_support.hpp"

using namespace spreadfit;
using namespace spreadfit::testing;

namespace {

fit::FitOptions converged_options() {
  fit::FitOptions o;
  o.forward.cells = 160;
  o.forward.rel_tol = 1e-7;
  return o;
}

bool is_known(const Eigen::MatrixXd& columns, Eigen::Index j) { return columns.col(j).allFinite(); }

// Every known column against central differences of the residuals (step 1e-4 in the fit's coordinates), relative to
// the column's largest entry.
void check_against_differences(const fit::FitProblem& problem, const Eigen::VectorXd& theta, double tolerance) {
  Eigen::VectorXd r;
  Eigen::MatrixXd columns;
  REQUIRE(problem.residuals(theta, r, nullptr, &columns));
  REQUIRE(columns.rows() == problem.residual_count());
  REQUIRE(columns.cols() == problem.size());
  for (Eigen::Index j = 0; j < problem.size(); ++j) {
    if (!is_known(columns, j)) continue;
    CAPTURE(problem.names()[std::size_t(j)]);
    const double h = 1e-4;
    Eigen::VectorXd up = theta, down = theta, ru, rd;
    up[j] += h;
    down[j] -= h;
    REQUIRE(problem.residuals(up, ru));
    REQUIRE(problem.residuals(down, rd));
    const Eigen::VectorXd differenced = (ru - rd) / (2 * h);
    const double scale = differenced.cwiseAbs().maxCoeff();
    const double worst = (differenced - columns.col(j)).cwiseAbs().maxCoeff();
    MESSAGE(problem.names()[std::size_t(j)], ": largest ", scale, ", worst difference ", worst);
    CHECK(scale > 0);
    CHECK(worst <= tolerance * scale);
  }
}

}  // namespace

TEST_CASE("known columns: consistency and both release times of a channel and a plate series, with a prior") {
  const Material m{20.0, 10.0, 0.4};
  fit::FitSeries a = synthetic(channel_setup(), m, 5e-4, 1, 0.3, 4.0, 60.0);
  fit::FitSeries b = synthetic(plate_setup(), m, 5e-4, 2, -0.5, 4.0, 60.0);
  a.sigma = b.sigma = 5e-4;
  fit::FitOptions o = converged_options();
  o.flow_index_prior = fit::FlowIndexPrior{0.45, 0.1, "test"};
  const fit::FitProblem problem({a, b}, Law::HerschelBulkley, o);
  REQUIRE(problem.size() == 5);  // yield stress, consistency, flow index, two release times
  const Eigen::VectorXd theta = problem.parameters(m, {0.3, -0.5});
  Eigen::VectorXd r;
  Eigen::MatrixXd columns;
  REQUIRE(problem.residuals(theta, r, nullptr, &columns));
  // Structure: the yield stress and the flow index are left to differences; the consistency and the two release
  // times are known; series a's rows do not depend on series b's release time (and the reverse); the prior's row
  // (on n alone) is 0 in every known column.
  CHECK_FALSE(is_known(columns, 0));
  CHECK(is_known(columns, 1));
  CHECK_FALSE(is_known(columns, 2));
  CHECK(is_known(columns, 3));
  CHECK(is_known(columns, 4));
  const Eigen::Index na = Eigen::Index(a.times.size()), nb = Eigen::Index(b.times.size());
  CHECK(columns.col(4).head(na).cwiseAbs().maxCoeff() == 0.0);
  CHECK(columns.col(3).segment(na, nb).cwiseAbs().maxCoeff() == 0.0);
  CHECK(columns(na + nb, 1) == 0.0);
  CHECK(columns(na + nb, 3) == 0.0);
  CHECK(columns(na + nb, 4) == 0.0);
  // Without the request the residuals are the same numbers.
  Eigen::VectorXd plain;
  REQUIRE(problem.residuals(theta, plain));
  CHECK(plain == r);
  check_against_differences(problem, theta, 3e-3);
}

TEST_CASE("known columns: every law on the channel, and the squeeze") {
  const Material materials[] = {{0, 30, 1.0}, {0, 5, 0.6}, {8, 4, 1.0}, {20, 10, 0.4}};
  const Law laws[] = {Law::Newtonian, Law::PowerLaw, Law::Bingham, Law::HerschelBulkley};
  for (int k = 0; k < 4; ++k) {
    CAPTURE(std::string(law_name(laws[k])));
    for (const TestSetup& setup : {channel_setup(), squeeze_setup()}) {
      fit::FitSeries s = synthetic(setup, materials[k], 5e-4, 3, 0.3, 4.0, 60.0);
      s.sigma = 5e-4;
      const fit::FitProblem problem({s}, laws[k], converged_options());
      check_against_differences(problem, problem.parameters(materials[k], {0.3}), 3e-3);
    }
  }
}
