// A thin RAII layer over libpq for the survey store (PostgreSQL documentation,
// "libpq - C Library"). Values always travel as parameters of PQexecParams or
// as escaped COPY fields, never pasted into SQL text; identifiers come from
// the program (table and column names of the project schema), never from input.
//
// Connection strings are libpq URLs (postgresql://user@host:port/db?...). A URL
// that carries a password is refused: passwords come from the libpq password
// file (~/.pgpass or PGPASSFILE) or the environment, so that they never show in
// a process list, a shell history or a log. Messages name the URL without it.
#pragma once
#include <functional>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

struct pg_conn;
struct pg_result;

namespace cairn::store::pg {

// A failure reported by the server or by libpq, with the SQLSTATE when known.
class PgError : public std::runtime_error {
 public:
  PgError(const std::string& what, std::string sqlstate) : std::runtime_error(what), sqlstate_(std::move(sqlstate)) {}
  const std::string& sqlstate() const { return sqlstate_; }

 private:
  std::string sqlstate_;
};

// URL with any password removed (for messages).
std::string redact_url(const std::string& url);
// True when URL names a password (user:secret@ or password=).
bool url_has_password(const std::string& url);

using Param = std::optional<std::string>;  // nothing: SQL NULL

class Result {
 public:
  explicit Result(pg_result* r = nullptr) : r_(r) {}
  ~Result();
  Result(Result&& o) noexcept : r_(o.r_) { o.r_ = nullptr; }
  Result& operator=(Result&& o) noexcept;
  Result(const Result&) = delete;
  Result& operator=(const Result&) = delete;

  int rows() const;
  int cols() const;
  bool null(int row, int col) const;
  std::string text(int row, int col) const;  // "" for NULL

 private:
  pg_result* r_;
};

class Conn {
 public:
  // Connects; throws PgError naming the redacted URL.
  explicit Conn(const std::string& url);
  ~Conn();
  Conn(const Conn&) = delete;
  Conn& operator=(const Conn&) = delete;

  // Runs SQL without parameters (one or more statements).
  void exec(const std::string& sql);
  // One statement with $1.. parameters (text format).
  Result query(const std::string& sql, const std::vector<Param>& params = {});
  // First column of the first row, or nothing when no row or NULL.
  std::optional<std::string> value(const std::string& sql, const std::vector<Param>& params = {});

  // COPY ... FROM STDIN: `data` in COPY text format.
  void copy_in(const std::string& sql, const std::string& data);
  // COPY ... TO STDOUT: calls `line` with each row (COPY text format, no newline).
  void copy_out(const std::string& sql, const std::function<void(const std::string&)>& line);

  // Literal for SQL text where parameters cannot go (COPY queries).
  std::string literal(const std::string& v);
  std::string user() const;
  pg_conn* handle() const { return c_; }

 private:
  [[noreturn]] void fail(const std::string& what, pg_result* r);
  pg_conn* c_ = nullptr;
};

// COPY text format (PostgreSQL documentation, "COPY", "Text Format"): fields
// separated by tabs, \N for NULL, backslash escapes for \, tab, newline, CR.
std::string copy_escape(const std::string& v);
std::vector<std::optional<std::string>> copy_split(const std::string& line);

}  // namespace cairn::store::pg
