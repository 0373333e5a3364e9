// The batch history: SHA-256 against the FIPS 180-4 examples, input hashes that follow the bytes, a database that
// round-trips results, replaces a re-run instead of duplicating it, runs in WAL mode, loses nothing when several
// processes write at once, and refuses files that are not its own; and the history command's table and CSV.
#include <doctest/doctest.h>
#include <fmt/format.h>
#include <sqlite3.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdint>
#include <filesystem>
#include <limits>
#include <nlohmann/json.hpp>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "src/cli/history_command.hpp"
#include "src/history/file_hash.hpp"
#include "src/history/history_db.hpp"
#include "src/io/description_file.hpp"
#include "tests/io/io_test_support.hpp"

namespace fs = std::filesystem;
using spreadfit::history::StoredResult;
using spreadfit::history::WriteOutcome;
using spreadfit::io::test::input_error_of;
using spreadfit::io::test::TempDir;

namespace {

StoredResult sample_result(const std::string& id, const std::string& product, double yield_stress) {
  StoredResult r;
  r.sample_id = id;
  r.product = product;
  r.rig = "channel";
  r.law = "herschel-bulkley";
  r.verdict = "pass";
  r.input_hash = spreadfit::history::sha256_hex("inputs of " + id);
  r.software_version = "test";
  r.recorded_at = "2025-01-02T03:04:05Z";
  r.parameters = {{"yield_stress", yield_stress, yield_stress - 1.5, yield_stress + 1.5, "Pa"},
                  {"consistency", 3.25, 2.75, 3.75, "Pa.s^n"},
                  {"flow_index", 0.5, 0.45, 0.55, "-"}};
  r.result_json = R"({"sample":{"id":")" + id + R"("}})";
  return r;
}

void check_same(const StoredResult& a, const StoredResult& b) {
  CHECK(a.sample_id == b.sample_id);
  CHECK(a.product == b.product);
  CHECK(a.rig == b.rig);
  CHECK(a.law == b.law);
  CHECK(a.verdict == b.verdict);
  CHECK(a.input_hash == b.input_hash);
  CHECK(a.software_version == b.software_version);
  CHECK(a.recorded_at == b.recorded_at);
  CHECK(a.result_json == b.result_json);
  CHECK(a.parameters == b.parameters);  // doubles compared exactly: SQLite REAL holds the same IEEE double
}

std::string sql_text(const fs::path& db, const std::string& sql) {
  sqlite3* c = nullptr;
  REQUIRE(sqlite3_open_v2(db.c_str(), &c, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK);
  sqlite3_stmt* s = nullptr;
  REQUIRE_MESSAGE(sqlite3_prepare_v2(c, sql.c_str(), -1, &s, nullptr) == SQLITE_OK, sqlite3_errmsg(c));
  REQUIRE(sqlite3_step(s) == SQLITE_ROW);
  std::string text(reinterpret_cast<const char*>(sqlite3_column_text(s, 0)));
  sqlite3_finalize(s);
  sqlite3_close(c);
  return text;
}

const std::string kToml = R"(
[sample]
id = "HX1-0001"
product = "HX1"
density = "1.05 g/mL"
[rig]
kind = "plate"
ring_radius = "3 cm"
volume = "50 mL"
[readings]
files = ["a.csv", "b.csv"]
)";
const std::string kCsvA = "time [s],radius [cm]\n1,3.2\n2,3.9\n4,4.4\n";
const std::string kCsvB = "time [s],radius [cm]\n1,3.1\n2,3.8\n4,4.5\n";

}  // namespace

TEST_CASE("SHA-256 gives the digests of the FIPS 180-4 example messages") {
  using spreadfit::history::sha256_hex;
  SUBCASE("one block: abc") {
    CHECK(sha256_hex("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  }
  SUBCASE("two blocks: a 448-bit message whose length field spills into a second block") {
    CHECK(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq") ==
          "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  }
  SUBCASE("one million times 'a'") {
    CHECK(sha256_hex(std::string(1000000, 'a')) ==
          "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
  }
  SUBCASE("the empty message") {
    CHECK(sha256_hex("") == "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  }
}

TEST_CASE("SHA-256 does not depend on how the message is split into pieces") {
  std::mt19937 draw(20250101);
  std::string message(3000, '\0');
  for (char& c : message) c = static_cast<char>(draw() & 0xff);
  const std::string whole = spreadfit::history::sha256_hex(message);
  for (int trial = 0; trial < 20; ++trial) {
    spreadfit::history::Sha256 h;
    std::size_t at = 0, pieces = 0;
    while (at < message.size()) {
      const std::size_t n = std::min<std::size_t>(message.size() - at, draw() % 130);
      h.update(std::string_view(message).substr(at, n));
      at += n;
      ++pieces;
    }
    INFO("trial " << trial << ", " << pieces << " pieces");
    CHECK(spreadfit::history::to_hex(h.digest()) == whole);
  }
}

TEST_CASE("the input hash follows every byte of the TOML and the readings files, and not their names") {
  TempDir dir;
  const fs::path toml = dir.write("t/test.toml", kToml);
  dir.write("t/a.csv", kCsvA);
  dir.write("t/b.csv", kCsvB);
  const auto test = spreadfit::io::load_test_description(toml);
  const auto files = spreadfit::history::input_files(test);
  REQUIRE(files.size() == 3);
  CHECK(fs::equivalent(files[0], toml));
  CHECK(fs::equivalent(files[1], dir.path() / "t/a.csv"));
  CHECK(fs::equivalent(files[2], dir.path() / "t/b.csv"));
  const std::string original = spreadfit::history::input_hash(test);
  CHECK(original.size() == 64);
  CHECK(original.find_first_not_of("0123456789abcdef") == std::string::npos);

  SUBCASE("one changed reading byte changes the hash") {
    std::string changed = kCsvB;
    changed[changed.size() - 2] = '6';  // 4.5 -> 4.6
    dir.write("t/b.csv", changed);
    CHECK(spreadfit::history::input_hash(test) != original);
    dir.write("t/b.csv", kCsvB);
    CHECK(spreadfit::history::input_hash(test) == original);
  }
  SUBCASE("a changed TOML byte changes the hash") {
    std::string changed = kToml;
    changed.replace(changed.find("50 mL"), 5, "51 mL");
    dir.write("t/test.toml", changed);
    CHECK(spreadfit::history::input_hash(test) != original);
  }
  SUBCASE("the same files in another folder hash the same") {
    dir.write("u/test.toml", kToml);
    dir.write("u/a.csv", kCsvA);
    dir.write("u/b.csv", kCsvB);
    CHECK(spreadfit::history::input_hash(spreadfit::io::load_test_description(dir.path() / "u/test.toml")) ==
          original);
  }
  SUBCASE("the boundary between files counts: the same bytes split differently hash differently") {
    const fs::path x1 = dir.write("x1", "ab"), x2 = dir.write("x2", "c");
    const fs::path y1 = dir.write("y1", "a"), y2 = dir.write("y2", "bc");
    CHECK(spreadfit::history::input_hash(std::vector<fs::path>{x1, x2}) !=
          spreadfit::history::input_hash(std::vector<fs::path>{y1, y2}));
  }
  SUBCASE("several tests of one material hash the same in any order") {
    const std::string other_toml = std::string(kToml).replace(kToml.find("files = [\"a.csv\", \"b.csv\"]"), 26,
                                                              "file = \"a.csv\"");
    const auto other = spreadfit::io::load_test_description(dir.write("t/other.toml", other_toml));
    const std::string ab = spreadfit::history::input_hash(std::vector{test, other});
    CHECK(ab == spreadfit::history::input_hash(std::vector{other, test}));
    CHECK(ab != original);
    CHECK(ab != spreadfit::history::input_hash(other));
  }
  SUBCASE("a readings file that has gone is an error naming it") {
    fs::remove(dir.path() / "t/a.csv");
    const auto e = input_error_of([&] { (void)spreadfit::history::input_hash(test); });
    CHECK(fs::path(e.file()).filename() == "a.csv");
  }
}

TEST_CASE("a recorded result reads back field for field, in recorded order") {
  TempDir dir;
  const fs::path db = dir.path() / "history.db";
  StoredResult a = sample_result("HX1-0001", "HX1", 24.5);
  StoredResult b = sample_result("HX2-0001", "HX2", 11.0);
  StoredResult c = sample_result("HX1-0002", "HX1", 25.25);
  c.law = "";  // a failed fit: no parameters
  c.parameters.clear();
  c.verdict = "fail";
  b.parameters.emplace_back("viscosity", std::numeric_limits<double>::quiet_NaN(), 0.0,
                            std::numeric_limits<double>::infinity(), "Pa.s");
  CHECK(spreadfit::history::record(db, a) == WriteOutcome::Inserted);
  CHECK(spreadfit::history::record(db, b) == WriteOutcome::Inserted);
  CHECK(spreadfit::history::record(db, c) == WriteOutcome::Inserted);

  const auto all = spreadfit::history::load(db, "");
  REQUIRE(all.size() == 3);
  check_same(all[0], a);
  check_same(all[2], c);
  // NaN is no number (NULL) and reads back as NaN; an infinite bound stays infinite
  REQUIRE(all[1].parameters.size() == 4);
  CHECK(std::isnan(std::get<1>(all[1].parameters[3])));
  CHECK(std::get<3>(all[1].parameters[3]) == std::numeric_limits<double>::infinity());

  const auto hx1 = spreadfit::history::load(db, "HX1");
  REQUIRE(hx1.size() == 2);
  check_same(hx1[0], a);
  check_same(hx1[1], c);
  CHECK(spreadfit::history::load(db, "ZZ9").empty());
  CHECK(spreadfit::history::products(db) == std::vector<std::string>{"HX1", "HX2"});
}

TEST_CASE("recording the same inputs again replaces the earlier row and its parameters instead of adding one") {
  TempDir dir;
  const fs::path db = dir.path() / "history.db";
  const StoredResult first = sample_result("HX1-0001", "HX1", 24.5);
  const StoredResult other = sample_result("HX1-0002", "HX1", 26.0);
  REQUIRE(spreadfit::history::record(db, first) == WriteOutcome::Inserted);
  REQUIRE(spreadfit::history::record(db, other) == WriteOutcome::Inserted);
  StoredResult again = first;  // same input hash: a re-run, here with another law and fewer parameters
  again.law = "bingham";
  again.parameters = {{"yield_stress", 23.0, 22.0, 24.0, "Pa"}, {"viscosity", 1.5, 1.25, 1.75, "Pa.s"}};
  again.software_version = "test-2";
  again.recorded_at = "2025-02-03T04:05:06Z";
  CHECK(spreadfit::history::record(db, again) == WriteOutcome::Updated);

  const auto all = spreadfit::history::load(db, "");
  REQUIRE(all.size() == 2);
  check_same(all[0], again);  // keeps its place in the recorded order
  check_same(all[1], other);
  CHECK(sql_text(db, "SELECT count(*) FROM parameters") == "5");  // 2 of the re-run + 3 of the other
}

TEST_CASE("the history database runs in WAL mode with a versioned schema") {
  TempDir dir;
  const fs::path db = dir.path() / "history.db";
  spreadfit::history::record(db, sample_result("HX1-0001", "HX1", 24.5));
  CHECK(sql_text(db, "PRAGMA journal_mode") == "wal");
  CHECK(sql_text(db, "PRAGMA user_version") == std::to_string(spreadfit::history::schema_version));
}

TEST_CASE("four processes writing one history at the same time lose nothing and never duplicate a result") {
  constexpr int kWriters = 4;
  constexpr int kEach = 25;
  constexpr int kShared = 5;  // each writer also records one common result this many times
  TempDir dir;
  const fs::path db = dir.path() / "history.db";  // does not exist yet: the writers race to create it
  int start[2];
  REQUIRE(::pipe(start) == 0);
  std::vector<pid_t> children;
  for (int w = 0; w < kWriters; ++w) {
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
      // Child: wait for the start signal (the pipe closing), write, report through the exit status how many
      // times the common result was inserted rather than updated; 100 + means an error. No doctest macros here.
      ::close(start[1]);
      char byte;
      while (::read(start[0], &byte, 1) > 0) {
      }
      int inserted = 0;
      try {
        for (int k = 0; k < kEach; ++k) {
          // Appended rather than "W" + std::to_string(w): GCC 12 warns falsely (-Wrestrict) on that insert.
          std::string id = "W", product = "P";
          id += std::to_string(w) + "-" + std::to_string(k);
          product += std::to_string(w % 2);
          spreadfit::history::record(db, sample_result(id, product, 20.0 + k));
          if (k % (kEach / kShared) == 0)
            inserted += spreadfit::history::record(db, sample_result("COMMON", "P0", 30.0)) == WriteOutcome::Inserted;
        }
      } catch (const std::exception& e) {
        std::fprintf(stderr, "writer %d: %s\n", w, e.what());
        ::_exit(100);
      }
      ::_exit(inserted);
    }
    children.push_back(pid);
  }
  ::close(start[0]);
  ::close(start[1]);  // all writers start now
  int inserted_common = 0;
  for (const pid_t pid : children) {
    int status = 0;
    REQUIRE(::waitpid(pid, &status, 0) == pid);
    REQUIRE(WIFEXITED(status));
    INFO("writer exit status " << WEXITSTATUS(status));
    REQUIRE(WEXITSTATUS(status) < 100);
    inserted_common += WEXITSTATUS(status);
  }
  const auto all = spreadfit::history::load(db, "");
  CHECK(all.size() == kWriters * kEach + 1);
  CHECK(inserted_common == 1);  // inserted once, then updated by every other attempt
  std::set<std::string> ids;
  for (const auto& r : all) {
    ids.insert(r.sample_id);
    CHECK(r.parameters.size() == 3);
  }
  CHECK(ids.size() == kWriters * kEach + 1);
  CHECK(sql_text(db, "SELECT count(*) FROM parameters") == std::to_string(3 * (kWriters * kEach + 1)));
}

TEST_CASE("files that are not a spreadfit history are refused with an error naming them, and left unchanged") {
  TempDir dir;
  SUBCASE("a text file") {
    const std::string text = "sample,value\nHX1-0001,24.5\n" + std::string(600, 'x') + "\n";
    const fs::path file = dir.write("notes.csv", text);
    const auto on_write = input_error_of([&] { spreadfit::history::record(file, sample_result("A", "P", 1)); });
    CHECK(on_write.file() == file.string());
    CHECK(on_write.message() ==
          "not a spreadfit history database: file is not a database (expected a history written by 'spreadfit fit "
          "--db', or the name of a file to create)");
    const auto on_read = input_error_of([&] { (void)spreadfit::history::load(file, ""); });
    CHECK(on_read.file() == file.string());
    CHECK(on_read.message() == on_write.message());
    std::ifstream in(file, std::ios::binary);
    CHECK(std::string(std::istreambuf_iterator<char>(in), {}) == text);
  }
  SUBCASE("another program's SQLite database") {
    const fs::path file = dir.path() / "other.db";
    sqlite3* c = nullptr;
    REQUIRE(sqlite3_open(file.c_str(), &c) == SQLITE_OK);
    REQUIRE(sqlite3_exec(c, "CREATE TABLE orders (id INTEGER)", nullptr, nullptr, nullptr) == SQLITE_OK);
    sqlite3_close(c);
    const auto e = input_error_of([&] { spreadfit::history::record(file, sample_result("A", "P", 1)); });
    CHECK(e.file() == file.string());
    CHECK(e.message().find("SQLite database of another program") != std::string::npos);
    CHECK(sql_text(file, "SELECT count(*) FROM sqlite_master") == "1");
    CHECK(sql_text(file, "PRAGMA journal_mode") == "delete");  // not switched to WAL either
  }
  SUBCASE("a history of a later schema version") {
    const fs::path file = dir.path() / "later.db";
    spreadfit::history::record(file, sample_result("A", "P", 1));
    sqlite3* c = nullptr;
    REQUIRE(sqlite3_open(file.c_str(), &c) == SQLITE_OK);
    REQUIRE(sqlite3_exec(c, "PRAGMA user_version = 99", nullptr, nullptr, nullptr) == SQLITE_OK);
    sqlite3_close(c);
    const auto e = input_error_of([&] { (void)spreadfit::history::load(file, ""); });
    CHECK(e.message() ==
          "the history was written by a later spreadfit (schema version 99; this version reads up to 2); use that "
          "version or a later one");
  }
  SUBCASE("a missing file is not created by reading") {
    const fs::path file = dir.path() / "missing.db";
    const auto e = input_error_of([&] { (void)spreadfit::history::load(file, ""); });
    CHECK(e.file() == file.string());
    CHECK(e.message() == "no such history database (expected a file written by 'spreadfit fit --db')");
    CHECK_FALSE(fs::exists(file));
  }
  SUBCASE("a folder that does not exist") {
    const fs::path file = dir.path() / "no-such-folder" / "history.db";
    const auto e = input_error_of([&] { spreadfit::history::record(file, sample_result("A", "P", 1)); });
    CHECK(e.file() == file.string());
    CHECK(e.message().rfind("batch history: opening the history database: ", 0) == 0);
  }
}

TEST_CASE("a fit outcome becomes a stored result with its material parameters, verdict and input hash") {
  TempDir dir;
  const fs::path toml = dir.write("test.toml", kToml);
  dir.write("a.csv", kCsvA);
  dir.write("b.csv", kCsvB);
  spreadfit::report::FitOutcome o;
  o.tests.push_back(spreadfit::io::load_test_description(toml));
  spreadfit::fit::FitResult r;
  r.law = spreadfit::Law::Bingham;
  r.status = spreadfit::fit::FitStatus::Converged;
  r.parameters = {{"yield_stress", "Pa", 24.0, 22.0, 26.0, false, true},
                  {"viscosity", "Pa.s", 1.5, 1.25, 1.75, false, true},
                  {"time_origin", "s", 0.1, 0.0, 0.2, false, true},
                  {"time_origin", "s", 0.2, 0.1, 0.3, false, true}};
  o.candidates.push_back(r);
  o.chosen = 0;
  o.verdict.status = spreadfit::qc::Verdict::Status::Pass;

  const StoredResult s = spreadfit::history::stored_result(o);
  CHECK(s.sample_id == "HX1-0001");
  CHECK(s.product == "HX1");
  CHECK(s.rig == "plate");
  CHECK(s.law == "bingham");
  CHECK(s.verdict == "pass");
  CHECK(s.input_hash == spreadfit::history::input_hash(o.tests.front()));
  using P = std::tuple<std::string, double, double, double, std::string>;
  CHECK(s.parameters == std::vector<P>{P{"yield_stress", 24.0, 22.0, 26.0, "Pa"}, P{"viscosity", 1.5, 1.25, 1.75, "Pa.s"}});
  CHECK(s.recorded_at.size() == 20);
  CHECK(s.recorded_at[10] == 'T');
  CHECK(s.recorded_at.back() == 'Z');
  const auto j = nlohmann::json::parse(s.result_json);
  CHECK(j["sample"]["id"] == "HX1-0001");
  CHECK(j["model"] == "bingham");

  SUBCASE("a failed fit is kept without law or parameters") {
    o.chosen = -1;
    o.candidates.front().status = spreadfit::fit::FitStatus::NotConverged;
    o.verdict.status = spreadfit::qc::Verdict::Status::None;
    const StoredResult failed = spreadfit::history::stored_result(o);
    CHECK(failed.law.empty());
    CHECK(failed.parameters.empty());
    CHECK(failed.verdict == "none");
    CHECK(failed.input_hash == s.input_hash);
  }
}

namespace {

/// The history the command tests read, built once per test process (each record is a committed transaction, a
/// disk flush): product HX1 has nine batches just below the mean and then one far above it, so the chart flags a
/// point beyond the upper limit and a run of nine; HX2 has one batch.
const fs::path& command_history() {
  static const TempDir dir;
  static const fs::path db = [] {
    const fs::path file = dir.path() / "history.db";
    for (int k = 1; k <= 10; ++k)
      spreadfit::history::record(file, sample_result(fmt::format("S{}", k), "HX1", k == 10 ? 40.0 : 20.0 + k % 2));
    spreadfit::history::record(file, sample_result("T1", "HX2", 11.0));
    return file;
  }();
  return db;
}

}  // namespace

TEST_CASE("the history command lists each product's results and says which batches the control chart flags") {
  const fs::path& db = command_history();
  TempDir dir;  // for output files
  std::ostringstream out, err;

  SUBCASE("table") {
    CHECK(spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{db, "HX1", "", std::nullopt, false, std::nullopt}, out, err) == 0);
    const std::string text = out.str();
    INFO(text);
    CHECK(text.rfind("Product HX1: 10 results\n", 0) == 0);
    CHECK(text.find("HX2") == std::string::npos);
    CHECK(text.find("\n  S10     2025-01-02T03:04:05Z  channel  herschel-bulkley  40 [38.5, 41.5]    3.25 [2.75, "
                    "3.75]     0.5 [0.45, 0.55]  pass\n") != std::string::npos);
    CHECK(text.find("S10 (40 Pa) is above the upper limit") != std::string::npos);
    CHECK(text.find("S1 to S9 (9 results in a row) are all below the centre line") != std::string::npos);
    // consistency is the same in every batch: no moving range, nothing flagged
    CHECK(text.find("consistency [Pa.s^n]: 10 values, centre 3.25, limits 3.25 to 3.25 (log scale): no point "
                    "beyond the limits and no run on one side") != std::string::npos);
    CHECK(err.str().empty());
  }
  SUBCASE("every product, sorted") {
    CHECK(spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{db, "", "", std::nullopt, false, std::nullopt}, out, err) == 0);
    const std::string text = out.str();
    CHECK(text.find("Product HX1: 10 results") < text.find("Product HX2: 1 result\n"));
    CHECK(text.find("yield_stress [Pa]: 1 value; a chart needs at least 2") != std::string::npos);
  }
  SUBCASE("CSV: one row per result, units in the header, numbers that read back exactly") {
    CHECK(spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{db, "", "", std::nullopt, true, std::nullopt}, out, err) == 0);
    std::istringstream lines(out.str());
    std::string header, line;
    std::getline(lines, header);
    CHECK(header ==
          "sample,product,recorded_at,rig,model,verdict,yield_stress [Pa],yield_stress low [Pa],yield_stress high "
          "[Pa],consistency [Pa.s^n],consistency low [Pa.s^n],consistency high [Pa.s^n],flow_index [-],flow_index "
          "low [-],flow_index high [-],software_version,input_hash,site,tested");
    std::vector<std::string> rows;
    while (std::getline(lines, line)) rows.push_back(line);
    REQUIRE(rows.size() == 11);
    CHECK(rows.back().rfind("T1,HX2,2025-01-02T03:04:05Z,channel,herschel-bulkley,pass,11,9.5,12.5,3.25,", 0) == 0);
    CHECK(rows.back().substr(rows.back().size() - 66, 64) == sample_result("T1", "HX2", 11.0).input_hash);
  }
  SUBCASE("a product without results is said, not an error") {
    CHECK(spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{db, "ZZ9", "", std::nullopt, false, std::nullopt}, out, err) == 0);
    CHECK(out.str() == db.string() + ": no results for product ZZ9 (products in the history: HX1, HX2)\n");
  }
  SUBCASE("a chart of a history of several products needs --product") {
    const auto e = input_error_of([&] {
      spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{db, "", "", dir.path() / "chart.svg", false, std::nullopt}, out, err);
    });
    CHECK(e.field() == "--chart");
    CHECK(e.message() ==
          "the history holds several products (HX1, HX2); choose one with --product; no chart written");
    CHECK_FALSE(fs::exists(dir.path() / "chart.svg"));
  }
  SUBCASE("a chart of one product's yield stress, with the flagged batch marked") {
    const fs::path svg = dir.path() / "chart.svg";
    CHECK(spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{db, "HX1", "", svg, false, std::nullopt}, out, err) == 0);
    CHECK(out.str().find("chart: " + svg.string() + " (yield_stress of product HX1, 10 results)\n") !=
          std::string::npos);
    std::ifstream in(svg, std::ios::binary);
    const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
    CHECK(text.find("<svg") != std::string::npos);
    CHECK(text.find("Yield stress of product HX1, 10 batches") != std::string::npos);
    CHECK(text.find("beyond-limits") != std::string::npos);
  }
  SUBCASE("a missing database is an error naming it") {
    const auto e = input_error_of([&] {
      spreadfit::cli::run_history_command(spreadfit::cli::HistoryCommandOptions{dir.path() / "nope.db", "", "", std::nullopt, false, std::nullopt}, out, err);
    });
    CHECK(e.file() == (dir.path() / "nope.db").string());
  }
}

TEST_CASE("the note printed after recording says whether a result was added or replaced") {
  const StoredResult r = sample_result("HX1-0001", "HX1", 24.5);
  CHECK(spreadfit::cli::history_record_note("runs/h.db", r, WriteOutcome::Inserted) ==
        "history: added HX1-0001 to runs/h.db");
  CHECK(spreadfit::cli::history_record_note("runs/h.db", r, WriteOutcome::Updated) ==
        "history: replaced HX1-0001 in runs/h.db (same inputs as an earlier run)");
}

TEST_CASE("reading a history leaves no -wal or -shm file beside it, also when the database is damaged") {
  // SQLite, "Write-Ahead Logging" (sqlite.org/wal.html, from memory): the last connection to close checkpoints and
  // deletes the WAL and shared-memory files, unless it could not write. Reading is read-only for spreadfit, so the
  // folder must look as it did before.
  TempDir dir;
  const fs::path file = dir.path() / "history.db";
  spreadfit::history::record(file, sample_result("A", "P", 1));
  fs::path wal = file, shm = file;
  wal += "-wal";
  shm += "-shm";
  REQUIRE_FALSE(fs::exists(wal));
  REQUIRE_FALSE(fs::exists(shm));
  CHECK(spreadfit::history::load(file, "").size() == 1);
  CHECK_FALSE(fs::exists(wal));  // was: both left behind by a read-only connection
  CHECK_FALSE(fs::exists(shm));
  {
    // A damaged page: the second page overwritten with 0xff, which is no valid b-tree page type.
    std::fstream f(file, std::ios::in | std::ios::out | std::ios::binary);
    f.seekp(4096);
    const std::string junk(2000, '\xff');
    f.write(junk.data(), std::streamsize(junk.size()));
  }
  const auto e = input_error_of([&] { (void)spreadfit::history::load(file, ""); });
  CHECK(e.file() == file.string());
  CHECK_FALSE(fs::exists(wal));
  CHECK_FALSE(fs::exists(shm));
}

TEST_CASE("a product's batches are listed in the order they were tested, not the order they were stored") {
  // `make -j` stores results in the order the fits finish; `[sample] tested` (README, "history") puts them back in
  // test order, and a re-run that replaces a result keeps its test-time place whatever its new recording time.
  // Canonical test times compare as text (src/io/test_time.hpp), as recorded_at does.
  TempDir dir;
  const fs::path db = dir.path() / "history.db";
  StoredResult third = sample_result("HX1-0003", "HX1", 26.0);
  third.tested = "2026-04-03T09:00";
  third.recorded_at = "2026-04-03T09:20:00Z";
  StoredResult first = sample_result("HX1-0001", "HX1", 24.0);
  first.tested = "2026-04-01T09:00";
  first.recorded_at = "2026-04-03T09:21:00Z";  // finished after the third batch's fit
  StoredResult untimed = sample_result("HX1-0002", "HX1", 25.0);  // no test time: placed by its recording time
  untimed.recorded_at = "2026-04-02T12:00:00Z";
  REQUIRE(spreadfit::history::record(db, third) == WriteOutcome::Inserted);
  REQUIRE(spreadfit::history::record(db, first) == WriteOutcome::Inserted);
  REQUIRE(spreadfit::history::record(db, untimed) == WriteOutcome::Inserted);

  const auto order_of_csv = [&] {
    std::ostringstream out, err;
    REQUIRE(spreadfit::cli::run_history_command(
                spreadfit::cli::HistoryCommandOptions{db, "HX1", "", std::nullopt, true, std::nullopt}, out, err) ==
            0);
    std::istringstream lines(out.str());
    std::string line;
    std::getline(lines, line);  // header
    std::vector<std::string> ids;
    while (std::getline(lines, line)) ids.push_back(line.substr(0, line.find(',')));
    return ids;
  };
  CHECK(order_of_csv() == std::vector<std::string>{"HX1-0001", "HX1-0002", "HX1-0003"});

  StoredResult rerun = first;  // same inputs fitted again a week later: replaces the row, keeps its test time
  rerun.recorded_at = "2026-04-10T08:00:00Z";
  rerun.software_version = "test-2";
  REQUIRE(spreadfit::history::record(db, rerun) == WriteOutcome::Updated);
  CHECK(order_of_csv() == std::vector<std::string>{"HX1-0001", "HX1-0002", "HX1-0003"});

  // the stored order itself stays the recording order: only the listing sorts
  const auto stored = spreadfit::history::load(db, "HX1");
  REQUIRE(stored.size() == 3);
  CHECK(stored[0].sample_id == "HX1-0003");
  std::vector<const StoredResult*> rows;
  for (const auto& r : stored) rows.push_back(&r);
  const auto ordered = spreadfit::cli::batch_order(rows);
  CHECK(ordered[0]->sample_id == "HX1-0001");
  CHECK(ordered[1]->sample_id == "HX1-0002");
  CHECK(ordered[2]->sample_id == "HX1-0003");
}
