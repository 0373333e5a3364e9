// The shared text helper (src/io/text.hpp): trimming removes the given blanks at both ends and nothing inside.
#include <doctest/doctest.h>

#include "src/io/text.hpp"

using spreadfit::io::trim;

TEST_CASE("trim removes blanks at both ends only") {
  CHECK(trim("  1.5 mm\t\r\n") == "1.5 mm");
  CHECK(trim("Pa  s") == "Pa  s");  // inner blanks stay (units.cpp squeezes them separately)
  CHECK(trim(" \t\r\n").empty());
  CHECK(trim("").empty());
  // A narrower set: a CSV cell keeps a CR, which only the line reader removes.
  CHECK(trim(" 2\r ", " \t") == "2\r");
  // A view into the same characters, no copy.
  const std::string_view text = "  abc ";
  CHECK(trim(text).data() == text.data() + 2);
}
