// Atomic output files: the whole new contents or the old file, never a part, and no temporary file left behind,
// whether the write succeeds or is refused.
#include <doctest/doctest.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>

#include <csignal>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <set>
#include <string>

#include "src/io/atomic_file.hpp"
#include "tests/io/io_test_support.hpp"

using spreadfit::io::InputError;
using spreadfit::io::write_file_atomically;
using spreadfit::io::test::input_error_of;
using spreadfit::io::test::TempDir;

namespace fs = std::filesystem;

namespace {

std::string read_bytes(const fs::path& file) {
  std::ifstream in(file, std::ios::binary);
  REQUIRE_MESSAGE(in, "cannot open " << file);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

/// Names in a folder, so a test can tell that nothing besides the expected files is there.
std::set<std::string> entries(const fs::path& folder) {
  std::set<std::string> names;
  for (const auto& entry : fs::directory_iterator(folder)) names.insert(entry.path().filename().string());
  return names;
}

/// Permission bits of a file.
unsigned mode_of(const fs::path& file) {
  struct stat s {};
  REQUIRE(::stat(file.c_str(), &s) == 0);
  return static_cast<unsigned>(s.st_mode & 07777);
}

}  // namespace

TEST_CASE("a new file holds exactly the bytes given and nothing else is left in the folder") {
  TempDir dir;
  const fs::path file = dir.path() / "result.json";
  std::string contents;
  SUBCASE("text with CR LF, a NUL byte and no final newline") { contents = std::string("{\"a\": 1}\r\n\0tail", 15); }
  SUBCASE("empty contents give an empty file") { contents.clear(); }
  SUBCASE("a megabyte, more than one write() may take") { contents.assign(std::size_t{1} << 20, 'x'); }

  write_file_atomically(file, contents);
  CHECK(read_bytes(file) == contents);
  CHECK(entries(dir.path()) == std::set<std::string>{"result.json"});
}

TEST_CASE("an existing file is replaced whole and keeps its permission bits") {
  TempDir dir;
  const fs::path file = dir.write("table.csv", "a much longer old content that must not survive in any part\n");
  REQUIRE(::chmod(file.c_str(), 0640) == 0);

  write_file_atomically(file, "new\n");
  CHECK(read_bytes(file) == "new\n");
  CHECK(mode_of(file) == 0640u);
  CHECK(entries(dir.path()) == std::set<std::string>{"table.csv"});
}

TEST_CASE("successive writes to one file leave the last contents") {
  TempDir dir;
  const fs::path file = dir.path() / "log.txt";
  constexpr int kWrites = 20;
  for (int i = 0; i < kWrites; ++i) write_file_atomically(file, "write " + std::to_string(i) + "\n");
  CHECK(read_bytes(file) == "write " + std::to_string(kWrites - 1) + "\n");
  CHECK(entries(dir.path()) == std::set<std::string>{"log.txt"});
}

TEST_CASE("a missing folder is refused with the file and the folder named, and nothing is created") {
  TempDir dir;
  const fs::path folder = dir.path() / "out";
  const fs::path file = folder / "TS12.json";
  const InputError e = input_error_of([&] { write_file_atomically(file, "{}"); });
  CHECK(e.file() == file.string());
  CHECK(e.line() == 0);
  CHECK(e.field().empty());
  CHECK(std::string(e.what()) == file.string() + ": cannot write: folder '" + folder.string() +
                                     "' does not exist (expected an existing folder; it is not created)");
  CHECK_FALSE(fs::exists(folder));
  CHECK(entries(dir.path()).empty());
}

TEST_CASE("a path whose folder part is a file is refused") {
  TempDir dir;
  const fs::path not_a_folder = dir.write("notes.txt", "keep\n");
  const fs::path file = not_a_folder / "result.json";
  const InputError e = input_error_of([&] { write_file_atomically(file, "{}"); });
  CHECK(e.message() == "cannot write: '" + not_a_folder.string() +
                           "' is not a folder (expected the path of a folder before 'result.json')");
  CHECK(read_bytes(not_a_folder) == "keep\n");
  CHECK(entries(dir.path()) == std::set<std::string>{"notes.txt"});
}

TEST_CASE("a path naming a folder is refused and the folder is left as it was") {
  TempDir dir;
  dir.write("plots/old.svg", "<svg/>");
  const fs::path target = dir.path() / "plots";
  SUBCASE("as written") {}
  SUBCASE("with a trailing separator") {
    const InputError e = input_error_of([&] { write_file_atomically(target.string() + "/", "<svg/>"); });
    CHECK(e.message() ==
          "cannot write: the path ends in a separator (expected a file name, such as "
          "out/result.json)");
  }
  const InputError e = input_error_of([&] { write_file_atomically(target, "<svg/>"); });
  CHECK(e.message() == "cannot write: it is a folder (expected a file name)");
  CHECK(fs::is_directory(target));
  CHECK(entries(target) == std::set<std::string>{"old.svg"});
  CHECK(entries(dir.path()) == std::set<std::string>{"plots"});
}

TEST_CASE("a folder that cannot be written to is refused and the old file keeps its contents") {
  TempDir dir;
  const fs::path folder = dir.path() / "locked";
  const fs::path file = dir.write("locked/result.json", "old\n");
  REQUIRE(::chmod(folder.c_str(), 0555) == 0);
  struct Restore {  // so that TempDir can remove the folder afterwards, however the test ends
    fs::path folder;
    ~Restore() { ::chmod(folder.c_str(), 0755); }
  } restore{folder};

  // A privileged user writes into read-only folders anyway; then there is nothing to refuse.
  if (::access(folder.c_str(), W_OK) == 0) {
    MESSAGE("skipped: this user may write into a read-only folder");
    return;
  }
  const InputError e = input_error_of([&] { write_file_atomically(file, "new\n"); });
  CHECK(e.file() == file.string());
  CHECK(e.message() == "cannot write: " + std::generic_category().message(EACCES) +
                           " (creating a temporary file in folder '" + folder.string() + "')");
  CHECK(read_bytes(file) == "old\n");
  CHECK(entries(folder) == std::set<std::string>{"result.json"});
}

TEST_CASE("a write that fails part way leaves the old file whole and no temporary file") {
  // A file-size limit makes write() fail after the first bytes, as a full disk would (EFBIG instead of ENOSPC).
  constexpr rlim_t kSizeLimit = 4096;  // bytes
  TempDir dir;
  const fs::path file = dir.write("result.json", "old\n");
  const std::string contents(16 * kSizeLimit, 'x');

  std::string message;
  {
    // The limit and the ignored signal hold for this block only, however it ends.
    struct FileSizeLimit {
      struct rlimit saved {};
      void (*saved_handler)(int) = SIG_DFL;
      explicit FileSizeLimit(rlim_t bytes) {
        REQUIRE(::getrlimit(RLIMIT_FSIZE, &saved) == 0);
        REQUIRE(bytes <= saved.rlim_max);
        saved_handler = std::signal(SIGXFSZ, SIG_IGN);  // the limit would otherwise end the process
        struct rlimit limited = saved;
        limited.rlim_cur = bytes;
        REQUIRE(::setrlimit(RLIMIT_FSIZE, &limited) == 0);
      }
      ~FileSizeLimit() {
        ::setrlimit(RLIMIT_FSIZE, &saved);
        std::signal(SIGXFSZ, saved_handler);
      }
    } limit(kSizeLimit);
    try {
      write_file_atomically(file, contents);
    } catch (const InputError& e) {
      message = e.what();
    }
  }
  CHECK(message == file.string() + ": cannot write: " + std::generic_category().message(EFBIG));
  CHECK(read_bytes(file) == "old\n");
  CHECK(entries(dir.path()) == std::set<std::string>{"result.json"});
}
