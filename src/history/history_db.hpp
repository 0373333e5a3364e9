// The batch history: every fitted material, one row each, in an SQLite database file that several spreadfit
// processes may write at the same time (`make -j4` running one target per batch, each `spreadfit fit --db H`).
//
// Safety under concurrent writers:
//  - WAL journal mode (readers never block the writer and see only committed results) and a busy timeout of
//    `busy_timeout_ms`: a writer waits for another's transaction instead of failing.
//  - Each record() is ONE transaction begun with BEGIN IMMEDIATE (the write lock is taken before anything is read,
//    so two writers cannot both decide to insert the same result), committed as a whole or not at all. A crash or
//    error leaves no half-written row.
//  - The schema is created inside that same transaction, so racing first writers on a new file cannot clash.
//
// Identity of a result: the hash of its inputs (file_hash.hpp). Recording a result whose input_hash is already in
// the history replaces that row and its parameters (a re-run of the same test with a later build or another
// --model), keeping the row's place in the recorded order; any other result is appended.
//
// Schema (version `schema_version`, kept in PRAGMA user_version; a file of a later version is refused, not
// altered):
//   results(id INTEGER PRIMARY KEY -- recorded order, input_hash TEXT UNIQUE, sample_id, product ('' = none),
//           rig, law ('' = the fit failed), verdict (pass|fail|none), software_version, recorded_at, result_json)
//   parameters(result_id -> results.id, position, name, value, low, high, unit); non-finite numbers are NULL.
//
// Every error is an io::InputError located at the database file (no line, no field), e.g.
//   notes.txt: not a spreadfit history database: file is not a database (expected a file written by
//   'spreadfit fit --db', or the name of a file to create)
#pragma once

#include <filesystem>
#include <string>
#include <tuple>
#include <vector>

#include "src/report/fit_outcome.hpp"

namespace spreadfit::history {

/// Schema version written to PRAGMA user_version.
inline constexpr int schema_version = 1;
/// How long a writer or reader waits for another process's transaction before giving up [ms].
inline constexpr int busy_timeout_ms = 30000;

/// One recorded result.
struct StoredResult {
  std::string sample_id;         ///< the batch / sample id
  std::string product;           ///< product code; empty when the test named none
  std::string rig;               ///< rig kind of each of the material's tests, in order, joined by '+'
  std::string law;               ///< fitted law (newtonian | power-law | bingham | herschel-bulkley); empty
                                 ///< when the fit failed (then there are no parameters)
  std::string verdict;           ///< pass | fail | none
  std::string input_hash;        ///< SHA-256 of the inputs, 64 hex digits (file_hash.hpp)
  std::string software_version;  ///< version of spreadfit that wrote it
  std::string recorded_at;       ///< when it was last written, ISO 8601 UTC "YYYY-MM-DDThh:mm:ssZ"
  /// Material parameters in the result's order: name, value, 95% interval low and high, unit (SI, as in the
  /// JSON result). An upper-bound-only interval has low = 0. Release times (time_origin) are not kept.
  std::vector<std::tuple<std::string, double, double, double, std::string>> parameters;
  std::string result_json;       ///< the full JSON result (result_json.hpp), compact
};

enum class WriteOutcome { Inserted, Updated };

/// Opens the history `db` (creating the file and schema if it does not exist), switches it to WAL mode, and
/// writes `r` in one transaction: a new row, or, when a row with the same input_hash exists, that row replaced
/// with its parameters. An empty recorded_at is filled with the current time. Throws io::InputError naming `db`
/// when it cannot be opened or written, is not an SQLite database or holds another program's tables, is of a
/// later schema version, or another process kept it locked longer than busy_timeout_ms.
WriteOutcome record(const std::filesystem::path& db, const StoredResult& r);

/// Every recorded result of `product` (empty = all products), in recorded order. Opens `db` read-only; a missing
/// file is an error (io::InputError naming it), as are the cases listed for record().
std::vector<StoredResult> load(const std::filesystem::path& db, const std::string& product);

/// The distinct product codes in the history, sorted ('' for results without a product sorts first).
std::vector<std::string> products(const std::filesystem::path& db);

/// The row to record for one fitted material: sample id of its first test, product of the first test that names
/// one, rig kinds, chosen law, its material parameters with their intervals, the verdict, the hash
/// of all its tests' input files (input_hash(outcome.tests)), this software's version, the current time, and
/// result_json(outcome) compact. Throws io::InputError when an input file can no longer be read for hashing.
StoredResult stored_result(const FitOutcome& outcome);

/// The current time as ISO 8601 UTC, "YYYY-MM-DDThh:mm:ssZ".
std::string utc_now_iso8601();

}  // namespace spreadfit::history
