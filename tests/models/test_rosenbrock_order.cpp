// The RODAS stepper (models/tridiagonal_rodas.hpp) and the thin-film system's analytic Jacobian.
#include <doctest/doctest.h>

#include <cmath>
#include <vector>

#include "models/thin_film.hpp"
#include "models/tridiagonal_rodas.hpp"

using namespace spreadfit;

namespace {
// y_i' = -y_i^2 + (y_{i-1} - 2 y_i + y_{i+1}) c with c = 0 is decoupled, y = y0/(1 + y0 t); the linear part
// alone (c > 0, fixed ends y = 0) is the semi-discrete heat equation, exact solution exp(lambda_k t) sin(k pi j/(N+1))
// with lambda_k = -4 c sin^2(k pi / (2(N+1))) (standard eigenpairs of the second-difference matrix).
struct TestSystem {
  double c = 0.0;     // coupling (linear part)
  bool square = true;  // the -y^2 term
  void operator()(const Eigen::VectorXd& y, Eigen::VectorXd& f, double) const {
    const Eigen::Index n = y.size();
    f.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
      const double l = i > 0 ? y[i - 1] : 0.0, r = i + 1 < n ? y[i + 1] : 0.0;
      f[i] = (square ? -y[i] * y[i] : 0.0) + c * (l - 2 * y[i] + r);
    }
  }
  void tridiagonal_jacobian(const Eigen::VectorXd& y, double t, Eigen::VectorXd& f, Eigen::VectorXd& lo,
                            Eigen::VectorXd& d, Eigen::VectorXd& up) const {
    (*this)(y, f, t);
    const Eigen::Index n = y.size();
    lo.setConstant(n, c);
    up.setConstant(n, c);
    d.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) d[i] = (square ? -2 * y[i] : 0.0) - 2 * c;
  }
};

double error_at_one(const TestSystem& sys, const Eigen::VectorXd& y0, const Eigen::VectorXd& exact, int steps) {
  TridiagonalRodas method;
  Eigen::VectorXd y = y0, y_new, err;
  const double dt = 1.0 / steps;
  for (int k = 0; k < steps; ++k) {
    REQUIRE(method.do_step(sys, y, k * dt, dt, y_new, err));
    y = y_new;
  }
  return (y - exact).cwiseAbs().maxCoeff();
}
}  // namespace

TEST_CASE("the RODAS stepper converges at fourth order as the step halves") {
  // As Boost.Odeint's own stepper tests do: the error at t = 1 against the exact solution falls by 2^order per
  // halving (observed order within 0.35 of 4 over three halvings).
  SUBCASE("nonlinear, decoupled: y' = -y^2") {
    TestSystem sys;
    Eigen::VectorXd y0(5), exact(5);
    for (int i = 0; i < 5; ++i) {
      y0[i] = 0.5 + i;
      exact[i] = y0[i] / (1.0 + y0[i]);
    }
    double previous = error_at_one(sys, y0, exact, 8);
    for (int steps : {16, 32, 64}) {
      const double e = error_at_one(sys, y0, exact, steps);
      INFO(steps << " steps: error " << e << ", observed order " << std::log2(previous / e));
      CHECK(std::log2(previous / e) == doctest::Approx(4.0).epsilon(0.35 / 4));
      previous = e;
    }
  }
  SUBCASE("linear, coupled through the off-diagonals: semi-discrete heat equation") {
    TestSystem sys{2.0, false};
    const int n = 9, k = 2;
    const double pi = 3.14159265358979323846;
    const double lambda = -4.0 * sys.c * std::pow(std::sin(k * pi / (2.0 * (n + 1))), 2);
    Eigen::VectorXd y0(n), exact(n);
    for (int j = 0; j < n; ++j) {
      y0[j] = std::sin(k * pi * (j + 1) / (n + 1));
      exact[j] = std::exp(lambda) * y0[j];
    }
    double previous = error_at_one(sys, y0, exact, 4);
    for (int steps : {8, 16, 32}) {
      const double e = error_at_one(sys, y0, exact, steps);
      INFO(steps << " steps: error " << e << ", observed order " << std::log2(previous / e));
      CHECK(std::log2(previous / e) == doctest::Approx(4.0).epsilon(0.35 / 4));
      previous = e;
    }
  }
}

TEST_CASE("the thin-film system's analytic Jacobian matches central differences") {
  // Central differences of the right-hand side itself (step 1e-7 of the scaled nodes), on a spread, non-uniform
  // state where every node moves; within 1e-5 of the largest entry of each row.
  const Material materials[] = {{0.0, 5.0, 1.0}, {0.0, 10.0, 0.4}, {20.0, 10.0, 0.4}, {30.0, 2.0, 1.0}};
  for (Geometry g : {Geometry::Planar, Geometry::Axisymmetric}) {
    for (const Material& m : materials) {
      SpreadingProblem p;
      p.geometry = g;
      p.initial_extent = 0.05;
      p.initial_height = 0.04;
      p.rho_g = 1100 * standard_gravity;
      p.material = m;
      p.channel_width = g == Geometry::Planar ? 0.05 : 0.0;
      const SpreadingSolution s = solve_spreading(p, {5.0}, {});
      REQUIRE(s.ok());
      const Eigen::VectorXd x = s.final_nodes / p.initial_extent;
      Eigen::VectorXd f, lo, d, up;
      SpreadingOptions o;
      const SpreadingSystem big(p, o.cells, o.grading);
      big.tridiagonal_jacobian(x, 0.0, f, lo, d, up);
      const Eigen::Index n = x.size();
      for (Eigen::Index j = 0; j < n; ++j) {
        Eigen::VectorXd xp = x, xm = x, fp, fm;
        const double e = 1e-7;
        xp[j] += e;
        xm[j] -= e;
        big(xp, fp, 0.0);
        big(xm, fm, 0.0);
        const Eigen::VectorXd col = (fp - fm) / (2 * e);
        for (Eigen::Index i = std::max<Eigen::Index>(j - 1, 0); i <= std::min(j + 1, n - 1); ++i) {
          const double analytic = i == j ? d[i] : (i == j - 1 ? up[i] : lo[i]);
          const double scale = std::max({std::abs(d[i]), std::abs(lo[i]), std::abs(up[i]), 1e-12});
          INFO("geometry " << int(g) << ", tau_y " << m.yield_stress << ", n " << m.flow_index << ", row " << i
                           << ", column " << j << ": analytic " << analytic << ", differences " << col[i]);
          CHECK(std::abs(analytic - col[i]) <= 1e-5 * scale);
        }
      }
    }
  }
}
