#include "src/history/sqlite_history.hpp"

#include <fmt/format.h>
#include <sqlite3.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <map>
#include <memory>
#include <optional>
#include <thread>

#include "src/io/input_error.hpp"

namespace spreadfit::history {

namespace {

namespace fs = std::filesystem;

/// The hint that follows SQLite's own words, by primary result code.
std::string hint_for(int code) {
  switch (code & 0xff) {
    case SQLITE_NOTADB:
      return " (expected a history written by 'spreadfit fit --db', or the name of a file to create)";
    case SQLITE_CORRUPT:
      return " (the database is damaged; restore it from a backup)";
    case SQLITE_BUSY:
    case SQLITE_LOCKED:
      return fmt::format(" (another process kept the database locked for more than {} s)", busy_timeout_ms / 1000);
    case SQLITE_CANTOPEN:
      return " (expected an existing folder, and permission to read and write the file and create files next to it)";
    case SQLITE_READONLY:
    case SQLITE_PERM:
    case SQLITE_AUTH:
      return " (no permission to write the database or the files SQLite keeps next to it)";
    case SQLITE_FULL:
      return " (the disk is full)";
    case SQLITE_IOERR:
      return " (the disk or file system reported an error)";
    default:
      return "";
  }
}

[[noreturn]] void fail(const fs::path& db, const std::string& message) {
  throw io::InputError(db.string(), 0, "", message);
}

struct ConnectionCloser {
  void operator()(sqlite3* c) const { sqlite3_close_v2(c); }
};

/// One open connection; closed on destruction. Every error it raises names the database file.
class Database {
 public:
  enum class Mode { ReadOnly, ReadWriteCreate };

  Database(const fs::path& file, Mode mode) : file_(file) {
    std::error_code ec;
    if (fs::is_directory(file, ec)) fail(file_, "is a folder (expected a history database file)");
    if (mode == Mode::ReadOnly && !fs::exists(file, ec))
      fail(file_, "no such history database (expected a file written by 'spreadfit fit --db')");
    // A reader opens read-write too (never creating) and then refuses writes (PRAGMA query_only): in WAL mode only a
    // connection that may write removes the -wal and -shm files when it closes last, so a read-only open would leave
    // them beside the database (also beside a damaged one). A write-protected file still opens, read only.
    const int flags = mode == Mode::ReadOnly ? SQLITE_OPEN_READWRITE : (SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
    sqlite3* raw = nullptr;
    const int rc = sqlite3_open_v2(file.c_str(), &raw, flags, nullptr);
    handle_.reset(raw);  // closed even when opening failed
    if (raw == nullptr) fail(file_, "cannot open the history database: out of memory");
    if (rc != SQLITE_OK) raise(rc, "opening the history database");
    check(sqlite3_extended_result_codes(raw, 1), "enabling extended error codes");
    check(sqlite3_busy_timeout(raw, busy_timeout_ms), "setting the busy timeout");
    if (mode == Mode::ReadOnly) exec("PRAGMA query_only = 1", "opening the history database for reading");
  }

  sqlite3* get() const { return handle_.get(); }
  const fs::path& file() const { return file_; }

  [[noreturn]] void raise(int rc, std::string_view doing) const {
    std::string what = handle_ ? sqlite3_errmsg(handle_.get()) : sqlite3_errstr(rc);
    if ((rc & 0xff) == SQLITE_NOTADB)
      fail(file_, fmt::format("not a spreadfit history database: {}{}", what, hint_for(rc)));
    fail(file_, fmt::format("batch history: {}: {}{}", doing, what, hint_for(rc)));
  }
  void check(int rc, std::string_view doing) const {
    if (rc != SQLITE_OK) raise(rc, doing);
  }
  /// Runs SQL that returns no rows.
  void exec(const char* sql, std::string_view doing) const { check(sqlite3_exec(get(), sql, nullptr, nullptr, nullptr), doing); }

 private:
  fs::path file_;
  std::unique_ptr<sqlite3, ConnectionCloser> handle_;
};

/// A prepared statement; finalized on destruction.
class Statement {
 public:
  Statement(const Database& db, std::string_view sql, std::string doing) : db_(db), doing_(std::move(doing)) {
    const int rc = sqlite3_prepare_v2(db.get(), sql.data(), static_cast<int>(sql.size()), &stmt_, nullptr);
    if (rc != SQLITE_OK) db_.raise(rc, doing_);
  }
  ~Statement() { sqlite3_finalize(stmt_); }
  Statement(const Statement&) = delete;
  Statement& operator=(const Statement&) = delete;

  void bind(int index, std::string_view text) {
    check(sqlite3_bind_text(stmt_, index, text.data(), static_cast<int>(text.size()), SQLITE_TRANSIENT));
  }
  /// NaN is stored as NULL (and read back as NaN); infinities are stored as they are.
  void bind(int index, double value) {
    check(std::isnan(value) ? sqlite3_bind_null(stmt_, index) : sqlite3_bind_double(stmt_, index, value));
  }
  void bind(int index, sqlite3_int64 value) { check(sqlite3_bind_int64(stmt_, index, value)); }

  /// The raw result code of one step (SQLITE_ROW, SQLITE_DONE or an error), for callers that handle BUSY.
  int step_code() { return sqlite3_step(stmt_); }
  /// One step: true when a row is ready, false when done; throws on any error.
  bool step() {
    const int rc = sqlite3_step(stmt_);
    if (rc == SQLITE_ROW) return true;
    if (rc == SQLITE_DONE) return false;
    db_.raise(rc, doing_);
  }
  /// Runs a statement that returns no rows.
  void run() {
    if (step()) db_.raise(SQLITE_MISUSE, doing_ + " (a row where none was expected)");
  }
  void reset() {
    sqlite3_reset(stmt_);
    sqlite3_clear_bindings(stmt_);
  }

  std::string text(int column) const {
    const auto* p = sqlite3_column_text(stmt_, column);
    if (p == nullptr) return {};
    return std::string(reinterpret_cast<const char*>(p), static_cast<std::size_t>(sqlite3_column_bytes(stmt_, column)));
  }
  double real(int column) const {
    if (sqlite3_column_type(stmt_, column) == SQLITE_NULL) return std::numeric_limits<double>::quiet_NaN();
    return sqlite3_column_double(stmt_, column);
  }
  sqlite3_int64 integer(int column) const { return sqlite3_column_int64(stmt_, column); }

 private:
  void check(int rc) const {
    if (rc != SQLITE_OK) db_.raise(rc, doing_);
  }
  const Database& db_;
  std::string doing_;
  sqlite3_stmt* stmt_ = nullptr;
};

/// A transaction rolled back on destruction unless committed.
class Transaction {
 public:
  /// `immediate`: take the write lock now (BEGIN IMMEDIATE), waiting up to the busy timeout; otherwise a read
  /// transaction, which sees one consistent snapshot.
  Transaction(const Database& db, bool immediate) : db_(db) {
    db_.exec(immediate ? "BEGIN IMMEDIATE" : "BEGIN", immediate ? "starting a write transaction" : "starting a read");
  }
  ~Transaction() {
    if (open_) sqlite3_exec(db_.get(), "ROLLBACK", nullptr, nullptr, nullptr);  // nothing of it is kept
  }
  Transaction(const Transaction&) = delete;
  Transaction& operator=(const Transaction&) = delete;
  void commit() {
    db_.exec("COMMIT", "committing the transaction");
    open_ = false;
  }

 private:
  const Database& db_;
  bool open_ = true;
};

/// Switches the database to WAL mode (a lasting property of the file). Converting a new file needs a moment of
/// exclusive access, which SQLite does not always wait for; retried every `kRetryMs` up to the busy timeout.
void use_wal(const Database& db) {
  constexpr int kRetryMs = 10;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::milliseconds(busy_timeout_ms);
  for (;;) {
    Statement s(db, "PRAGMA journal_mode = WAL", "switching to WAL journal mode");
    const int rc = s.step_code();
    if (rc == SQLITE_ROW) return;  // "wal", or the mode the file system allows (the writes stay transactional)
    if ((rc & 0xff) != SQLITE_BUSY && (rc & 0xff) != SQLITE_LOCKED) db.raise(rc, "switching to WAL journal mode");
    if (std::chrono::steady_clock::now() >= deadline) db.raise(rc, "switching to WAL journal mode");
    std::this_thread::sleep_for(std::chrono::milliseconds(kRetryMs));
  }
}

sqlite3_int64 single_integer(const Database& db, const char* sql, const std::string& doing) {
  Statement s(db, sql, doing);
  if (!s.step()) db.raise(SQLITE_MISUSE, doing + " (no row)");
  return s.integer(0);
}

/// Checks the schema version and tables. Returns the version found; 0 when the file holds no schema yet (a new or
/// empty file).
sqlite3_int64 check_schema(const Database& db) {
  const auto version = single_integer(db, "PRAGMA user_version", "reading the schema version");
  const auto tables =
      single_integer(db, "SELECT count(*) FROM sqlite_master WHERE type = 'table'", "listing the tables");
  if (version > schema_version)
    fail(db.file(), fmt::format("the history was written by a later spreadfit (schema version {}; this version "
                                "reads up to {}); use that version or a later one",
                                version, schema_version));
  if (version == 0) {
    if (tables > 0)
      fail(db.file(), "not a spreadfit history database: it is an SQLite database of another program (it has "
                      "tables but no spreadfit schema version); expected a file written by 'spreadfit fit --db'");
    return 0;
  }
  const auto ours = single_integer(
      db, "SELECT count(*) FROM sqlite_master WHERE type = 'table' AND name IN ('results', 'parameters')",
      "listing the tables");
  if (ours != 2)
    fail(db.file(), fmt::format("not a spreadfit history database: schema version {} but without the tables "
                                "'results' and 'parameters'",
                                version));
  return version;
}

constexpr const char* kCreateSchema = R"sql(
CREATE TABLE results (
  id               INTEGER PRIMARY KEY,
  input_hash       TEXT NOT NULL UNIQUE,
  sample_id        TEXT NOT NULL,
  product          TEXT NOT NULL,
  rig              TEXT NOT NULL,
  law              TEXT NOT NULL,
  verdict          TEXT NOT NULL CHECK (verdict IN ('pass', 'fail', 'none')),
  software_version TEXT NOT NULL,
  recorded_at      TEXT NOT NULL,
  result_json      TEXT NOT NULL,
  site             TEXT NOT NULL DEFAULT '',
  tested           TEXT NOT NULL DEFAULT ''
);
CREATE INDEX results_by_product ON results (product, id);
CREATE TABLE parameters (
  result_id INTEGER NOT NULL REFERENCES results (id) ON DELETE CASCADE,
  position  INTEGER NOT NULL,
  name      TEXT NOT NULL,
  value     REAL,
  low       REAL,
  high      REAL,
  unit      TEXT NOT NULL,
  PRIMARY KEY (result_id, position),
  UNIQUE (result_id, name)
);
CREATE TABLE spreadfit_schema (version INTEGER NOT NULL);
INSERT INTO spreadfit_schema (version) VALUES (2);
PRAGMA user_version = 2;
)sql";

/// Version 1 -> 2: a result's site and test time; the version row. The columns go last, as ALTER TABLE puts them
/// (kCreateSchema matches, so upgraded and new files have one layout).
constexpr const char* kUpgradeFrom1 = R"sql(
ALTER TABLE results ADD COLUMN site TEXT NOT NULL DEFAULT '';
ALTER TABLE results ADD COLUMN tested TEXT NOT NULL DEFAULT '';
CREATE TABLE spreadfit_schema (version INTEGER NOT NULL);
INSERT INTO spreadfit_schema (version) VALUES (2);
PRAGMA user_version = 2;
)sql";
static_assert(schema_version == 2, "kCreateSchema and kUpgradeFrom1 write version 2");

class SqliteHistory final : public HistoryStore {
 public:
  SqliteHistory(const std::string& file, Access access)
      : db_(file, access == Access::Read ? Database::Mode::ReadOnly : Database::Mode::ReadWriteCreate),
        name_(file) {
    if (access == Access::Write) {
      {
        // Refuse another program's database or a later schema before changing anything, even the journal mode.
        Transaction look(db_, /*immediate=*/false);
        (void)check_schema(db_);
        look.commit();
      }
      use_wal(db_);
      db_.exec("PRAGMA foreign_keys = ON", "enabling foreign keys");
    }
  }

  const std::string& name() const override { return name_; }

  WriteOutcome record(const StoredResult& r) override {
    Transaction transaction(db_, /*immediate=*/true);
    const auto version = check_schema(db_);
    if (version == 0) db_.exec(kCreateSchema, "creating the history tables");
    if (version == 1) db_.exec(kUpgradeFrom1, "upgrading the history from schema version 1 to 2");

    std::optional<sqlite3_int64> existing;
    {
      Statement find(db_, "SELECT id FROM results WHERE input_hash = ?1", "looking up the input hash");
      find.bind(1, r.input_hash);
      if (find.step()) existing = find.integer(0);
    }
    const std::string recorded_at = r.recorded_at.empty() ? utc_now_iso8601() : r.recorded_at;
    auto bind_fields = [&](Statement& s) {
      s.bind(1, r.input_hash);
      s.bind(2, r.sample_id);
      s.bind(3, r.product);
      s.bind(4, r.rig);
      s.bind(5, r.law);
      s.bind(6, r.verdict);
      s.bind(7, r.software_version);
      s.bind(8, recorded_at);
      s.bind(9, r.result_json);
      s.bind(10, r.site);
      s.bind(11, r.tested);
    };
    sqlite3_int64 id = 0;
    if (existing) {
      id = *existing;
      Statement update(db_,
                       "UPDATE results SET input_hash = ?1, sample_id = ?2, product = ?3, rig = ?4, law = ?5, "
                       "verdict = ?6, software_version = ?7, recorded_at = ?8, result_json = ?9, site = ?10, "
                       "tested = ?11 WHERE id = ?12",
                       "replacing the earlier result of the same inputs");
      bind_fields(update);
      update.bind(12, id);
      update.run();
      Statement remove(db_, "DELETE FROM parameters WHERE result_id = ?1", "removing the earlier result's parameters");
      remove.bind(1, id);
      remove.run();
    } else {
      Statement insert(db_,
                       "INSERT INTO results (input_hash, sample_id, product, rig, law, verdict, software_version, "
                       "recorded_at, result_json, site, tested) VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11)",
                       "adding the result");
      bind_fields(insert);
      insert.run();
      id = sqlite3_last_insert_rowid(db_.get());
    }
    Statement parameter(db_,
                        "INSERT INTO parameters (result_id, position, name, value, low, high, unit) "
                        "VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7)",
                        "adding the result's parameters");
    sqlite3_int64 position = 0;
    for (const auto& [pname, value, low, high, unit] : r.parameters) {
      parameter.bind(1, id);
      parameter.bind(2, position++);
      parameter.bind(3, pname);
      parameter.bind(4, value);
      parameter.bind(5, low);
      parameter.bind(6, high);
      parameter.bind(7, unit);
      parameter.run();
      parameter.reset();
    }
    transaction.commit();
    return existing ? WriteOutcome::Updated : WriteOutcome::Inserted;
  }

  std::vector<StoredResult> load(const HistoryFilter& filter) override {
    Transaction snapshot(db_, /*immediate=*/false);
    std::vector<StoredResult> out;
    const auto version = check_schema(db_);
    if (version == 0) return out;  // an empty file: no history yet
    // A version-1 file (read, never changed by a reader) has no site or test time.
    const std::string extra = version >= 2 ? "r.site, r.tested" : "'', ''";
    std::string where;
    if (!filter.product.empty()) where += " AND r.product = ?1";
    if (!filter.site.empty()) where += version >= 2 ? " AND r.site = ?2" : " AND ?2 = ''";
    if (!where.empty()) where = " WHERE" + where.substr(4);
    auto bind_filter = [&](Statement& s) {
      if (!filter.product.empty()) s.bind(1, filter.product);
      if (!filter.site.empty()) s.bind(2, filter.site);
    };
    std::map<sqlite3_int64, std::size_t> index;
    {
      Statement rows(db_,
                     "SELECT r.id, r.sample_id, r.product, r.rig, r.law, r.verdict, r.input_hash, r.software_version, "
                     "r.recorded_at, r.result_json, " + extra + " FROM results r" + where + " ORDER BY r.id",
                     "reading the results");
      bind_filter(rows);
      while (rows.step()) {
        StoredResult s;
        s.sample_id = rows.text(1);
        s.product = rows.text(2);
        s.rig = rows.text(3);
        s.law = rows.text(4);
        s.verdict = rows.text(5);
        s.input_hash = rows.text(6);
        s.software_version = rows.text(7);
        s.recorded_at = rows.text(8);
        s.result_json = rows.text(9);
        s.site = rows.text(10);
        s.tested = rows.text(11);
        index[rows.integer(0)] = out.size();
        out.push_back(std::move(s));
      }
    }
    Statement params(db_,
                     "SELECT p.result_id, p.name, p.value, p.low, p.high, p.unit FROM parameters p "
                     "JOIN results r ON r.id = p.result_id" + where + " ORDER BY p.result_id, p.position",
                     "reading the parameters");
    bind_filter(params);
    while (params.step()) {
      const auto it = index.find(params.integer(0));
      if (it == index.end()) continue;  // cannot happen inside one snapshot; never attach to the wrong result
      out[it->second].parameters.emplace_back(params.text(1), params.real(2), params.real(3), params.real(4),
                                              params.text(5));
    }
    snapshot.commit();
    return out;
  }

  std::vector<std::string> products() override { return distinct("product"); }
  std::vector<std::string> sites() override { return distinct("site"); }

 private:
  std::vector<std::string> distinct(const std::string& column) {
    Transaction snapshot(db_, /*immediate=*/false);
    std::vector<std::string> out;
    const auto version = check_schema(db_);
    if (version == 0) return out;
    if (column == "site" && version < 2) {
      if (single_integer(db_, "SELECT count(*) FROM results", "counting the results") > 0) out.emplace_back();
    } else {
      Statement s(db_, "SELECT DISTINCT " + column + " FROM results", "listing the " + column + "s");
      while (s.step()) out.push_back(s.text(0));
    }
    snapshot.commit();
    std::sort(out.begin(), out.end());
    return out;
  }

  Database db_;
  std::string name_;
};

}  // namespace

std::unique_ptr<HistoryStore> open_sqlite_history(const std::string& file, Access access) {
  return std::make_unique<SqliteHistory>(file, access);
}

}  // namespace spreadfit::history
