// libFuzzer target: the test description reader (src/io/description_file.hpp). A readings file run.csv lies beside
// the fuzzed TOML, so inputs that name it reach the CSV reader and the checks across files too.
#include <cstdint>
#include <string>

#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"
#include "tests/fuzz/fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const std::string csv = "time [s],front [cm]\n2,5.7\n4,5.9\n6,6.1\n";
  spreadfit::fuzz::scratch_file("run.csv", reinterpret_cast<const std::uint8_t*>(csv.data()), csv.size());
  const auto file = spreadfit::fuzz::scratch_file("t.toml", data, size);
  try {
    (void)spreadfit::io::load_test_description(file);
  } catch (const spreadfit::io::InputError&) {
  }
  return 0;
}
