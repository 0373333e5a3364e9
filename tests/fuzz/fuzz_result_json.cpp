// libFuzzer target: the result JSON reader behind predict (src/fit/stored_fit.hpp).
#include <cstdint>

#include "src/fit/stored_fit.hpp"
#include "src/io/input_error.hpp"
#include "tests/fuzz/fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const auto file = spreadfit::fuzz::scratch_file("r.json", data, size);
  try {
    (void)spreadfit::fit::load_fitted_material(file);
  } catch (const spreadfit::io::InputError&) {
  }
  return 0;
}
