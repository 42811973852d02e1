#include "formats/csv.h"

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>
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

namespace {

std::string fault_at(const std::string& filename, int line, int column, const std::string& rule,
                     const std::string& why) {
  return filename + ":" + std::to_string(line) + ":" + std::to_string(column) + ": " + rule + ": " + why;
}

bool has_bom(std::string_view t) {
  return t.size() >= 3 && static_cast<unsigned char>(t[0]) == 0xEF && static_cast<unsigned char>(t[1]) == 0xBB &&
         static_cast<unsigned char>(t[2]) == 0xBF;
}

std::string too_large(const std::string& filename) {
  return fault_at(filename, 1, 1, "too-large",
                  "the file is larger than " + size_text(kMaxImportBytes) + ", the most Cairn imports; split it");
}

std::string utf16(const std::string& filename) {
  return fault_at(filename, 1, 1, "encoding",
                  "the file is UTF-16 or UTF-32 text; save it as UTF-8 (\"CSV UTF-8\") and import it again");
}

// Line ends in T as find_text_fault counts them (LF, CRLF, a lone CR; a CR
// at the very end counts as one).
int count_lines(std::string_view t) {
  int n = 0;
  for (size_t i = 0; i < t.size(); ++i)
    if (t[i] == '\n' || (t[i] == '\r' && (i + 1 >= t.size() || t[i + 1] != '\n'))) ++n;
  return n;
}

}  // namespace

std::optional<std::string> check_csv_text(std::string_view text, const std::string& filename) {
  if (looks_like_utf16(text)) return utf16(filename);
  if (text.size() > kMaxImportBytes) return too_large(filename);
  if (has_bom(text)) text.remove_prefix(3);
  if (auto f = find_text_fault(text, true)) return fault_at(filename, f->line, f->column, f->rule, f->message);
  return std::nullopt;
}

// The text is scanned in pieces that end just after a line end (so a UTF-8
// sequence is never cut and columns restart at 1), and read to its end even
// after a fault, because a file over the size limit is refused for its size first.
std::optional<std::string> check_csv_file(const std::string& path, const std::string& filename) {
  std::unique_ptr<FILE, int (*)(FILE*)> f(std::fopen(path.c_str(), "rb"), &std::fclose);
  if (!f) return "cannot read " + path + ": " + std::strerror(errno);
  std::vector<char> block(size_t{1} << 16);
  std::string pending;  // bytes not scanned yet: the end of a line not finished
  size_t total = 0;
  int lines_before = 0;
  bool first = true;
  std::optional<std::string> fault;
  auto scan = [&](std::string_view piece) {
    if (auto t = find_text_fault(piece, true))
      fault = fault_at(filename, lines_before + t->line, t->column, t->rule, t->message);
    else
      lines_before += count_lines(piece);
  };
  for (;;) {
    const size_t n = std::fread(block.data(), 1, block.size(), f.get());
    if (n == 0) break;
    total += n;
    std::string_view got(block.data(), n);
    if (first) {
      if (looks_like_utf16(got)) return utf16(filename);
      if (has_bom(got)) got.remove_prefix(3);
      first = false;
    }
    if (total > kMaxImportBytes) return too_large(filename);
    if (fault) continue;
    pending.append(got);
    size_t cut = pending.rfind('\n');
    if (cut == std::string::npos) {  // lines ended by a lone CR (one not last: its next byte is known)
      cut = pending.size() >= 2 ? pending.find_last_of('\r', pending.size() - 2) : std::string::npos;
      if (cut != std::string::npos && pending[cut + 1] == '\n') cut = std::string::npos;
    }
    if (cut == std::string::npos) continue;
    scan(std::string_view(pending).substr(0, cut + 1));
    pending.erase(0, cut + 1);
  }
  if (std::ferror(f.get())) return "cannot read " + path + ": " + std::strerror(errno);
  if (!fault) scan(pending);
  return fault;
}

CsvReader::CsvReader(Source source, std::string filename)
    : source_(std::move(source)), filename_(std::move(filename)) {}

Result<CsvReader> CsvReader::open(const std::string& path, const std::string& filename) {
  std::shared_ptr<FILE> f(std::fopen(path.c_str(), "rb"), [](FILE* x) {
    if (x) std::fclose(x);
  });
  if (!f) return Result<CsvReader>::failure("cannot read " + path + ": " + std::strerror(errno));
  CsvReader r([f](char* buf, size_t n) { return std::fread(buf, 1, n, f.get()); }, filename);
  if (r.more(3) && has_bom(std::string_view(r.buf_).substr(r.pos_, 3))) r.pos_ += 3;
  return r;
}

int CsvReader::column(std::string_view name) const {
  for (size_t i = 0; i < header_.size(); ++i)
    if (header_[i] == name) return static_cast<int>(i);
  return -1;
}

bool CsvReader::more(size_t n) {
  while (buf_.size() - pos_ < n) {
    if (at_end_) return false;
    if (pos_ > 0) {
      buf_.erase(0, pos_);
      pos_ = 0;
    }
    const size_t old = buf_.size(), piece = size_t{1} << 16;
    buf_.resize(old + piece);
    const size_t got = source_(&buf_[old], piece);
    buf_.resize(old + got);
    if (got == 0) at_end_ = true;
  }
  return true;
}

bool CsvReader::next_is(char c) { return more(1) && buf_[pos_] == c; }

void CsvReader::end_field() {
  record_.push_back(field_was_quoted_ ? field_ : trim(field_));
  field_.clear();
  field_was_quoted_ = false;
  after_quote_ = false;
}

bool CsvReader::fail(int line, const std::string& why) {
  error_ = fault_at(filename_, line, 1, "csv", why);
  return false;
}

// One record as a small state machine (RFC 4180 section 2 plus the line ends
// and limits noted inside); kept whole because the states share the line and
// column they report errors at. Blank lines are skipped.
CsvReader::Got CsvReader::read_record() {
  record_.clear();
  field_.clear();
  in_quotes_ = field_was_quoted_ = after_quote_ = any_content_ = false;
  auto field_too_long = [&](int at) {
    fail(at,
         "a field longer than " + size_text(kMaxFieldBytes) + " (column " + std::to_string(record_.size() + 1) + ")");
    return Got::Error;
  };
  while (more(1)) {
    const char c = buf_[pos_++];
    // A line ends with CRLF, LF or a lone CR (RFC 4180 names CRLF; files from
    // older spreadsheets end lines with CR alone).
    if (in_quotes_) {
      if (c == '"') {
        if (next_is('"')) {
          field_ += '"';
          ++pos_;
        } else {
          in_quotes_ = false;
          after_quote_ = true;
        }
      } else {
        if (c == '\n' || (c == '\r' && !next_is('\n'))) ++line_;
        field_ += c;
      }
      if (field_.size() > kMaxFieldBytes) return field_too_long(record_line_);
      continue;
    }
    if (c == '\r' && next_is('\n')) continue;  // the CR of a CRLF
    if (c == '\n' || c == '\r') {
      end_field();
      const bool blank = record_.size() == 1 && record_[0].empty() && !any_content_;
      row_line_ = record_line_;
      ++line_;
      record_line_ = line_;
      if (!blank) return Got::Record;
      record_.clear();
      any_content_ = false;
      continue;
    }
    switch (c) {
      case '"':
        if (!trim(field_).empty() || after_quote_) {
          fail(line_, "a quote inside an unquoted field (column " + std::to_string(record_.size() + 1) + ")");
          return Got::Error;
        }
        field_.clear();
        in_quotes_ = true;
        field_was_quoted_ = true;
        any_content_ = true;
        break;
      case ',':
        end_field();
        any_content_ = true;
        break;
      default:
        if (after_quote_) {
          // Spaces and tabs between a closing quote and the next comma are
          // not part of the field.
          if (c == ' ' || c == '\t') break;
          fail(line_, "text after a closing quote (column " + std::to_string(record_.size() + 1) + ")");
          return Got::Error;
        }
        if (c != ' ' && c != '\t') any_content_ = true;
        field_ += c;
        if (field_.size() > kMaxFieldBytes) return field_too_long(line_);
    }
  }
  if (in_quotes_) {
    fail(record_line_, "a quoted field is not closed before the end of the file");
    return Got::Error;
  }
  if (!field_.empty() || !record_.empty() || any_content_) {
    end_field();
    const bool blank = record_.size() == 1 && record_[0].empty() && !any_content_;
    row_line_ = record_line_;
    record_line_ = line_;
    if (!blank) return Got::Record;
  }
  record_.clear();
  return Got::End;
}

bool CsvReader::read_header() {
  const Got g = read_record();
  if (g == Got::Error) return false;
  if (g == Got::End) return fail(1, "the file is empty (no header line)");
  std::set<std::string> seen;
  for (auto& h : record_) {
    if (h.empty()) return fail(row_line_, "empty column name in header");
    if (!seen.insert(h).second) return fail(row_line_, "column '" + h + "' appears twice in the header");
  }
  header_ = std::move(record_);
  header_line_ = row_line_;
  record_.clear();
  return true;
}

bool CsvReader::next() {
  if (read_record() != Got::Record) return false;
  if (record_.size() != header_.size())
    return fail(row_line_,
                std::to_string(record_.size()) + " fields, but the header has " + std::to_string(header_.size()));
  if (rows_ >= kMaxImportRows)
    return fail(row_line_, "more than " + std::to_string(kMaxImportRows) +
                               " rows, the most Cairn imports from one file; split it");
  ++rows_;
  return true;
}

Result<CsvTable> parse_csv(std::string_view text, const std::string& filename) {
  if (auto e = check_csv_text(text, filename)) return Result<CsvTable>::failure(*e);
  if (has_bom(text)) text.remove_prefix(3);
  CsvReader r(
      [text](char* buf, size_t n) mutable {
        const size_t k = std::min(n, text.size());
        std::memcpy(buf, text.data(), k);
        text.remove_prefix(k);
        return k;
      },
      filename);
  if (!r.read_header()) return Result<CsvTable>::failure(r.error());
  CsvTable t;
  t.header = r.header();
  while (r.next()) {
    t.rows.push_back(std::move(r.row()));
    t.row_lines.push_back(r.line());
  }
  if (!r.error().empty()) return Result<CsvTable>::failure(r.error());
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
