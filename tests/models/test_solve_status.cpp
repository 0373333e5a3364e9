// How the time-stepping solvers of models/ end (models/solve_status.hpp): each status is reached by a solve made to
// hit its bound, and the message names that bound. The reference is each status's definition (common practice, no
// source: Spectra-style status values instead of one failure flag).
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "models/forward.hpp"
#include "models/squeeze_flow.hpp"
#include "models/thin_film.hpp"

using namespace spreadfit;

namespace {

SpreadingProblem newtonian_block() {
  SpreadingProblem p;
  p.geometry = Geometry::Axisymmetric;
  p.initial_extent = 0.03;
  p.initial_height = 0.03;
  p.material = {0.0, 10.0, 1.0};
  return p;
}

const std::vector<double> readings_times{5, 10, 20, 40, 80, 160, 320, 640};

// A valid material whose film flux overflows a double: (G/K)^(1/n) with K = 1e-300 Pa s^n and n = 0.1.
const Material overflowing{0.0, 1e-300, 0.1};

bool names(const std::string& message, const std::string& part) { return message.find(part) != std::string::npos; }

}  // namespace

TEST_CASE("thin film: max_steps bounds the steps of the whole solve, not the steps between two readings") {
  const SpreadingSolution free = solve_spreading(newtonian_block(), readings_times);
  REQUIRE(free.ok());
  REQUIRE(free.steps > readings_times.size());
  INFO("steps of the unbounded solve: " << free.steps);
  SpreadingOptions exact;
  exact.max_steps = free.steps;  // exactly enough: the same solve
  const SpreadingSolution enough = solve_spreading(newtonian_block(), readings_times, exact);
  CHECK(enough.status == SolveStatus::Ok);
  CHECK(enough.fronts == free.fronts);
  SpreadingOptions one_short;
  one_short.max_steps = free.steps - 1;  // more than any single interval between readings needs, one short in total
  const SpreadingSolution stopped = solve_spreading(newtonian_block(), readings_times, one_short);
  CHECK(stopped.status == SolveStatus::StepLimit);
  CHECK(stopped.steps == one_short.max_steps);
  CHECK(names(stopped.message, "max_steps = " + std::to_string(one_short.max_steps)));
  CHECK(solve_status_name(stopped.status) == "step limit");
}

TEST_CASE("thin film: the Ros2 stepper reports its step bound as a step limit too") {
  SpreadingOptions few;
  few.stepper = TimeStepper::Ros2;
  few.max_steps = 5;
  const SpreadingSolution s = solve_spreading(newtonian_block(), readings_times, few);
  CHECK(s.status == SolveStatus::StepLimit);
  CHECK(names(s.message, "max_steps = 5"));
}

TEST_CASE("thin film: a tolerance no step can meet is a step-size underflow, not a step limit") {
  // RODAS (the default stepper) rejects every try and gives up after its bound on rejections in a row. The kept
  // Ros2 stepper instead accepts ever smaller steps and ends at its step bound (a step limit), checked above.
  SpreadingOptions impossible;
  impossible.rel_tol = 1e-300;
  impossible.abs_tol = 1e-300;
  const SpreadingSolution s = solve_spreading(newtonian_block(), readings_times, impossible);
  INFO(s.message);
  CHECK(s.status == SolveStatus::StepSizeUnderflow);
  CHECK(names(s.message, "60 rejected steps in a row"));
  CHECK(solve_status_name(s.status) == "step size underflow");
}

TEST_CASE("thin film: a flux that overflows is a non-finite state, not a step limit") {
  SpreadingProblem p = newtonian_block();
  p.material = overflowing;
  const SpreadingSolution s = solve_spreading(p, readings_times);
  INFO(s.message);
  CHECK(s.status == SolveStatus::NonFiniteState);
  CHECK(names(s.message, "not finite"));
  CHECK(solve_status_name(s.status) == "non-finite state");
}

TEST_CASE("squeeze: the step bound, a non-finite rate and an impossible tolerance each get their own status") {
  const SqueezeRig rig{2e-6, 5.0, 3e-3};
  const std::vector<double> times{4, 8, 16, 32, 64, 120};
  SqueezeOptions few;
  few.max_steps = 3;
  const SqueezeSolution limited = solve_squeeze(rig, Material{20.0, 150.0, 0.45}, times, few);
  CHECK(limited.status == SolveStatus::StepLimit);
  CHECK(names(limited.message, "max_steps = 3"));
  const SqueezeSolution overflow = solve_squeeze(rig, overflowing, times);
  INFO(overflow.message);
  CHECK(overflow.status == SolveStatus::NonFiniteState);
  CHECK(overflow.gaps.empty());
}

TEST_CASE("predict_readings passes the solver's status through unchanged") {
  TestSetup channel;
  channel.rig = ChannelRig{};
  channel.reading = Reading::Front;
  ForwardOptions few;
  few.max_steps = 4;
  const ForwardResult limited = predict_readings(channel, {5.0, 2.0, 0.5}, readings_times, few);
  CHECK(limited.status == SolveStatus::StepLimit);
  CHECK(limited.readings.empty());
  TestSetup squeeze;
  squeeze.rig = SqueezeRig{2e-6, 5.0, 3e-3};
  squeeze.reading = Reading::Gap;
  const ForwardResult overflow = predict_readings(squeeze, overflowing, readings_times);
  CHECK(overflow.status == SolveStatus::NonFiniteState);
  CHECK_FALSE(overflow.ok());
}
