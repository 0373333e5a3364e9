// src/parallel_for.hpp: every index exactly once, safe nesting, exceptions carried to the caller, and results that
// do not depend on the threads (the forward model run in parallel equals the same runs one after another).
#include <doctest/doctest.h>

#include <atomic>
#include <cstddef>
#include <stdexcept>
#include <vector>

#include "models/forward.hpp"
#include "src/parallel_for.hpp"

using namespace spreadfit;

TEST_CASE("parallel_for runs every index exactly once, also for zero and one index") {
  // The defining property of the loop (common practice, no source): a count per index, each must end at 1.
  for (std::size_t count : {std::size_t(0), std::size_t(1), std::size_t(2), std::size_t(1000)}) {
    std::vector<std::atomic<int>> runs(count);
    parallel_for(count, [&](std::size_t i) { runs[i].fetch_add(1); });
    int wrong = 0;
    for (const auto& r : runs) wrong += r.load() != 1;
    INFO("count = " << count);
    CHECK(wrong == 0);
  }
}

TEST_CASE("nested parallel_for completes with every inner index run once") {
  // A job that itself calls parallel_for (a batch of materials, each with parallel Jacobian columns) must neither
  // deadlock nor lose work: 3 levels, each of more jobs than the machine has cores.
  constexpr std::size_t outer = 24, middle = 12, inner = 8;
  std::vector<std::atomic<int>> runs(outer * middle * inner);
  parallel_for(outer, [&](std::size_t i) {
    parallel_for(middle, [&](std::size_t j) {
      parallel_for(inner, [&](std::size_t k) { runs[(i * middle + j) * inner + k].fetch_add(1); });
    });
  });
  int wrong = 0;
  for (const auto& r : runs) wrong += r.load() != 1;
  CHECK(wrong == 0);
}

TEST_CASE("an exception thrown by a job reaches the caller with its type and message") {
  // The caller sees the job's own exception (std::domain_error here), not a generic wrapper.
  bool caught = false;
  try {
    parallel_for(64, [](std::size_t i) {
      if (i == 37) throw std::domain_error("job 37 failed");
    });
  } catch (const std::domain_error& e) {
    caught = true;
    CHECK(std::string(e.what()) == "job 37 failed");
  }
  CHECK(caught);
  // From a nested loop too.
  CHECK_THROWS_AS(parallel_for(8,
                               [](std::size_t i) {
                                 parallel_for(8, [i](std::size_t j) {
                                   if (i == 5 && j == 3) throw std::range_error("inner");
                                 });
                               }),
                  std::range_error);
}

TEST_CASE("forward solves run in parallel equal the same solves run one after another") {
  // The forward model is a pure function of its arguments (its scratch buffers are per thread): the reference is
  // the serial loop itself, compared bit for bit.
  std::vector<Material> materials;
  for (int i = 0; i < 12; ++i) materials.push_back({2.0 * i, 1.0 + 0.5 * i, 0.4 + 0.05 * i});
  TestSetup setup;
  setup.rig = PlateRig{};
  setup.reading = Reading::Radius;
  const std::vector<double> times{1, 5, 20, 60};
  std::vector<std::vector<double>> serial(materials.size()), parallel(materials.size());
  for (std::size_t i = 0; i < materials.size(); ++i) serial[i] = predict_readings(setup, materials[i], times).readings;
  parallel_for(materials.size(),
               [&](std::size_t i) { parallel[i] = predict_readings(setup, materials[i], times).readings; });
  for (std::size_t i = 0; i < materials.size(); ++i) {
    INFO("material " << i);
    REQUIRE(serial[i].size() == times.size());
    CHECK(parallel[i] == serial[i]);
  }
}
