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

// Parses CSV text. A blank line is skipped; a row with a different number of
// fields from the header, an unterminated quote or a duplicate header name is an
// error of the form "FILE:LINE: ...". A UTF-8 byte-order mark is ignored.
Result<CsvTable> parse_csv(std::string_view text, const std::string& filename);

// One field quoted when it needs to be (comma, quote, CR/LF, leading/trailing space).
std::string csv_field(std::string_view value);
// A whole record with CRLF-free "\n" line end.
std::string csv_record(const std::vector<std::string>& fields);

}  // namespace cairn::formats
