#include "src/report/summary_table.hpp"
#include "src/fit/parameter_names.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include "src/report/interval_text.hpp"

namespace spreadfit::report {

namespace {

// Characters shown on a terminal for UTF-8 text (lead bytes only), so that padding lines up.
std::size_t shown_width(const std::string& text) {
  return std::size_t(
      std::count_if(text.begin(), text.end(), [](char c) { return (static_cast<unsigned char>(c) & 0xC0) != 0x80; }));
}

std::string padded(const std::string& text, std::size_t width, bool right) {
  const std::size_t w = shown_width(text);
  const std::string fill(width > w ? width - w : 0, ' ');
  return right ? fill + text : text + fill;
}

std::vector<std::string> row_of(const std::string& name, const fit::ParameterEstimate& p) {
  return {name, fmt::format("{:.4g}", p.value), interval_text(p), p.unit};
}

const std::vector<std::string> header_row = {"parameter", "value", "95% interval", "unit"};
// The narrowest each column is (the table's long-standing layout for the usual parameters) and the gap before
// each column.
constexpr std::size_t min_width[] = {14, 11, 27, 0};
constexpr const char* gap_before[] = {"", " ", "   ", " "};

}  // namespace

std::string parameter_rows(const std::vector<std::vector<std::string>>& rows, std::size_t indent) {
  std::vector<std::size_t> width(header_row.size(), 0);
  for (std::size_t k = 0; k < header_row.size(); ++k) width[k] = std::max(min_width[k], shown_width(header_row[k]));
  for (const auto& row : rows)
    for (std::size_t k = 0; k < row.size() && k < width.size(); ++k) width[k] = std::max(width[k], shown_width(row[k]));
  std::string s;
  const auto line = [&](const std::vector<std::string>& cells) {
    std::string l(indent, ' ');
    for (std::size_t k = 0; k < cells.size() && k < width.size(); ++k) {
      l += gap_before[k];
      l += k + 1 == width.size() ? cells[k] : padded(cells[k], width[k], k == 1);
    }
    while (!l.empty() && l.back() == ' ') l.pop_back();
    s += l + "\n";
  };
  line(header_row);
  for (const auto& row : rows) line(row);
  return s;
}

std::vector<std::string> time_origin_labels(const FitOutcome& o) {
  std::vector<std::string> files;
  for (const auto& t : o.tests)
    for (const auto& series : t.series) {
      const std::string name = std::filesystem::path(series.source).filename().string();
      files.push_back(name.empty() ? series.source : name);
    }
  const fit::FitResult* r = o.result();
  const std::size_t origins =
      r ? std::size_t(std::count_if(r->parameters.begin(), r->parameters.end(),
                                    [](const fit::ParameterEstimate& p) { return fit::is_parameter(p.name, fit::Parameter::TimeOrigin); }))
        : 0;
  const std::string_view time_origin = fit::parameter_name(fit::Parameter::TimeOrigin);
  std::vector<std::string> labels;
  for (std::size_t k = 0; k < origins; ++k)
    labels.push_back(origins > 1 && k < files.size() ? fmt::format("{} ({})", time_origin, files[k])
                                                     : std::string(time_origin));
  return labels;
}

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
  const fit::FitResult* r = o.result();
  if (!r) {
    s += "  NO RESULT: the fit failed; no parameters are reported.\n";
    for (const auto& c : o.candidates)
      s += fmt::format("    {:<17} {}{}\n", law_name(c.law), fit::fit_status_name(c.status),
                       c.reason.empty() ? "" : ": " + c.reason);
  } else {
    s += fmt::format("  model {}", law_name(r->law));
    if (!o.choice_explanation.empty()) s += fmt::format(" ({})", o.choice_explanation);
    s += "\n";
    const std::vector<std::string> origin_labels = time_origin_labels(o);
    std::size_t origin = 0;
    std::vector<std::vector<std::string>> rows;
    for (const auto& p : r->parameters) {
      std::string name = p.name;
      if (fit::is_parameter(p.name, fit::Parameter::TimeOrigin) && origin < origin_labels.size()) name = origin_labels[origin++];
      rows.push_back(row_of(name, p));
    }
    s += parameter_rows(rows);
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
                           : fmt::format(" {} ({})", law_name(c.law), fit::fit_status_name(c.status));
    }
    s += "\n";
    for (const auto& w : r->warnings) s += fmt::format("  warning: {}\n", w);
  }
  if (o.reference_temperature) {
    s += fmt::format("  at the product's reference temperature {:.1f} degC (Arrhenius; the verdict uses these):\n",
                     *o.reference_temperature - 273.15);
    std::vector<std::vector<std::string>> rows;
    for (const auto& p : o.reference_parameters) rows.push_back(row_of(p.name, p));
    s += parameter_rows(rows);
  }
  if (o.verdict.status != qc::Verdict::Status::None) {
    s += fmt::format("  verdict: {}\n", o.verdict.status == qc::Verdict::Status::Pass ? "PASS" : "FAIL");
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

}  // namespace spreadfit::report
