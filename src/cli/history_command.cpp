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
#include <memory>

#include "src/cli/exit_codes.hpp"
#include "src/history/history_location.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/parameter_table.hpp"
#include "src/qc/control_chart.hpp"
#include "src/report/control_chart_svg.hpp"
#include "src/cli/path_option.hpp"

namespace spreadfit::cli {

namespace {

using history::StoredResult;
using Parameter = std::tuple<std::string, double, double, double, std::string>;

/// How a product without a code is shown.
constexpr const char* kNoProduct = "(none)";

struct Column {
  std::string name, unit;
};

/// True when `name` is one of the material parameters of the table.
bool is_material_parameter(const std::string& name) {
  const auto table = io::material_parameters();
  return std::any_of(table.begin(), table.end(), [&](const io::ParameterInfo& p) { return p.name == name; });
}

/// The parameters that occur in `rows`: the table's material parameters first, in the order reports list them
/// (those present), then others as first recorded.
std::vector<Column> parameter_columns(const std::vector<const StoredResult*>& rows) {
  std::vector<Column> seen;
  for (const StoredResult* r : rows)
    for (const auto& p : r->parameters) {
      const std::string& name = std::get<0>(p);
      if (std::none_of(seen.begin(), seen.end(), [&](const Column& c) { return c.name == name; }))
        seen.push_back({name, std::get<4>(p)});
    }
  std::vector<Column> ordered;
  for (const io::ParameterInfo& p : io::material_parameters())
    for (const Column& c : seen)
      if (c.name == p.name) ordered.push_back(c);
  for (const Column& c : seen)
    if (!is_material_parameter(c.name)) ordered.push_back(c);
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
  return batch_order(std::move(out));
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
void spec_limits(const std::vector<const StoredResult*>& rows, const std::string& name, qc::ControlChart& chart) {
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
std::optional<qc::ControlChart> chart_of(const std::vector<const StoredResult*>& rows, const Column& column) {
  std::vector<std::string> labels;
  std::vector<double> values;
  std::vector<qc::LeftOutBatch> left_out;
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
  const bool log = qc::log_scale_suits(column.name, values, why);
  qc::ControlChart chart = qc::individuals_chart(column.name, column.unit, std::move(labels), std::move(values), 8, log);
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
std::vector<std::string> signals(const qc::ControlChart& c) {
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

/// The distinct non-empty sites of `rows`, sorted.
std::vector<std::string> sites_of(const std::vector<const StoredResult*>& rows) {
  std::vector<std::string> sites;
  for (const StoredResult* r : rows)
    if (!r->site.empty() && std::find(sites.begin(), sites.end(), r->site) == sites.end()) sites.push_back(r->site);
  std::sort(sites.begin(), sites.end());
  return sites;
}

/// Which sites a table or chart covers, in words: "" when no result names a site (a single lab's history),
/// "site RH" with --site, else "all sites (LK, RH)".
std::string site_scope(const std::vector<const StoredResult*>& rows, const std::string& site) {
  if (!site.empty()) return "site " + site;
  const std::vector<std::string> sites = sites_of(rows);
  if (sites.empty()) return "";
  const bool some_without = std::any_of(rows.begin(), rows.end(), [](const StoredResult* r) { return r->site.empty(); });
  return fmt::format("all sites ({}{})", fmt::join(sites, ", "), some_without ? ", and results without a site" : "");
}

/// The table of one product, with its control-chart signals.
std::string product_table(const std::string& product, const std::vector<const StoredResult*>& rows,
                          const std::string& site) {
  const std::vector<Column> columns = parameter_columns(rows);
  const bool show_site = std::any_of(rows.begin(), rows.end(), [](const StoredResult* r) { return !r->site.empty(); });
  const bool show_tested =
      std::any_of(rows.begin(), rows.end(), [](const StoredResult* r) { return !r->tested.empty(); });
  std::vector<std::string> header = {"sample"};
  if (show_site) header.push_back("site");
  if (show_tested) header.push_back("tested");
  for (const char* h : {"recorded (UTC)", "rig", "model"}) header.push_back(h);
  for (const Column& c : columns) header.push_back(fmt::format("{} [{}]", c.name, c.unit));
  header.push_back("verdict");
  std::vector<std::vector<std::string>> cells;
  for (const StoredResult* r : rows) {
    std::vector<std::string> line = {r->sample_id};
    if (show_site) line.push_back(r->site.empty() ? "-" : r->site);
    if (show_tested) line.push_back(r->tested.empty() ? "-" : r->tested);
    for (const std::string& cell : {r->recorded_at, r->rig, r->law.empty() ? std::string("(fit failed)") : r->law})
      line.push_back(cell);
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
  const std::string scope = site_scope(rows, site);
  std::string s = fmt::format("Product {}{}: {} result{}\n", product_label(product), scope.empty() ? "" : ", " + scope,
                              rows.size(), rows.size() == 1 ? "" : "s");
  s += row_text(header);
  for (const auto& line : cells) s += row_text(line);
  if (!columns.empty()) {
    s += fmt::format("  Control charts (individuals; limits = mean +/- 2.66 x mean moving range; runs of 8 on one "
                     "side{}):\n",
                     scope.empty() ? "" : "; " + scope);
    for (const Column& c : columns) {
      const std::optional<qc::ControlChart> chart = chart_of(rows, c);
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
      for (const qc::LeftOutBatch& b : chart->left_out)
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

/// One row per result, products in report order and each product's batches in batch order, as the tables list them.
std::string history_csv(const std::vector<StoredResult>& stored) {
  std::vector<const StoredResult*> all;
  for (const std::string& code : product_order(stored))
    for (const StoredResult* r : of_product(stored, code)) all.push_back(r);
  const std::vector<Column> columns = parameter_columns(all);
  std::string s = "sample,product,recorded_at,rig,model,verdict";
  for (const Column& c : columns) s += fmt::format(",{0} [{1}],{0} low [{1}],{0} high [{1}]", c.name, c.unit);
  s += ",software_version,input_hash,site,tested\n";
  for (const StoredResult* row : all) {
    const StoredResult& r = *row;
    s += fmt::format("{},{},{},{},{},{}", csv_cell(r.sample_id), csv_cell(r.product), csv_cell(r.recorded_at),
                     csv_cell(r.rig), csv_cell(r.law), csv_cell(r.verdict));
    for (const Column& c : columns) {
      const Parameter* p = find_parameter(r, c.name);
      s += p ? fmt::format(",{},{},{}", csv_number(std::get<1>(*p)), csv_number(std::get<2>(*p)),
                           csv_number(std::get<3>(*p)))
             : std::string(",,,");
    }
    s += fmt::format(",{},{},{},{}\n", csv_cell(r.software_version), csv_cell(r.input_hash), csv_cell(r.site),
                     csv_cell(r.tested));
  }
  return s;
}

/// The chart --chart draws; throws InputError("--chart") when none can be drawn.
qc::ControlChart chosen_chart(const std::string& db, const std::vector<StoredResult>& rows,
                          const std::string& product) {
  const std::vector<std::string> codes = product_order(rows);
  if (codes.empty())
    throw io::InputError("", 0, "--chart",
                         fmt::format("no results{} in {}; a control chart needs at least two; no chart written",
                                     product.empty() ? "" : " for product " + product, db));
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
    // The yield stress when it has at least two values (README, history --chart), else the first that has.
    if (io::is_parameter(c.name, io::Parameter::YieldStress))
      if (auto chart = chart_of(mine, c)) return *chart;
  for (const Column& c : columns)
    if (auto chart = chart_of(mine, c)) return *chart;
  throw io::InputError("", 0, "--chart",
                       fmt::format("product {} has no parameter with values from at least two results ({} result{}); "
                                   "a control chart needs two; no chart written",
                                   product_label(codes.front()), mine.size(), mine.size() == 1 ? "" : "s"));
}

}  // namespace

std::vector<const StoredResult*> batch_order(std::vector<const StoredResult*> rows) {
  const bool any_tested =
      std::any_of(rows.begin(), rows.end(), [](const StoredResult* r) { return !r->tested.empty(); });
  if (any_tested)
    std::stable_sort(rows.begin(), rows.end(), [](const StoredResult* a, const StoredResult* b) {
      const std::string& ka = a->tested.empty() ? a->recorded_at : a->tested;
      const std::string& kb = b->tested.empty() ? b->recorded_at : b->tested;
      return ka < kb;
    });
  return rows;
}

namespace {

/// "product TS12", "site RH", "product TS12 at site RH".
std::string filter_words(const history::HistoryFilter& f) {
  if (!f.product.empty() && !f.site.empty()) return fmt::format("product {} at site {}", f.product, f.site);
  if (!f.product.empty()) return "product " + f.product;
  return "site " + f.site;
}

int copy_command(const HistoryCommandOptions& o, const history::HistoryFilter& filter, std::ostream& out) {
  if (o.chart || o.csv)
    throw io::InputError("", 0, "--copy-to",
                         "cannot be combined with --chart or --csv (copy first, then read the copy with history)");
  const std::string site = history::default_site();
  const history::CopySummary c = history::copy_history(o.db, *o.copy_to, filter, site);
  const std::size_t total = c.added + c.replaced + c.unchanged + c.kept_newer;
  out << fmt::format("copied {} result{}{} from {} to {}: {} added, {} replaced, {} already there, {} kept (the "
                     "target's recording was later){}\n",
                     total, total == 1 ? "" : "s", filter.product.empty() && filter.site.empty() ? "" : " of " + filter_words(filter),
                     history::display_name(o.db), history::display_name(*o.copy_to), c.added, c.replaced, c.unchanged,
                     c.kept_newer,
                     c.site_given == 0 ? std::string()
                                       : fmt::format("; {} without a site given site {} from {}", c.site_given, site,
                                                     history::site_environment_variable));
  return to_int(ExitCode::Done);
}

}  // namespace

int run_history_command(const HistoryCommandOptions& o, std::ostream& out, std::ostream& err) {
  const history::HistoryFilter filter{o.product, o.site};
  if (o.copy_to) return copy_command(o, filter, out);
  const std::unique_ptr<history::HistoryStore> store = history::open_history(o.db, history::Access::Read);
  const std::vector<StoredResult> rows = store->load(filter);
  const std::string name = store->name();
  std::string chart_note;  // said last, after the table
  if (o.chart) {
    const qc::ControlChart c = chosen_chart(name, rows, o.product);
    const std::string code = product_label(rows.front().product);  // chosen_chart checked: one product
    const std::string scope = site_scope(of_product(rows, rows.front().product), o.site);
    std::string title = c.parameter;
    std::replace(title.begin(), title.end(), '_', ' ');
    if (!title.empty()) title[0] = char(std::toupper(static_cast<unsigned char>(title[0])));
    io::write_file_atomically(*o.chart, report::control_chart_svg(c, fmt::format("{} of product {}{}, {} batches", title,
                                                                         code, scope.empty() ? "" : ", " + scope,
                                                                         c.batches())));
    chart_note = fmt::format("chart: {} ({} of product {}{}, {} results{})\n", o.chart->string(), c.parameter, code,
                             scope.empty() ? "" : ", " + scope, c.values.size(),
                             c.left_out.empty() ? std::string() : fmt::format(", {} left out", c.left_out.size()));
  }
  if (o.csv) {
    out << history_csv(rows);
  }
  if (rows.empty()) {
    std::string message;
    if (o.product.empty() && o.site.empty()) {
      message = fmt::format("{}: the history holds no results yet\n", name);
    } else {
      std::vector<std::string> labels;
      for (const auto& code : store->products()) labels.push_back(product_label(code));
      std::vector<std::string> sites;
      for (const auto& code : store->sites())
        if (!code.empty()) sites.push_back(code);
      std::string held = " (the history is empty)";
      if (!labels.empty())
        held = fmt::format(" (products in the history: {}{})", fmt::join(labels, ", "),
                           sites.empty() ? std::string() : fmt::format("; sites: {}", fmt::join(sites, ", ")));
      message = fmt::format("{}: no results for {}{}\n", name, filter_words(filter), held);
    }
    (o.csv ? err : out) << message;
    return to_int(ExitCode::Done);
  }
  if (!o.csv) {
    bool first = true;
    for (const std::string& code : product_order(rows)) {
      if (!first) out << "\n";
      first = false;
      out << product_table(code, of_product(rows, code), o.site);
    }
  }
  (o.csv ? err : out) << chart_note;
  return to_int(ExitCode::Done);
}

std::string history_record_note(const std::string& db, const history::StoredResult& result,
                                history::WriteOutcome outcome) {
  const std::string name = history::display_name(db);
  return outcome == history::WriteOutcome::Updated
             ? fmt::format("history: replaced {} in {} (same inputs as an earlier run)", result.sample_id, name)
             : fmt::format("history: added {} to {}", result.sample_id, name);
}

CommandRegistration add_history_command(CLI::App& app) {
  struct Given {
    HistoryCommandOptions options;
    PathOption chart;
    std::string copy_to;
    CLI::Option* copy_to_option = nullptr;
  };
  const auto given = std::make_shared<Given>();
  CLI::App* history =
      app.add_subcommand("history", "List the batch history per product, with control-chart signals.");
  history->add_option("DB", given->options.db,
                      "History written by 'spreadfit fit --db': an SQLite file or a postgresql:// URI")
      ->required()
      ->type_name("");
  history->add_option("--product", given->options.product, "Only this product code")->type_name("CODE");
  history->add_option("--site", given->options.site, "Only this site (lab or plant); default: across all sites")
      ->type_name("CODE");
  given->chart.add_to(*history, "--chart", "FILE.svg",
                      "Draw an individuals control chart of the product's yield stress (else its first parameter)");
  history->add_flag("--csv", given->options.csv, "Write CSV to stdout instead of the table");
  given->copy_to_option =
      history
          ->add_option("--copy-to", given->copy_to,
                       "Copy the results into another history (e.g. a postgresql:// URI); running it twice adds "
                       "nothing")
          ->type_name("URI");
  return {history, [given](std::ostream& out, std::ostream& err) {
            HistoryCommandOptions options = given->options;
            options.chart = given->chart.get();
            options.copy_to = given_text(given->copy_to_option, given->copy_to);
            return run_history_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
