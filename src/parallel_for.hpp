// Independent forward solves spread over the machine's cores: the forward model is a pure function of its
// arguments, so bands, maps and grids run it from several threads, each writing only its own results.
#pragma once

#include <algorithm>
#include <cstddef>
#include <future>
#include <thread>
#include <vector>

namespace spreadfit {

/// Runs job(i) for every i in [0, count), each exactly once, on up to 8 threads (interleaved indices, so costly
/// and cheap jobs mix); returns when all are done. An exception from a job is rethrown here.
template <class Job>
void parallel_for(std::size_t count, const Job& job) {
  const std::size_t threads = std::clamp<std::size_t>(std::thread::hardware_concurrency(), 1, 8);
  if (threads == 1 || count < 2) {
    for (std::size_t i = 0; i < count; ++i) job(i);
    return;
  }
  std::vector<std::future<void>> workers;
  for (std::size_t w = 0; w < std::min(threads, count); ++w)
    workers.push_back(std::async(std::launch::async, [&, w] {
      for (std::size_t i = w; i < count; i += threads) job(i);
    }));
  for (auto& f : workers) f.get();
}

}  // namespace spreadfit
