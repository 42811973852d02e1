// Cairn's calendar: every date in the program goes through Howard Hinnant's date
// library (Debian's libhowardhinnant-date-dev; the proleptic Gregorian
// calendar that C++20's <chrono> calendar types were standardised from), so
// there is one implementation of leap years and day counts.
//
// Pure computation.
#pragma once
#include <date/date.h>

namespace cairn::geo {

// A calendar date as plain numbers (for messages and tests).
struct CalendarDate {
  int year, month, day;
};

// True for a real Gregorian calendar date in years 1..9999.
bool valid_date(int y, int m, int d);

// The day as the date library's type; throws std::domain_error for an
// impossible date (month 13, 30 February ...).
date::year_month_day calendar_day(int y, int m, int d);

// Calendar date -> decimal year as the WMM reports and their software define
// it: year + (day_of_year - 1) / days_in_year, so 1 January is YEAR.0
// (WMM2025 Technical Report's test values; value from memory for the formula).
// Throws std::domain_error for an impossible date.
double decimal_year(int y, int m, int d);
double decimal_year(const date::year_month_day& day);

// The day a decimal year falls on (inverse of decimal_year for whole days).
// Throws std::domain_error outside years 1..9999.
CalendarDate calendar_date(double decimal_year);

}  // namespace cairn::geo
