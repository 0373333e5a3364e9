// When a test was run (`[sample] tested`): checked and written in one canonical form, so that the batch history
// can order a product's batches by plain text comparison on every backend.
//
// Accepted (ISO 8601 calendar date, extended format, optionally with a time of day):
//   2026-04-12                 a date
//   2026-04-12T10:30           date and time (a space instead of T is accepted)
//   2026-04-12T10:30:15        with seconds (a fraction of a second is not accepted)
//   ...Z or ...+02:00 / -05:00 a time in UTC, or with its offset from UTC
// Canonical form: the date, then "Thh:mm" or "Thh:mm:ss" as precise as given; a time with an offset is converted to
// UTC and ends in "Z" ("2026-04-12T10:30+02:00" -> "2026-04-12T08:30Z"). A time without an offset is the lab's
// local clock and is kept as written. Text order of canonical forms is time order when they agree on the zone.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace spreadfit::io {

/// The canonical form of `text`, or nullopt when it is not a date or date-time as above; then `why` says what is
/// wrong (e.g. "month 13 is not 1 to 12").
std::optional<std::string> canonical_test_time(std::string_view text, std::string& why);

}  // namespace spreadfit::io
