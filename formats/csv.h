// CSV as RFC 4180 defines it (quoted fields, doubled quotes, CRLF or LF line
// ends, embedded line breaks inside quotes), with the file line of every row
// kept so that errors can name file, line and column.
#pragma once
#include <string>
#include <string_view>
#include <vector>

#include "geomath/result.h"

namespace cairn::formats {

struct CsvTable {
  std::vector<std::string> header;             // trimmed header names
  std::vector<std::vector<std::string>> rows;  // one entry per data row, each with header.size() fields
  std::vector<int> row_lines;                  // 1-based line in the file where each row starts
  // Index of a column by header name, or -1.
  int column(std::string_view name) const;
};

// Parses CSV text. A blank line is skipped. Lines end with CRLF, LF or a lone
// CR; spaces between a closing quote and the next comma are dropped. Errors
// read "FILE:LINE:COLUMN: rule: message": rule "csv" (COLUMN 1) for a row with
// a different number of fields from the header, an unterminated quote, a
// duplicate header name, too many rows or too long a field (formats/limits.h);
// "encoding" for UTF-16/UTF-32 text, "too-large" past kMaxImportBytes, "utf8"
// and "control" (COLUMN the character in the line) for text that is not UTF-8
// or carries control characters other than tab and line breaks. A UTF-8
// byte-order mark is ignored.
Result<CsvTable> parse_csv(std::string_view text, const std::string& filename);

// One field quoted when it needs to be (comma, quote, CR/LF, leading/trailing space).
std::string csv_field(std::string_view value);
// A CSV cell a spreadsheet will not run as a formula (OWASP, "CSV Injection"):
// a cell that begins with '=', '+', '-', '@', tab or CR (after any single
// quotes) is prefixed with one more single quote, unless it is a plain decimal
// number ("-12.5") with no quote before it.
std::string formula_safe(std::string_view cell);

// A whole record with CRLF-free "\n" line end. Each cell first passes
// formula_safe, so a spreadsheet opening the file runs no
// formula from it; from_formula_safe undoes it when the file is read back.
std::string csv_record(const std::vector<std::string>& fields);
// The cell as it was before formula_safe: one leading quote dropped before
// '=', '+', '-', '@', tab or CR (and before further quotes that precede one).
std::string from_formula_safe(std::string_view cell);

}  // namespace cairn::formats
