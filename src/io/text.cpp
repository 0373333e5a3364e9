#include "src/io/text.hpp"

namespace spreadfit::io {

std::string_view trim(std::string_view s, std::string_view blanks) {
  const auto first = s.find_first_not_of(blanks);
  if (first == std::string_view::npos) return s.substr(s.size());
  return s.substr(first, s.find_last_not_of(blanks) - first + 1);
}

}  // namespace spreadfit::io
