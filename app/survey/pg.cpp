#include "app/survey/pg.h"

#include <libpq-fe.h>

#include <regex>

namespace cairn::store::pg {

namespace {

std::string trimmed(std::string s) {
  while (!s.empty() && (s.back() == '\n' || s.back() == ' ')) s.pop_back();
  return s;
}

std::string sqlstate_of(pg_result* r) {
  const char* s = r ? PQresultErrorField(r, PG_DIAG_SQLSTATE) : nullptr;
  return s ? s : "";
}

}  // namespace

// libpq URL syntax (PostgreSQL documentation, "Connection URIs"):
// postgresql://[userspec@][hostspec][/dbname][?paramspec], userspec = user[:password].
std::string redact_url(const std::string& url) {
  static const std::regex userinfo(R"(^([a-zA-Z]+://[^:@/?]*):[^@/?]*@)");
  static const std::regex param(R"(([?&]password=)[^&]*)", std::regex::icase);
  std::string u = std::regex_replace(url, userinfo, "$1@");
  return std::regex_replace(u, param, "$1(hidden)");
}

bool url_has_password(const std::string& url) { return redact_url(url) != url; }

Result::~Result() {
  if (r_) PQclear(r_);
}
Result& Result::operator=(Result&& o) noexcept {
  if (this != &o) {
    if (r_) PQclear(r_);
    r_ = o.r_;
    o.r_ = nullptr;
  }
  return *this;
}
int Result::rows() const { return r_ ? PQntuples(r_) : 0; }
int Result::cols() const { return r_ ? PQnfields(r_) : 0; }
bool Result::null(int row, int col) const { return PQgetisnull(r_, row, col) != 0; }
std::string Result::text(int row, int col) const {
  if (null(row, col)) return "";
  return std::string(PQgetvalue(r_, row, col), static_cast<size_t>(PQgetlength(r_, row, col)));
}

Conn::Conn(const std::string& url) {
  if (url_has_password(url))
    throw PgError("the connection URL " + redact_url(url) +
                      " carries a password; put it in the libpq password file (~/.pgpass or PGPASSFILE) "
                      "or PGPASSWORD instead, so that it never shows on a command line",
                  "");
  c_ = PQconnectdb(url.c_str());
  if (!c_ || PQstatus(c_) != CONNECTION_OK) {
    const std::string m = c_ ? trimmed(PQerrorMessage(c_)) : "out of memory";
    if (c_) PQfinish(c_);
    c_ = nullptr;
    throw PgError("cannot connect to " + redact_url(url) + ": " + m, "");
  }
  // Quiet notices (e.g. "relation already exists, skipping") stay off the terminal.
  PQsetNoticeProcessor(
      c_, [](void*, const char*) {}, nullptr);
  exec("SET client_encoding = 'UTF8'; SET client_min_messages = warning");
}

Conn::~Conn() {
  if (c_) PQfinish(c_);
}

void Conn::fail(const std::string& what, pg_result* r) {
  std::string m = trimmed(r ? PQresultErrorMessage(r) : PQerrorMessage(c_));
  if (m.empty()) m = trimmed(PQerrorMessage(c_));
  const std::string state = sqlstate_of(r);
  if (r) PQclear(r);
  if (m.rfind("ERROR:  ", 0) == 0) m = m.substr(8);
  throw PgError(what.empty() ? m : what + ": " + m, state);
}

void Conn::exec(const std::string& sql) {
  pg_result* r = PQexec(c_, sql.c_str());
  const auto st = PQresultStatus(r);
  if (st != PGRES_COMMAND_OK && st != PGRES_TUPLES_OK) fail("", r);
  PQclear(r);
}

Result Conn::query(const std::string& sql, const std::vector<Param>& params) {
  std::vector<const char*> values;
  for (const auto& p : params) values.push_back(p ? p->c_str() : nullptr);
  pg_result* r =
      PQexecParams(c_, sql.c_str(), static_cast<int>(values.size()), nullptr, values.data(), nullptr, nullptr, 0);
  const auto st = PQresultStatus(r);
  if (st != PGRES_COMMAND_OK && st != PGRES_TUPLES_OK) fail("", r);
  return Result(r);
}

std::optional<std::string> Conn::value(const std::string& sql, const std::vector<Param>& params) {
  Result r = query(sql, params);
  if (r.rows() == 0 || r.cols() == 0 || r.null(0, 0)) return std::nullopt;
  return r.text(0, 0);
}

void Conn::copy_in(const std::string& sql, const std::string& data) {
  pg_result* r = PQexec(c_, sql.c_str());
  if (PQresultStatus(r) != PGRES_COPY_IN) fail("", r);
  PQclear(r);
  // Chunks of at most 1 MiB keep libpq's buffer small.
  const size_t chunk = 1 << 20;
  for (size_t at = 0; at < data.size(); at += chunk) {
    const size_t n = std::min(chunk, data.size() - at);
    if (PQputCopyData(c_, data.data() + at, static_cast<int>(n)) != 1) fail("COPY", nullptr);
  }
  if (PQputCopyEnd(c_, nullptr) != 1) fail("COPY", nullptr);
  r = PQgetResult(c_);
  if (PQresultStatus(r) != PGRES_COMMAND_OK) fail("", r);
  PQclear(r);
  while ((r = PQgetResult(c_)) != nullptr) PQclear(r);
}

void Conn::copy_out(const std::string& sql, const std::function<void(const std::string&)>& line) {
  pg_result* r = PQexec(c_, sql.c_str());
  if (PQresultStatus(r) != PGRES_COPY_OUT) fail("", r);
  PQclear(r);
  char* buf = nullptr;
  int n;
  while ((n = PQgetCopyData(c_, &buf, 0)) > 0) {
    std::string l(buf, static_cast<size_t>(n));
    PQfreemem(buf);
    if (!l.empty() && l.back() == '\n') l.pop_back();
    line(l);
  }
  if (n == -2) fail("COPY", nullptr);
  r = PQgetResult(c_);
  if (PQresultStatus(r) != PGRES_COMMAND_OK) fail("", r);
  PQclear(r);
  while ((r = PQgetResult(c_)) != nullptr) PQclear(r);
}

std::string Conn::literal(const std::string& v) {
  char* e = PQescapeLiteral(c_, v.c_str(), v.size());
  if (!e) fail("escaping a value", nullptr);
  std::string out(e);
  PQfreemem(e);
  return out;
}

std::string Conn::user() const { return PQuser(c_) ? PQuser(c_) : ""; }

std::string copy_escape(const std::string& v) {
  std::string o;
  o.reserve(v.size());
  for (char ch : v) {
    switch (ch) {
      case '\\': o += "\\\\"; break;
      case '\t': o += "\\t"; break;
      case '\n': o += "\\n"; break;
      case '\r': o += "\\r"; break;
      default: o += ch;
    }
  }
  return o;
}

std::vector<std::optional<std::string>> copy_split(const std::string& line) {
  std::vector<std::optional<std::string>> out;
  std::string cur;
  bool raw_null = false;
  size_t start = 0;
  for (size_t i = 0; i <= line.size(); ++i) {
    if (i == line.size() || line[i] == '\t') {
      raw_null = line.compare(start, i - start, "\\N") == 0;
      if (raw_null)
        out.emplace_back(std::nullopt);
      else
        out.emplace_back(cur);
      cur.clear();
      start = i + 1;
      continue;
    }
    char ch = line[i];
    if (ch == '\\' && i + 1 < line.size()) {
      const char e = line[++i];
      switch (e) {
        case 'b': cur += '\b'; break;
        case 'f': cur += '\f'; break;
        case 'n': cur += '\n'; break;
        case 'r': cur += '\r'; break;
        case 't': cur += '\t'; break;
        case 'v': cur += '\v'; break;
        default:
          if (e >= '0' && e <= '7') {  // octal byte, up to three digits
            int v = e - '0';
            for (int k = 0; k < 2 && i + 1 < line.size() && line[i + 1] >= '0' && line[i + 1] <= '7'; ++k)
              v = v * 8 + (line[++i] - '0');
            cur += static_cast<char>(v);
          } else {
            cur += e;  // \\ and any other escaped character stand for themselves
          }
      }
    } else {
      cur += ch;
    }
  }
  return out;
}

}  // namespace cairn::store::pg
