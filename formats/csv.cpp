#include "formats/csv.h"

#include <set>

#include "formats/limits.h"
#include "formats/utf8.h"
#include "formats/validate.h"

namespace cairn::formats {

int CsvTable::column(std::string_view name) const {
  for (size_t i = 0; i < header.size(); ++i)
    if (header[i] == name) return static_cast<int>(i);
  return -1;
}

static std::string trim(std::string s) {
  size_t b = s.find_first_not_of(" \t");
  if (b == std::string::npos) return "";
  size_t e = s.find_last_not_of(" \t");
  return s.substr(b, e - b + 1);
}

// One pass over the text as a small state machine (RFC 4180 section 2 plus
// the line ends and limits noted inside); kept whole because the states share
// the line and column they report errors at.
Result<CsvTable> parse_csv(std::string_view text, const std::string& filename) {
  auto fail_at = [&](int line, int column, const std::string& rule, const std::string& why) {
    return Result<CsvTable>::failure(filename + ":" + std::to_string(line) + ":" + std::to_string(column) + ": " +
                                     rule + ": " + why);
  };
  if (looks_like_utf16(text))
    return fail_at(1, 1, "encoding",
                   "the file is UTF-16 or UTF-32 text; save it as UTF-8 (\"CSV UTF-8\") and import it again");
  if (text.size() > kMaxImportBytes)
    return fail_at(1, 1, "too-large",
                   "the file is larger than " + size_text(kMaxImportBytes) + ", the most Cairn imports; split it");
  if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF && static_cast<unsigned char>(text[1]) == 0xBB &&
      static_cast<unsigned char>(text[2]) == 0xBF)
    text.remove_prefix(3);
  if (auto f = find_text_fault(text, true)) return fail_at(f->line, f->column, f->rule, f->message);
  CsvTable t;
  std::vector<std::string> record;
  std::string field;
  bool in_quotes = false, field_was_quoted = false, after_quote = false, any_content = false;
  int line = 1, record_line = 1;
  auto fail = [&](int at, const std::string& why) { return fail_at(at, 1, "csv", why); };
  auto end_field = [&] {
    record.push_back(field_was_quoted ? field : trim(field));
    field.clear();
    field_was_quoted = false;
    after_quote = false;
  };
  std::string error;
  auto end_record = [&]() -> bool {
    end_field();
    bool blank = record.size() == 1 && record[0].empty() && !any_content;
    auto err = [&](const std::string& why) {
      error = filename + ":" + std::to_string(record_line) + ":1: csv: " + why;
      return false;
    };
    if (!blank) {
      if (t.header.empty()) {
        std::set<std::string> seen;
        for (auto& h : record) {
          if (h.empty()) return err("empty column name in header");
          if (!seen.insert(h).second) return err("column '" + h + "' appears twice in the header");
        }
        t.header = record;
      } else {
        if (record.size() != t.header.size())
          return err(std::to_string(record.size()) + " fields, but the header has " + std::to_string(t.header.size()));
        if (t.rows.size() >= kMaxImportRows)
          return err("more than " + std::to_string(kMaxImportRows) +
                     " rows, the most Cairn imports from one file; split it");
        t.rows.push_back(record);
        t.row_lines.push_back(record_line);
      }
    }
    record.clear();
    any_content = false;
    return true;
  };
  // A line ends with CRLF, LF or a lone CR (RFC 4180 names CRLF; files from
  // older spreadsheets end lines with CR alone).
  auto line_end_at = [&](size_t i) {
    return text[i] == '\n' || (text[i] == '\r' && (i + 1 >= text.size() || text[i + 1] != '\n'));
  };
  for (size_t i = 0; i < text.size(); ++i) {
    char c = text[i];
    if (in_quotes) {
      if (c == '"') {
        if (i + 1 < text.size() && text[i + 1] == '"') {
          field += '"';
          ++i;
        } else {
          in_quotes = false;
          after_quote = true;
        }
      } else {
        if (line_end_at(i)) ++line;
        field += c;
      }
      if (field.size() > kMaxFieldBytes)
        return fail(record_line, "a field longer than " + size_text(kMaxFieldBytes) + " (column " +
                                     std::to_string(record.size() + 1) + ")");
      continue;
    }
    if (c == '\r' && !line_end_at(i)) continue;  // the CR of a CRLF
    if (line_end_at(i)) {
      if (!end_record()) return Result<CsvTable>::failure(error);
      ++line;
      record_line = line;
      continue;
    }
    switch (c) {
      case '"':
        if (!trim(field).empty() || after_quote)
          return fail(line, "a quote inside an unquoted field (column " + std::to_string(record.size() + 1) + ")");
        field.clear();
        in_quotes = true;
        field_was_quoted = true;
        any_content = true;
        break;
      case ',':
        end_field();
        any_content = true;
        break;
      default:
        if (after_quote) {
          // Spaces and tabs between a closing quote and the next comma are
          // not part of the field.
          if (c == ' ' || c == '\t') break;
          return fail(line, "text after a closing quote (column " + std::to_string(record.size() + 1) + ")");
        }
        if (c != ' ' && c != '\t') any_content = true;
        field += c;
        if (field.size() > kMaxFieldBytes)
          return fail(line, "a field longer than " + size_text(kMaxFieldBytes) + " (column " +
                                std::to_string(record.size() + 1) + ")");
    }
  }
  if (in_quotes) return fail(record_line, "a quoted field is not closed before the end of the file");
  if (!field.empty() || !record.empty() || any_content)
    if (!end_record()) return Result<CsvTable>::failure(error);
  if (t.header.empty()) return fail(1, "the file is empty (no header line)");
  return t;
}

std::string csv_field(std::string_view v) {
  bool quote = v.find_first_of(",\"\r\n") != std::string_view::npos ||
               (!v.empty() && (v.front() == ' ' || v.back() == ' ' || v.front() == '\t' || v.back() == '\t'));
  if (!quote) return std::string(v);
  std::string out = "\"";
  for (char c : v) {
    if (c == '"') out += '"';
    out += c;
  }
  out += '"';
  return out;
}

namespace {
bool formula_start(char c) { return c == '=' || c == '+' || c == '-' || c == '@' || c == '\t' || c == '\r'; }
}  // namespace

std::string formula_safe(std::string_view cell) {
  const size_t q = cell.find_first_not_of('\'');
  if (q == std::string_view::npos || !formula_start(cell[q])) return std::string(cell);
  if (q == 0 && parse_decimal(cell)) return std::string(cell);  // a plain number
  return "'" + std::string(cell);
}

std::string from_formula_safe(std::string_view cell) {
  const size_t q = cell.find_first_not_of('\'');
  if (q == 0 || q == std::string_view::npos || !formula_start(cell[q])) return std::string(cell);
  return std::string(cell.substr(1));
}

std::string csv_record(const std::vector<std::string>& fields) {
  std::string out;
  for (size_t i = 0; i < fields.size(); ++i) {
    if (i) out += ',';
    out += csv_field(formula_safe(fields[i]));
  }
  out += '\n';
  return out;
}

}  // namespace cairn::formats
