#include "src/cli/history_command.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <iterator>
#include <optional>
#include <vector>

#include <nlohmann/json.hpp>

#include "src/cli/exit_codes.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/qc/control_chart.hpp"
#include "src/report/control_chart_svg.hpp"

namespace spreadfit::cli {

namespace {

using history::StoredResult;
using Parameter = std::tuple<std::string, double, double, double, std::string>;

/// Parameters in the order reports list them; others follow in the order first recorded.
constexpr const char* kParameterOrder[] = {"yield_stress", "viscosity", "consistency", "flow_index"};

/// The parameter --chart draws when it has at least two values.
constexpr const char* kChartParameter = "yield_stress";

/// How a product without a code is shown.
constexpr const char* kNoProduct = "(none)";

struct Column {
  std::string name, unit;
};

/// The parameters that occur in `rows`: the usual four first (those present), then others as first recorded.
std::vector<Column> parameter_columns(const std::vector<const StoredResult*>& rows) {
  std::vector<Column> seen;
  for (const StoredResult* r : rows)
    for (const auto& p : r->parameters) {
      const std::string& name = std::get<0>(p);
      if (std::none_of(seen.begin(), seen.end(), [&](const Column& c) { return c.name == name; }))
        seen.push_back({name, std::get<4>(p)});
    }
  std::vector<Column> ordered;
  for (const char* name : kParameterOrder)
    for (const Column& c : seen)
      if (c.name == name) ordered.push_back(c);
  for (const Column& c : seen)
    if (std::none_of(std::begin(kParameterOrder), std::end(kParameterOrder),
                     [&](const char* name) { return c.name == name; }))
      ordered.push_back(c);
  return ordered;
}

const Parameter* find_parameter(const StoredResult& r, const std::string& name) {
  for (const auto& p : r.parameters)
    if (std::get<0>(p) == name) return &p;
  return nullptr;
}

/// Product codes in report order: sorted, results without a product last.
std::vector<std::string> product_order(const std::vector<StoredResult>& rows) {
  std::vector<std::string> codes;
  for (const auto& r : rows)
    if (std::find(codes.begin(), codes.end(), r.product) == codes.end()) codes.push_back(r.product);
  std::sort(codes.begin(), codes.end(), [](const std::string& a, const std::string& b) {
    if (a.empty() != b.empty()) return b.empty();
    return a < b;
  });
  return codes;
}

std::vector<const StoredResult*> of_product(const std::vector<StoredResult>& rows, const std::string& product) {
  std::vector<const StoredResult*> out;
  for (const auto& r : rows)
    if (r.product == product) out.push_back(&r);
  return out;
}

std::string product_label(const std::string& product) { return product.empty() ? kNoProduct : product; }

/// Why a result's value of `name` cannot be charted, or empty when it can: the fit failed, its law has no such
/// parameter, the value is not a number, or the readings left it undetermined (result JSON "identifiable").
std::string not_chartable(const StoredResult& r, const std::string& name) {
  if (r.law.empty()) return "the fit failed";
  const Parameter* p = find_parameter(r, name);
  if (!p) return fmt::format("{} gives no {}", r.law, name);
  if (!std::isfinite(std::get<1>(*p))) return "no value";
  const nlohmann::json j = nlohmann::json::parse(r.result_json, nullptr, false);
  if (!j.is_discarded() && j.contains("parameters") && j["parameters"].contains(name) &&
      j["parameters"][name].value("identifiable", true) == false)
    return "undetermined by its readings";
  return {};
}

/// The spec limits of `name` in the latest result that was judged on it (result JSON verdict checks).
void spec_limits(const std::vector<const StoredResult*>& rows, const std::string& name, ControlChart& chart) {
  for (auto it = rows.rbegin(); it != rows.rend(); ++it) {
    const nlohmann::json j = nlohmann::json::parse((*it)->result_json, nullptr, false);
    if (j.is_discarded() || !j.contains("verdict") || !j["verdict"].contains("checks")) continue;
    for (const auto& c : j["verdict"]["checks"])
      if (c.value("parameter", "") == name && c.contains("low") && c.contains("high") && c["low"].is_number() &&
          c["high"].is_number()) {
        chart.spec_low = c["low"].get<double>();
        chart.spec_high = c["high"].get<double>();
        return;
      }
  }
}

/// The individuals chart of one parameter over `rows` (results with a determined, finite value; the others are
/// kept as left out, in their place), or nullopt when fewer than two results have one.
std::optional<ControlChart> chart_of(const std::vector<const StoredResult*>& rows, const Column& column) {
  std::vector<std::string> labels;
  std::vector<double> values;
  std::vector<LeftOutBatch> left_out;
  for (const StoredResult* r : rows) {
    const std::string why = not_chartable(*r, column.name);
    if (why.empty()) {
      labels.push_back(r->sample_id);
      values.push_back(std::get<1>(*find_parameter(*r, column.name)));
    } else {
      left_out.push_back({r->sample_id, why, labels.size() + left_out.size()});
    }
  }
  if (values.size() < 2) return std::nullopt;
  std::string why;
  const bool log = log_scale_suits(column.name, values, why);
  ControlChart chart = individuals_chart(column.name, column.unit, std::move(labels), std::move(values), 8, log);
  chart.scale_reason = why;
  chart.left_out = std::move(left_out);
  spec_limits(rows, column.name, chart);
  return chart;
}

std::size_t values_of(const std::vector<const StoredResult*>& rows, const std::string& name) {
  std::size_t n = 0;
  for (const StoredResult* r : rows)
    if (const Parameter* p = find_parameter(*r, name); p && std::isfinite(std::get<1>(*p))) ++n;
  return n;
}

/// The chart's signals in words: points beyond the limits, runs on one side of the centre line.
std::vector<std::string> signals(const ControlChart& c) {
  std::vector<std::string> said;
  for (std::size_t i = 0; i < c.values.size(); ++i)
    if (c.beyond_limits[i])
      said.push_back(c.values[i] > c.upper
                         ? fmt::format("{} ({:.4g} {}) is above the upper limit", c.labels[i], c.values[i], c.unit)
                         : fmt::format("{} ({:.4g} {}) is below the lower limit", c.labels[i], c.values[i], c.unit));
  for (std::size_t i = 0; i < c.values.size();) {
    if (!c.in_run[i]) {
      ++i;
      continue;
    }
    const bool above = c.values[i] > c.centre;
    std::size_t end = i + 1;
    while (end < c.values.size() && c.in_run[end] && (c.values[end] > c.centre) == above) ++end;
    said.push_back(fmt::format("{} to {} ({} results in a row) are all {} the centre line", c.labels[i],
                               c.labels[end - 1], end - i, above ? "above" : "below"));
    i = end;
  }
  return said;
}

std::string interval_cell(const Parameter& p) {
  const auto& [name, value, low, high, unit] = p;
  return fmt::format("{:.4g} [{:.4g}, {:.4g}]", value, low, high);
}

/// The table of one product, with its control-chart signals.
std::string product_table(const std::string& product, const std::vector<const StoredResult*>& rows) {
  const std::vector<Column> columns = parameter_columns(rows);
  std::vector<std::string> header = {"sample", "recorded (UTC)", "rig", "model"};
  for (const Column& c : columns) header.push_back(fmt::format("{} [{}]", c.name, c.unit));
  header.push_back("verdict");
  std::vector<std::vector<std::string>> cells;
  for (const StoredResult* r : rows) {
    std::vector<std::string> line = {r->sample_id, r->recorded_at, r->rig, r->law.empty() ? "(fit failed)" : r->law};
    for (const Column& c : columns) {
      const Parameter* p = find_parameter(*r, c.name);
      line.push_back(p ? interval_cell(*p) : "-");
    }
    line.push_back(r->verdict);
    cells.push_back(std::move(line));
  }
  std::vector<std::size_t> width(header.size());
  for (std::size_t k = 0; k < header.size(); ++k) {
    width[k] = header[k].size();
    for (const auto& line : cells) width[k] = std::max(width[k], line[k].size());
  }
  auto row_text = [&](const std::vector<std::string>& line) {
    std::string s = " ";
    for (std::size_t k = 0; k < line.size(); ++k)
      s += k + 1 < line.size() ? fmt::format(" {:<{}} ", line[k], width[k]) : " " + line[k];
    return s + "\n";
  };
  std::string s = fmt::format("Product {}: {} result{}\n", product_label(product), rows.size(),
                              rows.size() == 1 ? "" : "s");
  s += row_text(header);
  for (const auto& line : cells) s += row_text(line);
  if (!columns.empty()) {
    s += "  Control charts (individuals; limits = mean +/- 2.66 x mean moving range; runs of 8 on one side):\n";
    for (const Column& c : columns) {
      const std::optional<ControlChart> chart = chart_of(rows, c);
      if (!chart) {
        s += fmt::format("    {} [{}]: {} value{}; a chart needs at least 2\n", c.name, c.unit,
                         values_of(rows, c.name), values_of(rows, c.name) == 1 ? "" : "s");
        continue;
      }
      s += fmt::format("    {} [{}]: {} values, centre {:.4g}, limits {:.4g} to {:.4g}{}: ", c.name, c.unit,
                       chart->values.size(), chart->centre, chart->lower, chart->upper,
                       chart->log_scale ? " (log scale)" : "");
      const std::vector<std::string> said = signals(*chart);
      if (said.empty()) {
        s += "no point beyond the limits and no run on one side\n";
      } else {
        for (std::size_t k = 0; k < said.size(); ++k) s += (k ? "; " : "") + said[k];
        s += "\n";
      }
      for (const LeftOutBatch& b : chart->left_out)
        s += fmt::format("      left out (not in the limits): {}: {}\n", b.label, b.reason);
    }
  }
  return s;
}

/// RFC 4180 quoting when a cell holds a comma, quote or line break.
std::string csv_cell(const std::string& text) {
  if (text.find_first_of(",\"\n\r") == std::string::npos) return text;
  std::string q = "\"";
  for (char c : text) q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + "\"";
}

/// Shortest text that reads back to the same double; empty for NaN (no number).
std::string csv_number(double x) { return std::isnan(x) ? std::string() : fmt::format("{}", x); }

std::string history_csv(const std::vector<StoredResult>& rows) {
  std::vector<const StoredResult*> all;
  for (const auto& r : rows) all.push_back(&r);
  const std::vector<Column> columns = parameter_columns(all);
  std::string s = "sample,product,recorded_at,rig,model,verdict";
  for (const Column& c : columns) s += fmt::format(",{0} [{1}],{0} low [{1}],{0} high [{1}]", c.name, c.unit);
  s += ",software_version,input_hash\n";
  for (const auto& r : rows) {
    s += fmt::format("{},{},{},{},{},{}", csv_cell(r.sample_id), csv_cell(r.product), csv_cell(r.recorded_at),
                     csv_cell(r.rig), csv_cell(r.law), csv_cell(r.verdict));
    for (const Column& c : columns) {
      const Parameter* p = find_parameter(r, c.name);
      s += p ? fmt::format(",{},{},{}", csv_number(std::get<1>(*p)), csv_number(std::get<2>(*p)),
                           csv_number(std::get<3>(*p)))
             : std::string(",,,");
    }
    s += fmt::format(",{},{}\n", csv_cell(r.software_version), csv_cell(r.input_hash));
  }
  return s;
}

/// The chart --chart draws; throws InputError("--chart") when none can be drawn.
ControlChart chosen_chart(const std::filesystem::path& db, const std::vector<StoredResult>& rows,
                          const std::string& product) {
  const std::vector<std::string> codes = product_order(rows);
  if (codes.empty())
    throw io::InputError("", 0, "--chart",
                         fmt::format("no results{} in {}; a control chart needs at least two; no chart written",
                                     product.empty() ? "" : " for product " + product, db.string()));
  if (codes.size() > 1) {
    std::vector<std::string> labels;
    for (const auto& c : codes) labels.push_back(product_label(c));
    throw io::InputError("", 0, "--chart",
                         fmt::format("the history holds several products ({}); choose one with --product; no chart "
                                     "written",
                                     fmt::join(labels, ", ")));
  }
  const std::vector<const StoredResult*> mine = of_product(rows, codes.front());
  const std::vector<Column> columns = parameter_columns(mine);
  for (const Column& c : columns)
    if (c.name == kChartParameter)
      if (auto chart = chart_of(mine, c)) return *chart;
  for (const Column& c : columns)
    if (auto chart = chart_of(mine, c)) return *chart;
  throw io::InputError("", 0, "--chart",
                       fmt::format("product {} has no parameter with values from at least two results ({} result{}); "
                                   "a control chart needs two; no chart written",
                                   product_label(codes.front()), mine.size(), mine.size() == 1 ? "" : "s"));
}

}  // namespace

int run_history_command(const std::filesystem::path& db, const std::string& product,
                        const std::optional<std::filesystem::path>& chart, bool csv, std::ostream& out,
                        std::ostream& err) {
  const std::vector<StoredResult> rows = history::load(db, product);
  std::string chart_note;  // said last, after the table
  if (chart) {
    const ControlChart c = chosen_chart(db, rows, product);
    const std::string code = product_label(rows.front().product);  // chosen_chart checked: one product
    std::string name = c.parameter;
    std::replace(name.begin(), name.end(), '_', ' ');
    if (!name.empty()) name[0] = char(std::toupper(static_cast<unsigned char>(name[0])));
    io::write_file_atomically(*chart, control_chart_svg(c, fmt::format("{} of product {}, {} batches", name, code,
                                                                       c.batches())));
    chart_note = fmt::format("chart: {} ({} of product {}, {} results{})\n", chart->string(), c.parameter, code,
                             c.values.size(),
                             c.left_out.empty() ? std::string() : fmt::format(", {} left out", c.left_out.size()));
  }
  if (csv) {
    out << history_csv(rows);
  }
  if (rows.empty()) {
    std::string message;
    if (product.empty()) {
      message = fmt::format("{}: the history holds no results yet\n", db.string());
    } else {
      std::vector<std::string> labels;
      for (const auto& code : history::products(db)) labels.push_back(product_label(code));
      message = fmt::format("{}: no results for product {}{}\n", db.string(), product,
                            labels.empty() ? std::string(" (the history is empty)")
                                           : fmt::format(" (products in the history: {})", fmt::join(labels, ", ")));
    }
    (csv ? err : out) << message;
    return to_int(ExitCode::Done);
  }
  if (!csv) {
    bool first = true;
    for (const std::string& code : product_order(rows)) {
      if (!first) out << "\n";
      first = false;
      out << product_table(code, of_product(rows, code));
    }
  }
  (csv ? err : out) << chart_note;
  return to_int(ExitCode::Done);
}

std::string history_record_note(const std::filesystem::path& db, const history::StoredResult& result,
                                history::WriteOutcome outcome) {
  return outcome == history::WriteOutcome::Updated
             ? fmt::format("history: replaced {} in {} (same inputs as an earlier run)", result.sample_id, db.string())
             : fmt::format("history: added {} to {}", result.sample_id, db.string());
}

}  // namespace spreadfit::cli
