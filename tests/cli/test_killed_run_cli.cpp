// A run killed with SIGKILL (an operator's kill -9, a CI timeout, the machine's out-of-memory killer) can catch no
// signal and clean nothing up. What must still hold (README, "Exit codes": no partial output file): each output is
// either absent or the whole file an uninterrupted run writes, and the temporary files a killed write leaves behind
// (".NAME.tmp-PID-N", src/io/atomic_file.hpp) are removed by the next run that writes the same outputs.
#include <doctest/doctest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <string>
#include <thread>
#include <vector>

#include "tests/cli/cli_test_support.hpp"

namespace {

namespace fs = std::filesystem;

/// Starts `spreadfit fit TEST --json/--csv/--plot` into `out` with its output streams closed, and returns its pid.
pid_t start_fit(const fs::path& test, const fs::path& out) {
  const std::string json = (out / "r.json").string(), csv = (out / "r.csv").string(), svg = (out / "r.svg").string();
  const std::string test_path = test.string();
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    const std::string binary = SPREADFIT_BINARY;
    ::freopen("/dev/null", "w", stdout);
    ::freopen("/dev/null", "w", stderr);
    ::execl(binary.c_str(), binary.c_str(), "fit", test_path.c_str(), "--json", json.c_str(), "--csv", csv.c_str(),
            "--plot", svg.c_str(), static_cast<char*>(nullptr));
    ::_exit(127);
  }
  return pid;
}

int wait_for(pid_t pid) {
  int status = 0;
  REQUIRE(::waitpid(pid, &status, 0) == pid);
  return status;
}

std::vector<std::string> temporaries_in(const fs::path& folder) {
  std::vector<std::string> found;
  for (const auto& entry : fs::directory_iterator(folder))
    if (entry.path().filename().string().find(".tmp-") != std::string::npos)
      found.push_back(entry.path().filename().string());
  return found;
}

}  // namespace

TEST_CASE("a fit killed at any moment leaves each output whole or absent; the next run removes its temporaries") {
  TempDir dir;
  // A plate test of an invented paste: a Bingham fit that takes long enough to be killed while it writes.
  const fs::path test = dir.write("k.toml",
                                  "[sample]\nid = \"K-1\"\ndensity = \"1.0 g/mL\"\n[rig]\nkind = \"plate\"\n"
                                  "ring_radius = \"3 cm\"\nvolume = \"60 mL\"\n[readings]\nfile = \"k.csv\"\n"
                                  "resolution = \"0.5 mm\"\n[fit]\nmodel = \"bingham\"\n");
  dir.write("k.csv",
            "time [s],diameter [mm]\n5,97.2\n10,97.8\n15,98.3\n20,98.5\n30,98.7\n40,98.9\n50,99.0\n60,99.1\n80,99.2\n"
            "100,99.3\n120,99.4\n");
  const fs::path out = dir.path() / "out";
  fs::create_directory(out);

  // The whole outputs, from an uninterrupted run (the fit is deterministic: same inputs, same bytes).
  const auto started = std::chrono::steady_clock::now();
  const int reference_status = wait_for(start_fit(test, out));
  const auto runtime = std::chrono::steady_clock::now() - started;
  REQUIRE(WIFEXITED(reference_status));
  REQUIRE(WEXITSTATUS(reference_status) == 0);
  const std::vector<std::string> names{"r.json", "r.csv", "r.svg"};
  std::vector<std::string> whole;
  for (const auto& name : names) {
    whole.push_back(read_text(out / name));
    REQUIRE(!whole.back().empty());
    fs::remove(out / name);
  }

  // Kills spread from early in the fit to past its usual end, where the outputs are written.
  constexpr int kKills = 10;
  int killed = 0;
  for (int k = 0; k < kKills; ++k) {
    const pid_t pid = start_fit(test, out);
    std::this_thread::sleep_for(runtime * (0.5 + 0.7 * k / (kKills - 1)));
    ::kill(pid, SIGKILL);
    const int status = wait_for(pid);
    if (WIFSIGNALED(status)) ++killed;
    for (std::size_t i = 0; i < names.size(); ++i) {
      if (!fs::exists(out / names[i])) continue;
      INFO("kill " << k << ": " << names[i]);
      CHECK(read_text(out / names[i]) == whole[i]);  // never a part of the file
    }
  }
  CHECK(killed > 0);  // at least one kill landed before the run ended (else the test checked nothing)

  // The next complete run writes every output whole and leaves no temporary file of any earlier run.
  const int status = wait_for(start_fit(test, out));
  REQUIRE(WIFEXITED(status));
  CHECK(WEXITSTATUS(status) == 0);
  for (std::size_t i = 0; i < names.size(); ++i) CHECK(read_text(out / names[i]) == whole[i]);
  CHECK(temporaries_in(out).empty());
}
