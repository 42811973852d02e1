// The one reader of decimal numbers that Cairn takes from a user or a file: the
// command line, the Reading pad, CSV and GPX values, attitude text. Its rules
// are the "number" row of the bad-input table (storage/SCHEMA.md):
//
//  - an optional sign, '+' or '-', then digits with at most one decimal point
//    ('.'), and at least one digit: "40", "-3.5", "+0.25", ".5", "12.";
//  - no exponent ("1e3"), no hexadecimal ("0x1A"), no "inf" or "nan", no
//    decimal comma ("3,5") and no thousands separator: field values are never
//    written that way, and each of these has turned a typing slip into a
//    plausible but wrong number;
//  - blanks (spaces, tabs) around the number are ignored;
//  - the value must be finite.
//
// Pure computation on text (no locale: the decimal point is always '.').
#pragma once
#include <optional>
#include <string>
#include <string_view>

namespace cairn::geo {

// TEXT as a decimal number by the rules above, or nothing.
std::optional<double> parse_decimal(std::string_view text);

}  // namespace cairn::geo

namespace cairn::geo {

// V as text by a printf-style SPEC for one number ("%.1f", "%+.0f", "%g"), through
// libfmt (locale-independent: the decimal point is always '.'). The one way a
// single number becomes text in messages, tables and drawings.
std::string format_decimal(const char* spec, double v);

}  // namespace cairn::geo
