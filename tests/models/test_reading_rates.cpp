// The readings' rates (ForwardOptions::rates) and the consistency's time scaling (models/forward.hpp), which give a
// fit two Jacobian columns without solving again. Defining properties, on solutions converged in cells and time
// tolerance (so that the discretisation, which the property does not hold for, is far below the tolerances):
// - a rate is the derivative of the reading in time (central differences of the readings);
// - d R / d ln K = -(t / n) dR/dt, because the Herschel-Bulkley shear rate ((tau - tau_y) / K)^(1/n) (Herschel &
//   Bulkley 1926; the film flux of Liu & Mei 1989 and the squeeze rate inherit it) scales every velocity by
//   K^(-1/n) at the same state (central differences in ln K);
// - in a Newtonian channel at late times the front follows Huppert's similarity law x ~ t^(1/5) (Huppert 1982,
//   J. Fluid Mech. 121), so t (dx/dt) / x tends to 1/5 from the rates.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "models/forward.hpp"
#include "tests/fit/fit_test_support.hpp"

using namespace spreadfit;

namespace {

// The rigs of the fit tests (tests/fit/fit_test_support.hpp), the squeeze read as `reading`.
TestSetup squeeze(Reading reading) {
  TestSetup s = testing::squeeze_setup();
  s.reading = reading;
  return s;
}

ForwardOptions converged() {
  ForwardOptions o;
  o.cells = 160;
  o.rel_tol = 1e-7;
  o.rates = true;
  return o;
}

std::vector<double> reading_times() {
  std::vector<double> t;
  for (int i = 1; i <= 12; ++i) t.push_back(5.0 * i);
  return t;
}

double largest(const std::vector<double>& v) {
  double m = 0;
  for (double x : v) m = std::max(m, std::abs(x));
  return m;
}

struct Case {
  std::string name;
  TestSetup setup;
  Material material;
};

std::vector<Case> cases() {
  std::vector<Case> out;
  const Material materials[] = {{20, 10, 0.4}, {0, 5, 0.7}, {0, 30, 1.0}, {8, 4, 1.0}, {60, 3, 0.3}};
  for (const Material& m : materials) {
    const std::string law = std::to_string(m.yield_stress) + " Pa, K " + std::to_string(m.consistency) + ", n " +
                            std::to_string(m.flow_index);
    out.push_back({"channel, " + law, testing::channel_setup(), m});
    out.push_back({"plate, " + law, testing::plate_setup(), m});
    out.push_back({"squeeze gap, " + law, squeeze(Reading::Gap), m});
    out.push_back({"squeeze diameter, " + law, squeeze(Reading::Diameter), m});
  }
  return out;
}

}  // namespace

TEST_CASE("reading rates are the readings' time derivatives (channel, plate, squeeze, converged solutions)") {
  const std::vector<double> times = reading_times();
  for (const Case& c : cases()) {
    CAPTURE(c.name);
    const ForwardResult r = predict_readings(c.setup, c.material, times, converged());
    REQUIRE(r.ok());
    REQUIRE(r.rates.size() == times.size());
    std::vector<double> later = times, earlier = times;
    const double dt = 1e-2;
    for (double& t : later) t += dt;
    for (double& t : earlier) t -= dt;
    const ForwardResult a = predict_readings(c.setup, c.material, later, converged());
    const ForwardResult b = predict_readings(c.setup, c.material, earlier, converged());
    REQUIRE(a.ok());
    REQUIRE(b.ok());
    double worst = 0;
    for (std::size_t i = 0; i < times.size(); ++i)
      worst = std::max(worst, std::abs((a.readings[i] - b.readings[i]) / (2 * dt) - r.rates[i]));
    MESSAGE(c.name, ": largest rate ", largest(r.rates), " m/s, worst difference ", worst);
    CHECK(worst <= 2e-3 * largest(r.rates));
  }
}

TEST_CASE("the consistency is a time scale: dR/dlnK = -(t/n) dR/dt (channel, plate, squeeze, converged solutions)") {
  const std::vector<double> times = reading_times();
  for (const Case& c : cases()) {
    CAPTURE(c.name);
    const ForwardResult r = predict_readings(c.setup, c.material, times, converged());
    REQUIRE(r.ok());
    const double h = 1e-3;
    Material up = c.material, down = c.material;
    up.consistency *= std::exp(h);
    down.consistency *= std::exp(-h);
    const ForwardResult a = predict_readings(c.setup, up, times, converged());
    const ForwardResult b = predict_readings(c.setup, down, times, converged());
    REQUIRE(a.ok());
    REQUIRE(b.ok());
    std::vector<double> scaling;
    double worst = 0;
    for (std::size_t i = 0; i < times.size(); ++i) {
      const double differenced = (a.readings[i] - b.readings[i]) / (2 * h);
      scaling.push_back(reading_derivative_log_consistency(times[i], r.rates[i], c.material.flow_index));
      worst = std::max(worst, std::abs(differenced - scaling.back()));
    }
    MESSAGE(c.name, ": largest dR/dlnK ", largest(scaling), " m, worst difference ", worst);
    CHECK(largest(scaling) > 0);
    CHECK(worst <= 2e-3 * largest(scaling));
  }
}

TEST_CASE("a Newtonian channel's late front rate gives Huppert's similarity exponent 1/5") {
  // A long run of a runny sample: by 2000 s the released block has long forgotten its shape (Huppert 1982: the
  // front of a constant-volume planar current x_N ~ (rho g A^3 t / 3 mu)^(1/5)); t (dx/dt) / x from the rates
  // approaches 1/5 (measured from the back wall, where the similarity solution's origin is). Side walls off: the
  // similarity law is for a planar current.
  TestSetup s = testing::channel_setup();
  std::get<ChannelRig>(s.rig).side_wall_drag = false;
  const ForwardOptions o = converged();
  const ForwardResult r = predict_readings(s, Material{0, 1.0, 1.0}, {500.0, 2000.0}, o);
  REQUIRE(r.ok());
  const double wall_to_front = r.readings[1] + std::get<ChannelRig>(s.rig).reservoir_length;
  const double exponent = 2000.0 * r.rates[1] / wall_to_front;
  MESSAGE("t (dx/dt) / x at 2000 s: ", exponent, " (at 500 s: ",
          500.0 * r.rates[0] / (r.readings[0] + std::get<ChannelRig>(s.rig).reservoir_length), ")");
  CHECK(exponent == doctest::Approx(0.2).epsilon(0.02));
}

TEST_CASE("a slump does not evolve: its rates are zero, and without the option there are no rates") {
  TestSetup s;
  s.rig = SlumpRig{};
  s.density = 1000;
  s.reading = Reading::Slump;
  ForwardOptions o;
  o.rates = true;
  const ForwardResult r = predict_readings(s, Material{50, 5, 0.5}, {10.0, 20.0}, o);
  REQUIRE(r.ok());
  CHECK(r.rates == std::vector<double>{0.0, 0.0});
  CHECK(predict_readings(testing::channel_setup(), Material{20, 10, 0.4}, {10.0, 20.0}).rates.empty());
}
