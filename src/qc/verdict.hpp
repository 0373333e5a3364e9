// Checking fitted parameters against a product's limits (inclusive). A result whose 95% interval straddles a
// limit is still judged by its point value but flagged "marginal": the bench test cannot tell on which side the
// material truly lies.
#pragma once

#include <string>
#include <vector>

#include "src/fit/fit_types.hpp"
#include "src/io/description_file.hpp"

namespace spreadfit::qc {

struct SpecCheck {
  std::string parameter;
  double low = 0, high = 0;
  double value = 0;
  bool available = true;  ///< the fitted law has this parameter and the fit converged
  bool pass = false;
  bool marginal = false;
  std::vector<std::string> findings;  ///< parameter "fit_quality": the fit-quality findings that failed it
};

struct Verdict {
  enum class Status { Pass, Fail, None } status = Status::None;
  std::vector<SpecCheck> checks;
};

std::string_view verdict_status_name(Verdict::Status s);

/// None when there are no limits; Fail when any limit is violated or cannot be checked (a limit on a parameter
/// the result does not have, or a failed fit, counts as failed: a line must not release on a missing number), and
/// when the fit's quality is in doubt (an outlier, scatter above the resolution, a systematic misfit: the check
/// "fit_quality" fails).
Verdict judge(const fit::FitResult& result, const std::vector<io::SpecLimit>& limits);

}  // namespace spreadfit::qc
