// Schema version 2 on SQLite (site, tested, the version row): an older history is upgraded in place by a writer,
// read as it is by a reader; and the canonical form of [sample] tested (ISO 8601-1:2019 calendar dates and times).
#include <doctest/doctest.h>
#include <sqlite3.h>

#include <string>

#include "src/history/file_hash.hpp"
#include "src/history/history_db.hpp"
#include "src/io/test_time.hpp"
#include "tests/io/io_test_support.hpp"

namespace {

using spreadfit::io::test::TempDir;

void exec(const std::string& file, const char* sql) {
  sqlite3* c = nullptr;
  REQUIRE(sqlite3_open(file.c_str(), &c) == SQLITE_OK);
  char* error = nullptr;
  const int rc = sqlite3_exec(c, sql, nullptr, nullptr, &error);
  INFO((error ? error : ""));
  sqlite3_free(error);
  sqlite3_close(c);
  REQUIRE(rc == SQLITE_OK);
}

}  // namespace

TEST_CASE("a version-1 SQLite history is read as it is and upgraded in place by the next writer") {
  TempDir dir;
  const std::string file = (dir.path() / "old.db").string();
  // The version-1 layout, as spreadfit 0.1 wrote it (the tables without site and tested).
  exec(file, R"sql(
CREATE TABLE results (id INTEGER PRIMARY KEY, input_hash TEXT NOT NULL UNIQUE, sample_id TEXT NOT NULL,
  product TEXT NOT NULL, rig TEXT NOT NULL, law TEXT NOT NULL, verdict TEXT NOT NULL, software_version TEXT NOT NULL,
  recorded_at TEXT NOT NULL, result_json TEXT NOT NULL);
CREATE TABLE parameters (result_id INTEGER NOT NULL, position INTEGER NOT NULL, name TEXT NOT NULL, value REAL,
  low REAL, high REAL, unit TEXT NOT NULL, PRIMARY KEY (result_id, position));
INSERT INTO results VALUES (1, 'h1', 'OLD-1', 'TS12', 'plate', 'bingham', 'pass', '0.0.9', '2025-01-01T00:00:00Z', '{}');
INSERT INTO parameters VALUES (1, 0, 'yield_stress', 21.5, 20.0, 23.0, 'Pa');
PRAGMA user_version = 1;
)sql");
  const auto before = spreadfit::history::load(file, "");
  REQUIRE(before.size() == 1);
  CHECK(before[0].sample_id == "OLD-1");
  CHECK(before[0].site.empty());

  spreadfit::history::StoredResult r = before[0];
  r.sample_id = "NEW-1";
  r.input_hash = spreadfit::history::sha256_hex("new");
  r.site = "RH";
  r.tested = "2026-04-12T10:30";
  CHECK(spreadfit::history::record(file, r) == spreadfit::history::WriteOutcome::Inserted);
  const auto after = spreadfit::history::load(file, spreadfit::history::HistoryFilter{"", "RH"});
  REQUIRE(after.size() == 1);
  CHECK(after[0].tested == "2026-04-12T10:30");
  CHECK(spreadfit::history::load(file, "").size() == 2);  // the old row kept, with no site
}

TEST_CASE("[sample] tested is written in one canonical form, offsets converted to UTC") {
  std::string why;
  // ISO 8601-1:2019: local time minus the UTC offset is UTC (4.3.13); 2024 is a leap year (Gregorian rule).
  CHECK(spreadfit::io::canonical_test_time("2026-04-12", why) == "2026-04-12");
  CHECK(spreadfit::io::canonical_test_time("2026-04-12 10:30", why) == "2026-04-12T10:30");
  CHECK(spreadfit::io::canonical_test_time("2026-04-12T10:30:15Z", why) == "2026-04-12T10:30:15Z");
  CHECK(spreadfit::io::canonical_test_time("2026-04-12T01:30+02:00", why) == "2026-04-11T23:30Z");
  CHECK(spreadfit::io::canonical_test_time("2026-12-31T22:00-05:00", why) == "2027-01-01T03:00Z");
  CHECK(spreadfit::io::canonical_test_time("2024-02-29T08:00", why) == "2024-02-29T08:00");
  CHECK_FALSE(spreadfit::io::canonical_test_time("2025-02-29", why));
  CHECK(why == "2025-02 has no day 29");
  CHECK_FALSE(spreadfit::io::canonical_test_time("2026-13-01", why));
  CHECK(why == "month 13 is not 1 to 12");
  CHECK_FALSE(spreadfit::io::canonical_test_time("12/04/2026", why));
  CHECK_FALSE(spreadfit::io::canonical_test_time("2026-04-12T24:00", why));
}
