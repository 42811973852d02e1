// Field times as ISO 8601 text (ISO 8601-1:2019, calendar date and time of day
// in the extended format), which is also what GPX uses (xsd:dateTime).
#pragma once
#include <chrono>
#include <optional>
#include <string>
#include <string_view>

#include "geomath/calendar.h"
#include "geomath/result.h"

namespace cairn::formats {

struct FieldTime {
  // Normalised text: "YYYY-MM-DD" for a date alone, else
  // "YYYY-MM-DDThh:mm:ss[.fff][Z|+hh:mm|-hh:mm]" (a zero offset is written "Z";
  // no designator means local time, as ISO 8601 has it).
  std::string text;
  date::year_month_day day;                              // the calendar date as written
  std::optional<std::chrono::milliseconds> time_of_day;  // when a time was given
  std::optional<std::chrono::minutes> utc_offset;        // when "Z" or an offset was given (east positive)
};

// Today's date (UTC) as a FieldTime with no time of day.
FieldTime today_utc();

// Accepts "YYYY-MM-DD", "YYYY-MM-DDThh:mm", "YYYY-MM-DDThh:mm:ss",
// "YYYY-MM-DDThh:mm:ss.f..." with an optional "Z", "+hh:mm", "+hhmm" or "+hh"
// (or "-"). A space instead of the "T" is accepted as RFC 3339 (section 5.6)
// allows. Fails for anything else and for dates or times that do not exist.
Result<FieldTime> parse_iso8601(std::string_view text);

}  // namespace cairn::formats
