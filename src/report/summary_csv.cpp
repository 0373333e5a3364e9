#include "src/report/summary_csv.hpp"

#include <fmt/format.h>

#include <cmath>

#include "src/fit/parameter_names.hpp"

namespace spreadfit::report {

namespace {
// RFC 4180 quoting when a cell holds a comma, quote or line break.
std::string cell(const std::string& text) {
  if (text.find_first_of(",\"\n\r") == std::string::npos) return text;
  std::string q = "\"";
  for (char c : text) q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + "\"";
}

// A number cell; empty when not finite (a final-only result has no rmse), so that no "nan" or "inf" reaches a
// spreadsheet as if it were a result.
std::string number(double v) { return std::isfinite(v) ? fmt::format("{}", v) : std::string(); }

// One column triple per material parameter, in the table's order (src/fit/parameter_names.hpp).
const auto& parameter_columns = fit::material_parameters();
}  // namespace

std::string summary_csv(const std::vector<FitOutcome>& outcomes) {
  std::string s = "sample,product,rig,model,status";
  for (const fit::MaterialParameter& c : parameter_columns)
    s += fmt::format(",{0} [{1}],{0} low [{1}],{0} high [{1}]", c.name, c.unit);
  s += ",rmse [mm],points,verdict,warnings\n";
  for (const FitOutcome& o : outcomes) {
    const auto& t = o.tests.front();
    std::string rigs;
    // Appended piece by piece, not "+" + std::string(...): GCC 12 warns falsely (-Wrestrict) on that form.
    for (const auto& d : o.tests) {
      if (!rigs.empty()) rigs += '+';
      rigs += io::rig_kind_name(d.setup.rig);
    }
    const fit::FitResult* r = o.result();
    s += cell(t.sample_id) + "," + cell(t.product) + "," + rigs + "," +
         (r ? std::string(law_name(r->law)) : std::string()) + "," +
         (r ? std::string("ok") : std::string(o.candidates.empty() ? "failed" : fit::fit_status_name(o.candidates.front().status)));
    for (const fit::MaterialParameter& c : parameter_columns) {
      const fit::ParameterEstimate* found = nullptr;
      if (r)
        for (const auto& p : r->parameters)
          if (p.name == c.name) found = &p;
      s += found ? fmt::format(",{},{},{}", number(found->value), number(found->lower), number(found->upper))
                 : std::string(",,,");
    }
    std::string warnings;
    if (r)
      for (const auto& w : r->warnings) warnings += (warnings.empty() ? "" : "; ") + w;
    s += r ? fmt::format(",{},{}", number(r->rmse * 1e3), r->points) : std::string(",,");
    s += fmt::format(",{},{}\n", qc::verdict_status_name(o.verdict.status), cell(warnings));
  }
  return s;
}

}  // namespace spreadfit::report
