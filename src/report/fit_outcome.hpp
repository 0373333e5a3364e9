// Everything reported for one material: the tests it came from, the candidate fits, the chosen result and the
// verdict. Built by the fit command, read by the table, JSON and history writers.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "src/fit/fit_law.hpp"
#include "src/io/description_file.hpp"
#include "src/qc/verdict.hpp"

namespace spreadfit::report {

struct FitOutcome {
  std::vector<io::TestDescription> tests;  ///< one or more tests of the same sample id (joint fit)
  std::vector<fit::FitResult> candidates;       ///< every law tried (one when a law was named)
  int chosen = -1;                         ///< index into candidates; -1 when none converged
  int best_description = -1;               ///< the law AICc prefers (index into candidates); -1 when one was named
  std::vector<double> weights;             ///< Akaike weights of the candidates (empty when one law was named)
  std::string choice_explanation;
  qc::Verdict verdict;                         ///< judged at the reference temperature when one applies
  std::optional<double> reference_temperature;        ///< [K], when the product sets one and the test gives its own
  std::vector<fit::ParameterEstimate> reference_parameters; ///< the result's parameters shifted there (Arrhenius)
  const fit::FitResult* result() const { return chosen >= 0 ? &candidates[std::size_t(chosen)] : nullptr; }
};

/// The caution printed with every result that may feed a release decision.
inline constexpr const char* bench_caution =
    "Estimates from a bench test: confirm against a calibrated rheometer and follow the plant's QA procedures "
    "and local rules before releasing a batch.";

}  // namespace spreadfit::report
