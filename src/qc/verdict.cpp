#include "src/qc/verdict.hpp"

namespace spreadfit::qc {

std::string_view verdict_status_name(Verdict::Status s) {
  switch (s) {
    case Verdict::Status::Pass: return "pass";
    case Verdict::Status::Fail: return "fail";
    case Verdict::Status::None: return "none";
  }
  return "none";
}

Verdict judge(const fit::FitResult& result, const std::vector<io::SpecLimit>& limits) {
  Verdict v;
  // Without limits there is nothing to pass, but a fit with a quality finding still fails below: an unattended
  // run must not go on as if the numbers described the readings.
  const bool findings = result.converged() && !result.quality.empty();
  if (limits.empty() && !findings) return v;
  v.status = Verdict::Status::Pass;
  for (const io::SpecLimit& limit : limits) {
    SpecCheck c;
    c.parameter = limit.parameter;
    c.low = limit.low;
    c.high = limit.high;
    const fit::ParameterEstimate* found = nullptr;
    // A spec on "viscosity" applies to a law's consistency when n = 1 and vice versa is not meaningful; match names.
    for (const fit::ParameterEstimate& p : result.parameters)
      if (p.name == limit.parameter) found = &p;
    if (!result.converged() || found == nullptr) {
      c.available = false;
      c.pass = false;
    } else {
      c.value = found->value;
      c.pass = found->value >= limit.low && found->value <= limit.high;
      c.marginal = (found->lower < limit.low && found->upper >= limit.low) ||
                   (found->lower <= limit.high && found->upper > limit.high);
    }
    if (!c.pass) v.status = Verdict::Status::Fail;
    v.checks.push_back(c);
  }
  // A fit that does not describe its readings (src/fit/fit_quality.hpp) never passes: its numbers may be right,
  // but a person has to look first.
  if (findings) {
    SpecCheck c;
    c.parameter = "fit_quality";
    c.available = false;
    c.pass = false;
    for (fit::FitQuality q : result.quality) c.findings.push_back(std::string(fit_quality_name(q)));
    v.checks.push_back(c);
    v.status = Verdict::Status::Fail;
  }
  return v;
}

}  // namespace spreadfit::qc
