#include "src/history/postgres_history.hpp"

#include <fmt/format.h>
#include <libpq-fe.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdlib>
#include <limits>
#include <map>
#include <optional>
#include <vector>

#include "src/history/history_location.hpp"
#include "src/io/input_error.hpp"

namespace spreadfit::history {

namespace {

/// SQLSTATE codes (PostgreSQL 15 documentation, Appendix A "PostgreSQL Error Codes").
constexpr std::string_view kInsufficientPrivilege = "42501";
constexpr std::string_view kLockNotAvailable = "55P03";
constexpr std::string_view kReadOnlyTransaction = "25006";
constexpr std::string_view kQueryCanceled = "57014";

/// Key of the transaction-scoped advisory lock that serialises creating and upgrading the tables ("sprf").
constexpr const char* kSchemaLockKey = "1936748646";

/// Text from libpq or the server in one line: line breaks and tabs become "; " and spaces, the end trimmed.
std::string one_line(std::string text) {
  std::string out;
  bool pending_break = false;
  for (char c : text) {
    if (c == '\n' || c == '\r') {
      pending_break = !out.empty();
      continue;
    }
    if (c == '\t') c = ' ';
    if (pending_break) {
      while (!out.empty() && out.back() == ' ') out.pop_back();
      if (!out.empty() && out.back() != ':' && out.back() != ';') out += ";";
      out += " ";
      pending_break = false;
      if (c == ' ') continue;
    }
    if (c == ' ' && !out.empty() && out.back() == ' ') continue;
    out.push_back(c);
  }
  while (!out.empty() && (out.back() == ' ' || out.back() == ';')) out.pop_back();
  return out;
}

struct ResultDeleter {
  void operator()(PGresult* r) const { PQclear(r); }
};
using Result = std::unique_ptr<PGresult, ResultDeleter>;

struct ConnectionDeleter {
  void operator()(PGconn* c) const { PQfinish(c); }
};

/// A statement parameter: text, or NULL.
using Param = std::optional<std::string>;

/// NaN as NULL, infinities by PostgreSQL's names, any other number in the shortest form that reads back exactly.
Param number_param(double x) {
  if (std::isnan(x)) return std::nullopt;
  if (std::isinf(x)) return std::string(x > 0 ? "Infinity" : "-Infinity");
  return fmt::format("{}", x);
}

/// A double precision column as text (PostgreSQL 12+ writes the shortest exact form), NULL as NaN.
double number_of(const PGresult* r, int row, int column) {
  if (PQgetisnull(r, row, column)) return std::numeric_limits<double>::quiet_NaN();
  const std::string_view text = PQgetvalue(r, row, column);
  if (text == "Infinity") return std::numeric_limits<double>::infinity();
  if (text == "-Infinity") return -std::numeric_limits<double>::infinity();
  if (text == "NaN") return std::numeric_limits<double>::quiet_NaN();
  double value = 0;
  const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
  if (ec != std::errc() || end != text.data() + text.size()) return std::numeric_limits<double>::quiet_NaN();
  return value;
}

long long integer_of(const PGresult* r, int row, int column) {
  return std::strtoll(PQgetvalue(r, row, column), nullptr, 10);
}

std::string text_of(const PGresult* r, int row, int column) {
  return std::string(PQgetvalue(r, row, column), static_cast<std::size_t>(PQgetlength(r, row, column)));
}

/// One connection; every error it raises names the database without a password, in one line.
class Connection {
 public:
  Connection(const std::string& uri) : uri_(uri), name_(display_name(uri)) {
    char* parse_error = nullptr;
    PQconninfoOption* parsed = PQconninfoParse(uri.c_str(), &parse_error);
    if (parsed == nullptr) {
      const std::string why = parse_error ? parse_error : "out of memory";
      PQfreemem(parse_error);
      fail("malformed connection URI: " + why +
           " (expected postgresql://[user@][host][:port][/database][?parameter=value&...])");
    }
    PQconninfoFree(parsed);
    // Defaults first: the URI (expanded from dbname) overrides any of them.
    const char* const keywords[] = {"connect_timeout", "keepalives_idle", "keepalives_interval", "keepalives_count",
                                    "fallback_application_name", "client_encoding", "dbname", nullptr};
    const char* const values[] = {"10", "15", "5", "3", "spreadfit", "UTF8", uri.c_str(), nullptr};
    connection_.reset(PQconnectdbParams(keywords, values, /*expand_dbname=*/1));
    if (!connection_) fail("cannot connect to the history server: out of memory");
    if (PQstatus(get()) != CONNECTION_OK)
      fail("cannot connect to the history server: " + std::string(PQerrorMessage(get())) + connect_hint());
    // Server notices (e.g. of CREATE) would reach stderr through libpq's default processor: outputs stay ours.
    PQsetNoticeProcessor(get(), [](void*, const char*) {}, nullptr);
  }

  PGconn* get() const { return connection_.get(); }
  const std::string& name() const { return name_; }

  [[noreturn]] void fail(const std::string& message) const {
    throw io::InputError(name_, 0, "", one_line(without_passwords(message, uri_)));
  }

  /// Runs `sql` with text parameters $1, $2, ...; returns its rows (or none). Throws on any error, saying what
  /// was being done and, for a lost connection, what became of the result.
  Result exec(const std::string& sql, const std::vector<Param>& params, std::string_view doing) const {
    std::vector<const char*> values;
    for (const Param& p : params) values.push_back(p ? p->c_str() : nullptr);
    Result r(PQexecParams(get(), sql.c_str(), static_cast<int>(values.size()), nullptr, values.data(), nullptr,
                          nullptr, 0));
    const ExecStatusType status = r ? PQresultStatus(r.get()) : PGRES_FATAL_ERROR;
    if (status == PGRES_COMMAND_OK || status == PGRES_TUPLES_OK) return r;
    raise(r.get(), doing);
  }
  /// Runs SQL without parameters, possibly several statements (the simple query protocol).
  void run(const char* sql, std::string_view doing) const {
    Result r(PQexec(get(), sql));
    const ExecStatusType status = r ? PQresultStatus(r.get()) : PGRES_FATAL_ERROR;
    if (status == PGRES_COMMAND_OK || status == PGRES_TUPLES_OK) return;
    raise(r.get(), doing);
  }

  /// What a write in progress loses when the connection goes: set by the transaction around record().
  std::string on_lost = "";

 private:
  [[noreturn]] void raise(const PGresult* r, std::string_view doing) const {
    const char* state = r ? PQresultErrorField(r, PG_DIAG_SQLSTATE) : nullptr;
    const char* primary = r ? PQresultErrorField(r, PG_DIAG_MESSAGE_PRIMARY) : nullptr;
    const std::string code = state ? state : "";
    const std::string what = primary ? primary : PQerrorMessage(get());
    const bool lost = PQstatus(get()) != CONNECTION_OK || code.rfind("08", 0) == 0 || code.rfind("57P", 0) == 0;
    if (lost)
      fail(fmt::format("batch history: the connection to the server was lost while {} ({}){}", doing, what,
                       on_lost));
    std::string hint;
    const std::string role = PQuser(get()) ? PQuser(get()) : "";
    if (code == kInsufficientPrivilege)
      hint = what.find("row-level security") != std::string::npos
                 ? fmt::format(" (the role '{}' may not write results of this site; a lab role records its own "
                               "site's results, set by [sample] site or {})",
                               role, site_environment_variable)
                 : fmt::format(" (the role '{}' has no permission for this; a reader role may only read the history)",
                               role);
    else if (code == kLockNotAvailable || code == kQueryCanceled)
      hint = fmt::format(" (another process held the history locked for more than {} s)", busy_timeout_ms / 1000);
    else if (code == kReadOnlyTransaction)
      hint = " (the server or the role only allows reading)";
    fail(fmt::format("batch history: {}: {}{}{}", doing, what, hint,
                     on_lost.empty() ? std::string() : "; nothing of this result was recorded"));
  }

  std::string connect_hint() const {
    const std::string message = PQerrorMessage(get());
    if (message.find("password authentication failed") != std::string::npos ||
        message.find("no password supplied") != std::string::npos)
      return " (check the user and the password in ~/.pgpass, PGPASSWORD or the URI)";
    if (message.find("does not exist") != std::string::npos)
      return " (expected an existing database; the database owner creates it with CREATE DATABASE)";
    if (message.find("could not translate host name") != std::string::npos)
      return " (check the host name in the URI or PGHOST)";
    if (message.find("Connection refused") != std::string::npos ||
        message.find("No such file or directory") != std::string::npos || message.find("timeout") != std::string::npos)
      return " (is the server running and reachable?)";
    return "";
  }

  std::string uri_, name_;
  std::unique_ptr<PGconn, ConnectionDeleter> connection_;
};

/// A transaction rolled back on destruction unless committed (and by the server if the connection goes).
class Transaction {
 public:
  Transaction(Connection& c, const char* begin, std::string on_lost) : c_(c) {
    c_.on_lost = std::move(on_lost);
    c_.run(begin, "starting a transaction");
    open_ = true;
  }
  ~Transaction() {
    if (open_ && PQstatus(c_.get()) == CONNECTION_OK) PQclear(PQexec(c_.get(), "ROLLBACK"));
    c_.on_lost.clear();
  }
  Transaction(const Transaction&) = delete;
  Transaction& operator=(const Transaction&) = delete;
  void commit(std::string on_lost) {
    c_.on_lost = std::move(on_lost);
    c_.run("COMMIT", "committing the transaction");
    open_ = false;
  }

 private:
  Connection& c_;
  bool open_ = false;
};

/// The schema found: its version (0 = no tables yet).
int check_schema(const Connection& c) {
  const Result found = c.exec(
      "SELECT to_regclass('spreadfit_schema') IS NOT NULL, "
      "to_regclass('results') IS NOT NULL AND to_regclass('parameters') IS NOT NULL, "
      "(SELECT count(*) FROM pg_catalog.pg_tables WHERE schemaname = current_schema()), "
      "coalesce(current_schema(), '')",
      {}, "reading the schema version");
  const bool has_version_table = std::string_view(PQgetvalue(found.get(), 0, 0)) == "t";
  const bool has_tables = std::string_view(PQgetvalue(found.get(), 0, 1)) == "t";
  const long long tables = integer_of(found.get(), 0, 2);
  const std::string schema = text_of(found.get(), 0, 3);
  if (!has_version_table) {
    if (tables == 0 && !has_tables) return 0;
    c.fail(fmt::format("not a spreadfit history database: schema '{}' holds {} table{} of another program and no "
                       "table spreadfit_schema (expected a database written by 'spreadfit fit --db', or an empty "
                       "one; another schema can be chosen with ?options=-csearch_path%3DNAME)",
                       schema, tables, tables == 1 ? "" : "s"));
  }
  const Result version = c.exec("SELECT max(version) FROM spreadfit_schema", {}, "reading the schema version");
  if (PQgetisnull(version.get(), 0, 0))
    c.fail("not a spreadfit history database: the table spreadfit_schema holds no version");
  const long long v = integer_of(version.get(), 0, 0);
  if (v > schema_version)
    c.fail(fmt::format("the history was written by a later spreadfit (schema version {}; this version reads up to "
                       "{}); use that version or a later one",
                       v, schema_version));
  if (v < 1 || !has_tables)
    c.fail(fmt::format("not a spreadfit history database: schema version {} but without the tables 'results' and "
                       "'parameters'",
                       v));
  return static_cast<int>(v);
}

constexpr const char* kCreateSchema = R"sql(
CREATE TABLE spreadfit_schema (version integer NOT NULL);
INSERT INTO spreadfit_schema (version) VALUES (2);
CREATE TABLE results (
  id               bigint GENERATED BY DEFAULT AS IDENTITY PRIMARY KEY,
  input_hash       text NOT NULL UNIQUE,
  sample_id        text NOT NULL,
  product          text NOT NULL,
  rig              text NOT NULL,
  law              text NOT NULL,
  verdict          text NOT NULL CHECK (verdict IN ('pass', 'fail', 'none')),
  software_version text NOT NULL,
  recorded_at      text NOT NULL,
  result_json      text NOT NULL,
  site             text NOT NULL DEFAULT '',
  tested           text NOT NULL DEFAULT ''
);
CREATE INDEX results_by_product ON results (product, id);
CREATE TABLE parameters (
  result_id bigint NOT NULL REFERENCES results (id) ON DELETE CASCADE,
  position  integer NOT NULL,
  name      text NOT NULL,
  value     double precision,
  low       double precision,
  high      double precision,
  unit      text NOT NULL,
  PRIMARY KEY (result_id, position),
  UNIQUE (result_id, name)
);
)sql";

/// Version 1 -> 2, as on SQLite: a result's site and test time.
constexpr const char* kUpgradeFrom1 = R"sql(
ALTER TABLE results ADD COLUMN site text NOT NULL DEFAULT '', ADD COLUMN tested text NOT NULL DEFAULT '';
UPDATE spreadfit_schema SET version = 2;
)sql";
static_assert(schema_version == 2, "kCreateSchema and kUpgradeFrom1 write version 2");

class PostgresHistory final : public HistoryStore {
 public:
  PostgresHistory(const std::string& uri, Access access) : c_(uri), access_(access) {}

  const std::string& name() const override { return c_.name(); }

  WriteOutcome record(const StoredResult& r) override {
    if (access_ != Access::Write) c_.fail("batch history: opened for reading only");
    Transaction t(c_, "BEGIN ISOLATION LEVEL READ COMMITTED", "; nothing of this result was recorded");
    c_.exec("SELECT set_config('lock_timeout', $1, true)", {fmt::format("{}ms", busy_timeout_ms)},
            "setting the lock timeout");
    int version = check_schema(c_);
    if (version < schema_version) {
      c_.exec(std::string("SELECT pg_advisory_xact_lock(") + kSchemaLockKey + ")", {},
              "waiting for another writer creating the tables");
      version = check_schema(c_);  // a racing first writer may have created them meanwhile
      if (version == 0) c_.run(kCreateSchema, "creating the history tables");
      if (version == 1) c_.run(kUpgradeFrom1, "upgrading the history from schema version 1 to 2");
    }

    const std::string find_sql = "SELECT id FROM results WHERE input_hash = $1 FOR UPDATE";
    std::optional<std::string> id;
    bool inserted = false;
    {
      const Result found = c_.exec(find_sql, {r.input_hash}, "looking up the input hash");
      if (PQntuples(found.get()) > 0) id = text_of(found.get(), 0, 0);
    }
    const std::string recorded_at = r.recorded_at.empty() ? utc_now_iso8601() : r.recorded_at;
    std::vector<Param> fields = {r.input_hash, r.sample_id, r.product, r.rig, r.law, r.verdict, r.software_version,
                                 recorded_at, r.result_json, r.site, r.tested};
    if (!id) {
      const Result added = c_.exec(
          "INSERT INTO results (input_hash, sample_id, product, rig, law, verdict, software_version, recorded_at, "
          "result_json, site, tested) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11) "
          "ON CONFLICT (input_hash) DO NOTHING RETURNING id",
          fields, "adding the result");
      if (PQntuples(added.get()) > 0) {
        id = text_of(added.get(), 0, 0);
        inserted = true;
      } else {
        // Another writer committed the same inputs after our look-up: replace its row.
        const Result found = c_.exec(find_sql, {r.input_hash}, "looking up the input hash");
        if (PQntuples(found.get()) == 0)
          c_.fail(fmt::format("batch history: the same inputs as {} are recorded for another site, and the role '{}' "
                              "may not replace them; nothing of this result was recorded",
                              r.sample_id, PQuser(c_.get())));
        id = text_of(found.get(), 0, 0);
      }
    }
    if (!inserted) {
      std::vector<Param> update = fields;
      update.push_back(*id);
      c_.exec("UPDATE results SET input_hash = $1, sample_id = $2, product = $3, rig = $4, law = $5, verdict = $6, "
              "software_version = $7, recorded_at = $8, result_json = $9, site = $10, tested = $11 WHERE id = $12",
              update, "replacing the earlier result of the same inputs");
      c_.exec("DELETE FROM parameters WHERE result_id = $1", {*id}, "removing the earlier result's parameters");
    }
    int position = 0;
    for (const auto& [pname, value, low, high, unit] : r.parameters)
      c_.exec("INSERT INTO parameters (result_id, position, name, value, low, high, unit) "
              "VALUES ($1, $2, $3, $4, $5, $6, $7)",
              {*id, std::to_string(position++), pname, number_param(value), number_param(low), number_param(high),
               unit},
              "adding the result's parameters");
    t.commit("; the result may or may not have been recorded (fitting it again replaces it)");
    return inserted ? WriteOutcome::Inserted : WriteOutcome::Updated;
  }

  std::vector<StoredResult> load(const HistoryFilter& filter) override {
    Transaction t(c_, "BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY", "");
    std::vector<StoredResult> out;
    const int version = check_schema(c_);
    if (version == 0) return out;  // an empty database: no history yet
    const std::string extra = version >= 2 ? "r.site, r.tested" : "'', ''";
    const std::string site = version >= 2 ? "r.site" : "''";
    const std::string where = " WHERE ($1 = '' OR r.product = $1) AND ($2 = '' OR " + site + " = $2)";
    const std::vector<Param> params = {filter.product, filter.site};
    std::map<long long, std::size_t> index;
    {
      const Result rows = c_.exec(
          "SELECT r.id, r.sample_id, r.product, r.rig, r.law, r.verdict, r.input_hash, r.software_version, "
          "r.recorded_at, r.result_json, " + extra + " FROM results r" + where + " ORDER BY r.id",
          params, "reading the results");
      const int n = PQntuples(rows.get());
      out.reserve(static_cast<std::size_t>(n));
      for (int i = 0; i < n; ++i) {
        StoredResult s;
        s.sample_id = text_of(rows.get(), i, 1);
        s.product = text_of(rows.get(), i, 2);
        s.rig = text_of(rows.get(), i, 3);
        s.law = text_of(rows.get(), i, 4);
        s.verdict = text_of(rows.get(), i, 5);
        s.input_hash = text_of(rows.get(), i, 6);
        s.software_version = text_of(rows.get(), i, 7);
        s.recorded_at = text_of(rows.get(), i, 8);
        s.result_json = text_of(rows.get(), i, 9);
        s.site = text_of(rows.get(), i, 10);
        s.tested = text_of(rows.get(), i, 11);
        index[integer_of(rows.get(), i, 0)] = out.size();
        out.push_back(std::move(s));
      }
    }
    const Result ps = c_.exec("SELECT p.result_id, p.name, p.value, p.low, p.high, p.unit FROM parameters p "
                              "JOIN results r ON r.id = p.result_id" + where + " ORDER BY p.result_id, p.position",
                              params, "reading the parameters");
    const int n = PQntuples(ps.get());
    for (int i = 0; i < n; ++i) {
      const auto it = index.find(integer_of(ps.get(), i, 0));
      if (it == index.end()) continue;  // cannot happen inside one snapshot; never attach to the wrong result
      out[it->second].parameters.emplace_back(text_of(ps.get(), i, 1), number_of(ps.get(), i, 2),
                                              number_of(ps.get(), i, 3), number_of(ps.get(), i, 4),
                                              text_of(ps.get(), i, 5));
    }
    t.commit("");
    return out;
  }

  std::vector<std::string> products() override { return distinct(false); }
  std::vector<std::string> sites() override { return distinct(true); }

 private:
  std::vector<std::string> distinct(bool sites) {
    Transaction t(c_, "BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY", "");
    std::vector<std::string> out;
    const int version = check_schema(c_);
    if (version == 0) return out;
    const std::string column = sites ? (version >= 2 ? "site" : "''::text") : "product";
    const Result r = c_.exec("SELECT DISTINCT " + column + " FROM results", {}, "listing the codes");
    for (int i = 0; i < PQntuples(r.get()); ++i) out.push_back(text_of(r.get(), i, 0));
    t.commit("");
    std::sort(out.begin(), out.end());  // byte order, as on SQLite, whatever the server's collation
    return out;
  }

  Connection c_;
  Access access_;
};

}  // namespace

std::unique_ptr<HistoryStore> open_postgres_history(const std::string& uri, Access access) {
  return std::make_unique<PostgresHistory>(uri, access);
}

}  // namespace spreadfit::history
