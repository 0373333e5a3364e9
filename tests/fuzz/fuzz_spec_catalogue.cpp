// libFuzzer target: the product spec catalogue reader (load_spec_catalogue, src/io/description_file.hpp).
#include <cstdint>

#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"
#include "tests/fuzz/fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const auto file = spreadfit::fuzz::scratch_file("specs.toml", data, size);
  try {
    (void)spreadfit::io::load_spec_catalogue(file);
  } catch (const spreadfit::io::InputError&) {
  }
  return 0;
}
