// `spreadfit history DB [--product CODE] [--site CODE] [--chart FILE.svg] [--csv] [--copy-to URI]`: the batch
// history (src/history/history_db.hpp; DB an SQLite file or a PostgreSQL URI) as a table per product, or as CSV,
// with the signals of an individuals control chart of each parameter. --site keeps one site's results; without it
// tables and charts run across every site, and say so when the history names sites.
//
// Table (stdout), per product (sorted by code; results without a product last, as "(none)"), results in batch
// order (batch_order below): sample, site and tested (only when a result of the product has one), recorded (UTC),
// rig, model, one column per parameter "value [low, high]" (the 95% interval; "-" where the law has no such
// parameter or the fit failed), verdict. Then, for each parameter with at least two values, the chart's centre and
// limits (control_chart.hpp) and, in words, every point beyond the limits and every run of `run_length` results on
// one side of the centre line.
//
// --csv: CSV on stdout instead of the table, one row per result, products and batches in the tables' order:
//   sample,product,recorded_at,rig,model,verdict,P [unit],P low [unit],P high [unit],...,software_version,input_hash,
//   site,tested
// with the parameters yield_stress, viscosity, consistency, flow_index (then any others, as first recorded).
// Numbers are written in the shortest form that reads back to the same double; empty cells where there is none.
//
// --chart FILE.svg: an individuals control chart of one product (--product, or the only product in the history)
// for its yield stress when at least two results have one, otherwise for the first parameter that has two
// (control_chart_svg.hpp), written atomically; then a line "chart: FILE (yield_stress of product TS12, 9 results)"
// follows the table (on stderr with --csv); with sites it says "site RH" or "all sites: LK, RH" after the product.
//
// --copy-to URI: copies the results (those --product / --site select) into another history, one transaction per
// result, idempotently (history::copy_history); results without a site take SPREADFIT_SITE when it is set. Prints
// one line saying how many were added, replaced, already there, or kept because the target's were later.
//
// Exit codes: 0 when the history was read (also when it holds nothing for the product: that is said on stdout,
// or on stderr with --csv); the verdicts recorded in the history do not change the exit code. Throws
// io::InputError (main: exit 2) when DB is missing or is not a history database, and when --chart cannot be
// drawn (several products and no --product, or fewer than two values); then no chart file is written.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "src/history/history_db.hpp"
#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

struct HistoryCommandOptions {
  std::string db;                                ///< SQLite path or PostgreSQL URI
  std::string product;                           ///< only this product ('' = all)
  std::string site;                              ///< only this site ('' = all)
  std::optional<std::filesystem::path> chart;    ///< --chart FILE.svg
  bool csv = false;                              ///< --csv
  std::optional<std::string> copy_to;            ///< --copy-to: another history (path or URI)
};

int run_history_command(const HistoryCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit history` and its options on `app`.
CommandRegistration add_history_command(CLI::App& app);

/// A product's results in batch order: by `tested` when a result of them gives it (results without it by the time
/// they were recorded, the UTC time compared as text), ties and the rest in recorded order; when none gives it,
/// in recorded order (so a replaced result keeps its place).
std::vector<const history::StoredResult*> batch_order(std::vector<const history::StoredResult*> rows);

/// The line `spreadfit fit --db` prints after recording a result, e.g.
///   history: added TS12-0412 to runs/history.db
///   history: replaced TS12-0412 in runs/history.db (same inputs as an earlier run)
/// A URI is printed without its password (history::display_name).
std::string history_record_note(const std::string& db, const history::StoredResult& result,
                                 history::WriteOutcome outcome);

}  // namespace spreadfit::cli
