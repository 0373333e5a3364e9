#include "src/report/summary_table.hpp"

#include <cmath>
#include <fmt/format.h>

#include "src/report/interval_text.hpp"

namespace spreadfit {

std::string summary_table(const FitOutcome& o) {
  std::string s;
  const io::TestDescription& first = o.tests.front();
  s += fmt::format("Sample {}", first.sample_id);
  if (!first.product.empty()) s += fmt::format(" (product {})", first.product);
  std::string rigs;
  int points = 0;
  for (const auto& t : o.tests) {
    if (!rigs.empty()) rigs += " + ";
    rigs += std::string(io::rig_kind_name(t.setup.rig));
    for (const auto& series : t.series) points += int(series.times.size());
    if (t.final_reading) ++points;
  }
  s += fmt::format(": {} test{} on {}, {} reading{}\n", o.tests.size(), o.tests.size() > 1 ? "s" : "", rigs, points,
                   points == 1 ? "" : "s");
  const FitResult* r = o.result();
  if (!r) {
    s += "  NO RESULT: the fit failed; no parameters are reported.\n";
    for (const auto& c : o.candidates)
      s += fmt::format("    {:<17} {}{}\n", law_name(c.law), fit_status_name(c.status),
                       c.reason.empty() ? "" : ": " + c.reason);
  } else {
    s += fmt::format("  model {}", law_name(r->law));
    if (!o.choice_explanation.empty()) s += fmt::format(" ({})", o.choice_explanation);
    s += "\n";
    s += fmt::format("  {:<14} {:>11}   {:<27} {}\n", "parameter", "value", "95% interval", "unit");
    for (const auto& p : r->parameters) {
      const std::string interval = interval_text(p);
      s += fmt::format("  {:<14} {:>11.4g}   {:<27} {}\n", p.name, p.value, interval, p.unit);
    }
    if (std::isfinite(r->rmse))
    {
      int solves = 0;  // every candidate's (the reported fit's include its own quick fit)
      for (const auto& c : o.candidates) solves += c.evaluations;
      s += fmt::format("  fit: rmse {:.3g} mm over {} points, {} forward solves", r->rmse * 1e3, r->points, solves);
    }
    else
      s += "  fit: closed form from the single arrested reading";
    if (std::isfinite(r->aicc) && o.candidates.size() > 1) {
      s += "; AICc";
      for (const auto& c : o.candidates)
        s += c.converged() ? fmt::format(" {} {:.1f}", law_name(c.law), c.aicc)
                           : fmt::format(" {} ({})", law_name(c.law), fit_status_name(c.status));
    }
    s += "\n";
    for (const auto& w : r->warnings) s += fmt::format("  warning: {}\n", w);
  }
  if (o.reference_temperature) {
    s += fmt::format("  at the product's reference temperature {:.1f} degC (Arrhenius; the verdict uses these):\n",
                     *o.reference_temperature - 273.15);
    for (const auto& p : o.reference_parameters)
      s += fmt::format("  {:<14} {:>11.4g}   {:<27} {}\n", p.name, p.value,
                       interval_text(p), p.unit);
  }
  if (o.verdict.status != Verdict::Status::None) {
    s += fmt::format("  verdict: {}\n", o.verdict.status == Verdict::Status::Pass ? "PASS" : "FAIL");
    for (const auto& c : o.verdict.checks) {
      if (c.parameter == "fit_quality") {
        std::string findings;
        for (const auto& f : c.findings) findings += (findings.empty() ? "" : ", ") + f;
        s += fmt::format("    {:<14} {}: FAIL (see the warnings: the fit does not describe the readings)\n",
                         c.parameter, findings);
        continue;
      }
      const std::string value = c.available ? fmt::format("{:.4g}", c.value) : std::string("not available");
      s += fmt::format("    {:<14} {:>13} in [{:.4g}, {:.4g}]: {}{}\n", c.parameter, value, c.low, c.high,
                       c.pass ? "pass" : "FAIL", c.marginal ? " (marginal: the 95% interval crosses a limit)" : "");
    }
  } else {
    s += "  verdict: none (no spec given)\n";
  }
  s += fmt::format("  {}\n", bench_caution);
  return s;
}

}  // namespace spreadfit
