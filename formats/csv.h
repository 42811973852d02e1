// CSV as RFC 4180 defines it (quoted fields, doubled quotes, CRLF or LF line
// ends, embedded line breaks inside quotes), with the file line of every row
// kept so that errors can name file, line and column.
#pragma once
#include <cstddef>
#include <functional>
#include <optional>
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

// The same reading one row at a time, so that a large file is never held
// whole (an import reads a file twice: once to check it, once to store it).
// Rules, limits and error messages are those of parse_csv, which is built on it.
class CsvReader {
 public:
  // Gives up to N bytes of the text into BUF; 0 at the end.
  using Source = std::function<size_t(char* buf, size_t n)>;
  // Reads text that has passed the checks of `check_csv_text` (or
  // `check_csv_file`), its byte-order mark already dropped.
  CsvReader(Source source, std::string filename);
  // A reader of the file PATH (after `check_csv_file`); the byte-order mark is skipped.
  // Fails with "cannot read PATH: why" when it cannot be opened.
  static Result<CsvReader> open(const std::string& path, const std::string& filename);

  // Reads the header row: false, with error(), when it is bad or the file has none.
  bool read_header();
  // Reads the next data row into row(): false at the end of the text, or on
  // an error (error() is then set, "FILE:LINE:COLUMN: csv: message").
  bool next();

  const std::vector<std::string>& header() const { return header_; }
  int header_line() const { return header_line_; }
  // Index of a column by header name, or -1.
  int column(std::string_view name) const;
  std::vector<std::string>& row() { return record_; }
  const std::vector<std::string>& row() const { return record_; }
  int line() const { return row_line_; }  // 1-based line where the current row starts
  size_t rows() const { return rows_; }   // data rows read so far
  const std::string& error() const { return error_; }

 private:
  enum class Got { Record, End, Error };
  Got read_record();
  bool more(size_t n);  // true when at least N bytes past pos_ are buffered (reading more if need be)
  bool next_is(char c);
  void end_field();
  bool fail(int line, const std::string& why);

  Source source_;
  std::string filename_;
  std::string buf_;
  size_t pos_ = 0;
  bool at_end_ = false;
  std::vector<std::string> header_, record_;
  std::string field_;
  bool in_quotes_ = false, field_was_quoted_ = false, after_quote_ = false, any_content_ = false;
  int line_ = 1, record_line_ = 1, row_line_ = 1, header_line_ = 1;
  size_t rows_ = 0;
  std::string error_;
};

// The checks parse_csv makes on the whole text before reading rows, in its
// order: "encoding", "too-large", then "utf8" and "control" with line and
// column. Nothing when the text passes.
std::optional<std::string> check_csv_text(std::string_view text, const std::string& filename);
// The same checks on the file PATH, read in pieces of at most a few lines
// (nothing is held whole), named FILENAME in messages; "cannot read PATH: why"
// when it cannot be read.
std::optional<std::string> check_csv_file(const std::string& path, const std::string& filename);

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
