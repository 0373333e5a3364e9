#include "models/input_check.hpp"

#include <array>
#include <charconv>
#include <stdexcept>

namespace spreadfit {

std::string shortest_text(double value) {
  std::array<char, 32> buffer{};
  const auto result = std::to_chars(buffer.data(), buffer.data() + buffer.size(), value);
  return std::string(buffer.data(), result.ptr);
}

void reject_input(const std::string& field, double value, const char* expected) {
  throw std::invalid_argument(field + " = " + shortest_text(value) + ": expected " + expected);
}

}  // namespace spreadfit
