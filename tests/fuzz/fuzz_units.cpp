// libFuzzer target: quantities with units (src/io/units.hpp), in every dimension.
#include <cstdint>
#include <string_view>

#include "src/io/units.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size == 0) return 0;
  using namespace spreadfit::io;
  const auto dimension = static_cast<Dimension>(data[0] % 12);
  const std::string_view text(reinterpret_cast<const char*>(data + 1), size - 1);
  try {
    (void)parse_quantity(text, dimension, Range::NonNegative);
  } catch (const UnitError&) {
  }
  try {
    (void)parse_number(text);
  } catch (const UnitError&) {
  }
  return 0;
}
