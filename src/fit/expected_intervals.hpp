// Planning a test: the expected 95% interval of each parameter for a candidate test (rig, fill, duration,
// reading interval, reading uncertainty), from the Fisher information of the forward model's sensitivities at a
// guessed material: F = J^T J / sigma^2 with J = d reading / d (log parameters, release time), covariance F^-1
// (the Cramer-Rao bound, which the fit's own intervals approach for well-determined parameters).
//
// A guess that is a range (several materials) is planned for its worst case: per parameter the widest expected
// interval over the guesses (a robust, minimax design: the test must serve whichever material the sample is).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

struct DesignEstimate {
  std::vector<std::string> names;      ///< material parameters (log-space in the information matrix)
  std::vector<double> interval_ratio;  ///< expected upper/lower of the 95% interval; infinity if undetermined
  std::vector<double> readings;        ///< the guess's own readings at the planned times [m] (release at 0)
  double late_reading = 0;             ///< its reading a decade later, at 10x the last time [m]
  bool stopped = false;                ///< late_reading is within sigma of the last reading: the sample has
                                       ///< stopped, as far as a reading can tell, by the end of the test
  int solves = 0;
  bool ok = true;
  std::string message;  ///< why a forward solve failed (empty when ok)
};

/// `times` are the reading times after the release [s]; sigma the reading standard uncertainty [m]. The release
/// time is included as a nuisance parameter when fit_time_origin is true.
DesignEstimate expected_intervals(const TestSetup& setup, Law law, const Material& guess,
                                  const std::vector<double>& times, double sigma, bool fit_time_origin = true,
                                  const ForwardOptions& forward = {});

/// An expected interval ratio at or above this leaves the parameter undetermined: six decades between the ends of
/// a 95% interval say nothing about the material (common practice, no source; the fit already calls two decades
/// not identifiable).
inline constexpr double undetermined_ratio = 1e6;

/// A design's score: the mean of ln(interval ratio) over the parameters (the log of their geometric mean, so a
/// design good for every parameter wins); infinity when any parameter is undetermined (undetermined_ratio).
double design_score(const std::vector<double>& interval_ratio);

/// The expected intervals of one candidate test over several guesses of the material.
struct WorstCaseEstimate {
  std::vector<std::string> names;        ///< material parameters, as in DesignEstimate
  std::vector<DesignEstimate> guesses;   ///< one per guess, in the order given
  std::vector<double> worst_ratio;       ///< per parameter, the largest interval ratio over the guesses
  std::vector<std::size_t> worst_guess;  ///< per parameter, the index of the guess that gives it
  int failed = 0;                        ///< guesses whose forward solves failed (worst_ratio is then not set)
  std::size_t first_failure = 0;         ///< index of the first failed guess (when failed > 0)
  int stopped = 0;                       ///< guesses that stop by the end of the test (DesignEstimate::stopped)
  bool ok() const { return failed == 0; }
  /// design_score of worst_ratio; infinity when a guess failed.
  double score() const;
};

/// expected_intervals at every guess (at least one), then the worst case per parameter.
WorstCaseEstimate worst_case_intervals(const TestSetup& setup, Law law, const std::vector<Material>& guesses,
                                       const std::vector<double>& times, double sigma, bool fit_time_origin = true,
                                       const ForwardOptions& forward = {});

}  // namespace spreadfit::fit
