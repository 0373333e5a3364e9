// Independent forward solves spread over the machine's cores: the forward model is a pure function of its
// arguments, so bands, maps, grids, Jacobian columns and the materials of a batch run it from several threads,
// each writing only its own results.
//
// The pool is oneTBB's (Debian libtbb-dev): one process-wide set of worker threads that steal work, so a job may
// itself call parallel_for (a batch of materials, each fitting with parallel Jacobian columns) without starting
// threads per call, oversubscribing the cores or deadlocking on a full pool: a thread that waits for a nested
// loop runs that loop's tasks (or others) meanwhile.
#pragma once

#include <cstddef>

#include <tbb/blocked_range.h>
#include <tbb/parallel_for.h>
#include <tbb/partitioner.h>

namespace spreadfit {

/// Runs job(i) for every i in [0, count), each exactly once, on the shared pool (one task per index, so costly
/// and cheap jobs balance by stealing); returns when all are done. An exception from a job is rethrown here
/// (the first one thrown; the remaining jobs are cancelled). Safe to nest.
template <class Job>
void parallel_for(std::size_t count, const Job& job) {
  if (count < 2) {
    for (std::size_t i = 0; i < count; ++i) job(i);
    return;
  }
  tbb::parallel_for(
      tbb::blocked_range<std::size_t>(0, count, 1),
      [&job](const tbb::blocked_range<std::size_t>& range) {
        for (std::size_t i = range.begin(); i != range.end(); ++i) job(i);
      },
      tbb::simple_partitioner());
}

}  // namespace spreadfit
