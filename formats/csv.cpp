#include "formats/csv.h"

#include <set>

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

Result<CsvTable> parse_csv(std::string_view text, const std::string& filename) {
  if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF &&
      static_cast<unsigned char>(text[1]) == 0xBB && static_cast<unsigned char>(text[2]) == 0xBF)
    text.remove_prefix(3);
  CsvTable t;
  std::vector<std::string> record;
  std::string field;
  bool in_quotes = false, field_was_quoted = false, any_content = false;
  int line = 1, record_line = 1;
  auto fail = [&](int at, const std::string& why) {
    return Result<CsvTable>::failure(filename + ":" + std::to_string(at) + ": " + why);
  };
  auto end_field = [&] {
    record.push_back(field_was_quoted ? field : trim(field));
    field.clear();
    field_was_quoted = false;
  };
  std::string error;
  auto end_record = [&]() -> bool {
    end_field();
    bool blank = record.size() == 1 && record[0].empty() && !any_content;
    if (!blank) {
      if (t.header.empty()) {
        std::set<std::string> seen;
        for (auto& h : record) {
          if (h.empty()) { error = filename + ":" + std::to_string(record_line) + ": empty column name in header"; return false; }
          if (!seen.insert(h).second) { error = filename + ":" + std::to_string(record_line) + ": column '" + h + "' appears twice in the header"; return false; }
        }
        t.header = record;
      } else {
        if (record.size() != t.header.size()) {
          error = filename + ":" + std::to_string(record_line) + ": " + std::to_string(record.size()) +
                  " fields, but the header has " + std::to_string(t.header.size());
          return false;
        }
        t.rows.push_back(record);
        t.row_lines.push_back(record_line);
      }
    }
    record.clear();
    any_content = false;
    return true;
  };
  for (size_t i = 0; i < text.size(); ++i) {
    char c = text[i];
    if (in_quotes) {
      if (c == '"') {
        if (i + 1 < text.size() && text[i + 1] == '"') { field += '"'; ++i; }
        else in_quotes = false;
      } else {
        if (c == '\n') ++line;
        field += c;
      }
      continue;
    }
    switch (c) {
      case '"':
        if (!trim(field).empty())
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
      case '\r':
        break;
      case '\n':
        if (!end_record()) return Result<CsvTable>::failure(error);
        ++line;
        record_line = line;
        break;
      default:
        if (field_was_quoted && c != ' ' && c != '\t')
          return fail(line, "text after a closing quote (column " + std::to_string(record.size() + 1) + ")");
        if (c != ' ' && c != '\t') any_content = true;
        field += c;
    }
  }
  if (in_quotes) return fail(record_line, "a quoted field is not closed before the end of the file");
  if (!field.empty() || !record.empty() || any_content)
    if (!end_record()) return Result<CsvTable>::failure(error);
  if (t.header.empty()) return Result<CsvTable>::failure(filename + ": the file is empty (no header line)");
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

std::string csv_record(const std::vector<std::string>& fields) {
  std::string out;
  for (size_t i = 0; i < fields.size(); ++i) {
    if (i) out += ',';
    out += csv_field(fields[i]);
  }
  out += '\n';
  return out;
}

}  // namespace cairn::formats
