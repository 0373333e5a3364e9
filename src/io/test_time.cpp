#include "src/io/test_time.hpp"

#include <fmt/format.h>

#include <cctype>
#include <chrono>

namespace spreadfit::io {

namespace {

/// Reads exactly `digits` decimal digits at `pos`; advances `pos`.
std::optional<int> number(std::string_view s, std::size_t& pos, std::size_t digits) {
  if (pos + digits > s.size()) return std::nullopt;
  int value = 0;
  for (std::size_t k = 0; k < digits; ++k) {
    const char c = s[pos + k];
    if (!std::isdigit(static_cast<unsigned char>(c))) return std::nullopt;
    value = value * 10 + (c - '0');
  }
  pos += digits;
  return value;
}

bool expect(std::string_view s, std::size_t& pos, char c) {
  if (pos >= s.size() || s[pos] != c) return false;
  ++pos;
  return true;
}

}  // namespace

std::optional<std::string> canonical_test_time(std::string_view s, std::string& why) {
  constexpr const char* kExpected = "expected a date such as \"2026-04-12\" or a date and time such as "
                                    "\"2026-04-12T10:30\", optionally ending in Z or an offset such as +02:00";
  std::size_t pos = 0;
  const auto year = number(s, pos, 4);
  const bool dash1 = year && expect(s, pos, '-');
  const auto month = dash1 ? number(s, pos, 2) : std::nullopt;
  const bool dash2 = month && expect(s, pos, '-');
  const auto day = dash2 ? number(s, pos, 2) : std::nullopt;
  if (!day) {
    why = kExpected;
    return std::nullopt;
  }
  if (*month < 1 || *month > 12) {
    why = fmt::format("month {} is not 1 to 12", *month);
    return std::nullopt;
  }
  const std::chrono::year_month_day date{std::chrono::year(*year), std::chrono::month(unsigned(*month)),
                                         std::chrono::day(unsigned(*day))};
  if (!date.ok()) {
    why = fmt::format("{:04}-{:02} has no day {}", *year, *month, *day);
    return std::nullopt;
  }
  if (pos == s.size()) return fmt::format("{:04}-{:02}-{:02}", *year, *month, *day);

  if (s[pos] != 'T' && s[pos] != 't' && s[pos] != ' ') {
    why = kExpected;
    return std::nullopt;
  }
  ++pos;
  const auto hour = number(s, pos, 2);
  const bool colon = hour && expect(s, pos, ':');
  const auto minute = colon ? number(s, pos, 2) : std::nullopt;
  if (!minute) {
    why = kExpected;
    return std::nullopt;
  }
  std::optional<int> second;
  if (pos < s.size() && s[pos] == ':') {
    ++pos;
    second = number(s, pos, 2);
    if (!second) {
      why = kExpected;
      return std::nullopt;
    }
  }
  // ISO 8601 allows 60 for a leap second; the history does not need one, and a typo is likelier.
  if (*hour > 23 || *minute > 59 || (second && *second > 59)) {
    why = fmt::format("time {:02}:{:02}{} is not a time of day (hours 00 to 23, minutes and seconds 00 to 59)",
                      *hour, *minute, second ? fmt::format(":{:02}", *second) : std::string());
    return std::nullopt;
  }
  enum class Zone { Local, Utc };
  Zone zone = Zone::Local;
  int offset_minutes = 0;
  if (pos < s.size()) {
    if (s[pos] == 'Z' || s[pos] == 'z') {
      zone = Zone::Utc;
      ++pos;
    } else if (s[pos] == '+' || s[pos] == '-') {
      const int sign = s[pos] == '-' ? -1 : 1;
      ++pos;
      const auto oh = number(s, pos, 2);
      const bool oc = oh && expect(s, pos, ':');
      const auto om = oc ? number(s, pos, 2) : std::nullopt;
      if (!om || *oh > 23 || *om > 59) {
        why = kExpected;
        return std::nullopt;
      }
      zone = Zone::Utc;
      offset_minutes = sign * (*oh * 60 + *om);
    }
  }
  if (pos != s.size()) {
    why = kExpected;
    return std::nullopt;
  }
  // Local time minus the offset is UTC (ISO 8601-1:2019, 4.3.13); whole days carry over through sys_days.
  using namespace std::chrono;
  const sys_seconds local = sys_days(date) + hours(*hour) + minutes(*minute) + seconds(second.value_or(0));
  const sys_seconds utc = local - minutes(offset_minutes);
  const auto utc_day = floor<days>(utc);
  const year_month_day d(utc_day);
  const hh_mm_ss<seconds> t(utc - utc_day);
  std::string out = fmt::format("{:04}-{:02}-{:02}T{:02}:{:02}", int(d.year()), unsigned(d.month()),
                                unsigned(d.day()), t.hours().count(), t.minutes().count());
  if (second) out += fmt::format(":{:02}", t.seconds().count());
  if (zone == Zone::Utc) out += 'Z';
  return out;
}

}  // namespace spreadfit::io
