// The demo batch as a plant runs it: examples/Makefile on a copy of examples/, one spreadfit call a batch, then
// the targets that use fitted materials elsewhere. Checks the workflow the README promises (exit codes, one result
// a batch, the out-of-spec batch moved aside, the outputs of `make elsewhere`), not physics: the demo data are
// invented and never a check value (the numbers are checked in tests/models and tests/fit).
#include <doctest/doctest.h>

#include <algorithm>
#include <filesystem>
#include <string>

#include "tests/cli/cli_test_support.hpp"

namespace fs = std::filesystem;

namespace {

// `make ARGUMENTS` in `dir` with the binary under test; output captured.
Run run_make(const TempDir& scratch, const fs::path& dir, const std::string& arguments) {
  const auto out = scratch.path() / "make-out.txt";
  const std::string command = "make -s -C " + quoted(dir.string()) + " " + arguments + " SPREADFIT=" +
                              quoted(SPREADFIT_BINARY) + " >" + quoted(out.string()) + " 2>&1";
  const int status = std::system(command.c_str());
  REQUIRE(WIFEXITED(status));
  return Run{command, WEXITSTATUS(status), read_text(out), ""};
}

}  // namespace

TEST_CASE("demo makefile: every batch gets a result, the out-of-spec one is set aside, and 'elsewhere' runs") {
  REQUIRE_MESSAGE(std::system("command -v make >/dev/null 2>&1") == 0, "make is missing (scripts/setup installs it)");
  TempDir scratch;
  const fs::path examples = fs::path(SPREADFIT_SOURCE_DIR) / "examples";
  const fs::path demo = scratch.path() / "examples";
  fs::create_directory(demo);
  for (const auto& entry : fs::directory_iterator(examples))
    if (entry.path().filename() != "results")
      fs::copy(entry.path(), demo / entry.path().filename(), fs::copy_options::recursive);

  const Run all = run_make(scratch, demo, "-k -j2 all");
  INFO(all.out);
  // TS12-0415 is out of spec by design: spreadfit exits 1, make fails that target and carries on (-k).
  CHECK(all.exit_code != 0);
  CHECK(fs::exists(demo / "results" / "TS12-0415.rejected.json"));
  CHECK_FALSE(fs::exists(demo / "results" / "TS12-0415.json"));
  int results = 0;
  for (const auto& entry : fs::directory_iterator(demo))
    if (entry.path().extension() == ".toml" && entry.path().filename() != "specs.toml") {
      const std::string id = entry.path().stem().string();
      INFO(id);
      CHECK((fs::exists(demo / "results" / (id + ".json")) || fs::exists(demo / "results" / (id + ".rejected.json"))));
      ++results;
    }
  CHECK(results == 15);  // 14 batches from readings files, 1 from a video (LT3-2213)
  CHECK(fs::exists(demo / "results" / "history.db"));

  const Run elsewhere = run_make(scratch, demo, "elsewhere");
  INFO(elsewhere.out);
  CHECK(elsewhere.exit_code == 0);
  const std::string limits = read_text(demo / "results" / "TS12-channel-limits.txt");
  CHECK(limits.find("reading,unit,time [s],low,high\nfront,m,30,") != std::string::npos);
  CHECK(read_text(demo / "results" / "TS12-channel-limits.svg").find("</svg>") != std::string::npos);
  const std::string predicted = read_text(demo / "results" / "LT3-2210-on-150mL.csv");
  CHECK(predicted.rfind("time [s],diameter [m],diameter low [m],diameter high [m]\n", 0) == 0);
  CHECK(std::count(predicted.begin(), predicted.end(), '\n') == 5);
  CHECK(read_text(demo / "results" / "LT3-2210-on-150mL.svg").find("</svg>") != std::string::npos);

  // A second run finds the passing results up to date and refits only the batch that was set aside.
  const Run again = run_make(scratch, demo, "-k all");
  CHECK(again.exit_code != 0);
  CHECK(again.out.find("TS12-0415") != std::string::npos);
  CHECK(again.out.find("TS12-0410") == std::string::npos);
}
