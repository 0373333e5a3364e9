// The batch history: every fitted material, one row each, kept either in an SQLite file (the embedded default,
// sqlite_history.hpp) or on a PostgreSQL server (postgres_history.hpp) that several labs and plants share. Both
// backends keep the same tables and the same rules, so `history` prints the same table, chart and CSV for the
// same rows:
//  - Each record() is ONE transaction, committed as a whole or not at all: a crash, a lost connection or an error
//    leaves no half-written row.
//  - Identity of a result is the hash of its inputs (file_hash.hpp). Recording a result whose input_hash is already
//    in the history replaces that row and its parameters (a re-run of the same test with a later build or another
//    --model), keeping the row's place in the recorded order; any other result is appended.
//  - Any number of processes may write at once; racing writers of the same inputs leave one row.
//  - The schema is versioned (schema_version below, one row in the table spreadfit_schema; SQLite also keeps it in
//    PRAGMA user_version). An older history is upgraded in place by the first writer; a later one is refused,
//    not altered. A history of an older version is read as it is.
//
// Schema version 2 (version 1 lacked site and tested, and spreadfit_schema on SQLite):
//   results(id -- recorded order, input_hash UNIQUE, sample_id, product ('' = none), site ('' = none),
//           tested ('' = not given; test_time.hpp), rig, law ('' = the fit failed), verdict (pass|fail|none),
//           software_version, recorded_at, result_json)
//   parameters(result_id -> results.id, position, name, value, low, high, unit); a NaN number is NULL.
//   spreadfit_schema(version)
//
// A location is an SQLite path or a PostgreSQL URI (history_location.hpp). Every error is an io::InputError
// located at display_name(location), without a password, in one line, e.g.
//   notes.txt: not a spreadfit history database: file is not a database (expected a history written by
//   'spreadfit fit --db', or the name of a file to create)
#pragma once

#include <memory>
#include <string>
#include <tuple>
#include <vector>

#include "src/report/fit_outcome.hpp"

namespace spreadfit::history {

/// The schema version this build writes and the latest it reads.
inline constexpr int schema_version = 2;
/// How long a writer or reader waits for another process's transaction or lock before giving up [ms].
inline constexpr int busy_timeout_ms = 30000;
/// The environment variable that gives the site of results whose test description names none.
inline constexpr const char* site_environment_variable = "SPREADFIT_SITE";

/// One recorded result.
struct StoredResult {
  std::string sample_id;         ///< the batch / sample id
  std::string product;           ///< product code; empty when the test named none
  std::string site;              ///< lab or plant; empty when neither the test nor SPREADFIT_SITE named one
  std::string tested;            ///< when the test was run, canonical (test_time.hpp); empty when not given
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

/// Every field equal; NaN numbers count as equal to NaN.
bool same_result(const StoredResult& a, const StoredResult& b);

enum class WriteOutcome { Inserted, Updated };

/// Which results load() returns; an empty field matches every value.
struct HistoryFilter {
  std::string product;  ///< product code
  std::string site;     ///< site code
};

/// One open history. Each call is its own transaction; the connection stays open between calls.
class HistoryStore {
 public:
  virtual ~HistoryStore() = default;
  /// Writes `r` in one transaction (see the rules above). An empty recorded_at is filled with the current time.
  virtual WriteOutcome record(const StoredResult& r) = 0;
  /// The results that match `filter`, in recorded order, read from one consistent snapshot.
  virtual std::vector<StoredResult> load(const HistoryFilter& filter) = 0;
  /// The distinct product codes and site codes in the history, each sorted by byte value ('' first).
  virtual std::vector<std::string> products() = 0;
  virtual std::vector<std::string> sites() = 0;
  /// The location as printed (display_name).
  virtual const std::string& name() const = 0;
};

enum class Access {
  Read,  ///< reads only; an SQLite file must exist (it is not created); nothing is ever changed
  Write  ///< may create the file or the tables, and upgrade an older schema
};

/// Opens the history at `location` (an SQLite path or a PostgreSQL URI). Throws io::InputError naming it when it
/// cannot be opened or reached, is not a spreadfit history or holds another program's tables, or is of a later
/// schema version.
std::unique_ptr<HistoryStore> open_history(const std::string& location, Access access);

/// One-call forms of the above, opening and closing the history each time.
WriteOutcome record(const std::string& location, const StoredResult& r);
std::vector<StoredResult> load(const std::string& location, const HistoryFilter& filter);
std::vector<StoredResult> load(const std::string& location, const std::string& product);
std::vector<std::string> products(const std::string& location);

/// What copy_history did, per result of the source.
struct CopySummary {
  std::size_t added = 0;       ///< not in the target before
  std::size_t replaced = 0;    ///< the target held an earlier recording of the same inputs, now overwritten
  std::size_t unchanged = 0;   ///< the target already held exactly this result
  std::size_t kept_newer = 0;  ///< the target held a later recording of the same inputs (kept)
  std::size_t site_given = 0;  ///< results without a site that were given `default_site` in the target
};

/// Copies the results of `from` that match `filter` into `to`, in recorded order, one transaction per result
/// (an interrupted copy leaves whole results and a second run completes it). Idempotent: a result the target
/// already holds unchanged is not written again, so running it twice adds nothing. A result without a site is
/// given `default_site` (when not empty). Throws io::InputError naming the history at fault; copying a history
/// onto itself is refused.
CopySummary copy_history(const std::string& from, const std::string& to, const HistoryFilter& filter,
                         const std::string& default_site);

/// The row to record for one fitted material: sample id of its first test, product of the first test that names
/// one, site of the first test that names one (else the environment's SPREADFIT_SITE, else none), `tested` of the
/// first test that gives it, rig kinds, chosen law, its material parameters with their intervals, the verdict,
/// the hash of all its tests' input files (input_hash(outcome.tests)), this software's version, the current time,
/// and result_json(outcome) compact. Throws io::InputError when an input file can no longer be read for hashing,
/// or SPREADFIT_SITE holds a line break or tab.
StoredResult stored_result(const report::FitOutcome& outcome);

/// The site SPREADFIT_SITE names, or '' when it is not set or empty. Throws io::InputError when it holds a line
/// break or tab.
std::string default_site();

/// The current time as ISO 8601 UTC, "YYYY-MM-DDThh:mm:ssZ".
std::string utc_now_iso8601();

}  // namespace spreadfit::history
