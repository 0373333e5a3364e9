// libFuzzer target: the readings CSV reader (src/io/readings_csv.hpp), from memory.
#include <cstdint>
#include <string_view>

#include "src/io/input_error.hpp"
#include "src/io/readings_csv.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  try {
    (void)spreadfit::io::parse_readings_csv(std::string_view(reinterpret_cast<const char*>(data), size), "fuzz.csv");
  } catch (const spreadfit::io::InputError&) {
  }
  return 0;
}
