// A thin RAII layer over the SQLite C API, used by every storage module.
// Every statement is prepared and its values bound as parameters (never pasted
// into SQL text), so a name such as "'); DROP TABLE stations;--" is stored as
// it is written (SQLite documentation, "Binding Values To Prepared Statements").
#pragma once
#include <cstdint>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>

struct sqlite3;
struct sqlite3_stmt;

namespace cairn::store {

// An SQLite failure, with SQLite's own message and the extended result code.
class SqlError : public std::runtime_error {
 public:
  SqlError(const std::string& what, int code) : std::runtime_error(what), code_(code) {}
  int code() const { return code_; }

 private:
  int code_;
};

class Stmt;

// How far a connection trusts the file it opens. Every connection runs with
// SQLite's defensive settings (SQLite documentation, "Defense Against The Dark
// Arts"): SQLITE_DBCONFIG_DEFENSIVE (no writable_schema, no raw page writes),
// trusted_schema off (functions with side effects are refused in the schema's
// triggers, views, defaults and indexes) and extension loading off. A file from
// another device (Untrusted) additionally has its triggers and views disabled
// for the connection, so nothing its schema defines ever runs.
enum class Trust { Own, Untrusted };

// The URI that opens PATH immutable and read-only (SQLite documentation, "URI
// Filenames": immutable=1), for a file on read-only media whose -wal and -shm
// cannot be created; open it with SQLITE_OPEN_READONLY | SQLITE_OPEN_URI.
std::string immutable_uri(const std::string& path);

// One database connection.
class Db {
 public:
  Db();
  // Opens PATH with sqlite3_open_v2 flags (SQLITE_OPEN_*). Throws SqlError.
  Db(const std::string& path, int flags, Trust trust = Trust::Own);
  ~Db();
  Db(Db&& o) noexcept;
  Db& operator=(Db&& o) noexcept;
  Db(const Db&) = delete;
  Db& operator=(const Db&) = delete;

  sqlite3* handle() const { return db_; }
  explicit operator bool() const { return db_ != nullptr; }
  void close();
  // SQLITE_DBCONFIG_DEFENSIVE (on from the open): off only while Cairn's own
  // migration text rewrites a table definition (storage/schema.cpp).
  void set_defensive(bool on);

  // Runs one or more statements without parameters (schema, pragmas).
  void exec(const std::string& sql);
  Stmt prepare(std::string_view sql);
  // First column of the first row of a parameterless query, as text ("" when none).
  std::string query_text(const std::string& sql);
  int64_t query_int(const std::string& sql);
  int64_t changes() const;
  std::string errmsg() const;

 private:
  friend class Stmt;
  // Prepared statements kept for reuse, by SQL text: preparing is most of the
  // cost of a small statement (SQLite documentation, "Prepared Statement
  // Object": "prepare once, bind, step, reset, repeat"), and the record API
  // runs the same few statements for every row of an import or a merge. A
  // statement is taken out while a Stmt uses it and put back reset with its
  // bindings cleared, so a cached statement never holds a read transaction.
  struct Cache;
  sqlite3_stmt* take(std::string_view sql);
  void give_back(std::string_view sql, sqlite3_stmt* st);
  sqlite3* db_ = nullptr;
  std::unique_ptr<Cache> cache_;
};

// A prepared statement. Parameters are numbered from 1, columns from 0.
class Stmt {
 public:
  Stmt(Db& db, std::string_view sql);
  ~Stmt();
  Stmt(Stmt&& o) noexcept;
  Stmt(const Stmt&) = delete;
  Stmt& operator=(const Stmt&) = delete;
  Stmt& operator=(Stmt&&) = delete;

  Stmt& bind(int i, std::nullptr_t);
  Stmt& bind(int i, int64_t v);
  Stmt& bind(int i, int v) { return bind(i, static_cast<int64_t>(v)); }
  Stmt& bind(int i, double v);
  Stmt& bind(int i, std::string_view v);
  Stmt& bind(int i, const std::string& v) { return bind(i, std::string_view(v)); }
  Stmt& bind(int i, const char* v) { return bind(i, std::string_view(v)); }
  Stmt& bind(int i, const std::optional<double>& v);
  Stmt& bind(int i, const std::optional<int>& v);
  Stmt& bind(int i, const std::optional<std::string>& v);
  // Binds bytes as a BLOB (copied).
  Stmt& bind_blob(int i, const void* data, int size);
  // Binds a text that is NULL when empty.
  Stmt& bind_text_or_null(int i, const std::string& v);

  // Steps once: true when a row is ready, false when done. Throws SqlError.
  bool step();
  // Steps to completion (for statements that return no rows).
  void run();
  void reset();

  bool is_null(int col) const;
  // SQLite's storage class of a column of the current row: SQLITE_INTEGER,
  // SQLITE_FLOAT, SQLITE_TEXT, SQLITE_BLOB or SQLITE_NULL.
  int storage_class(int col) const;
  int64_t int64(int col) const;
  int integer(int col) const { return static_cast<int>(int64(col)); }
  double real(int col) const;
  std::string text(int col) const;  // "" for NULL
  std::string blob(int col) const;  // the bytes of a BLOB ("" for NULL)
  std::optional<double> opt_real(int col) const;
  std::optional<int> opt_int(int col) const;
  std::optional<std::string> opt_text(int col) const;

 private:
  Db* db_;
  sqlite3_stmt* st_ = nullptr;
  std::string sql_;  // the text it was prepared from: the key it goes back to the cache under
};

// A larger page cache for one bulk write (an import's or a merge's single
// transaction), the connection's own size given back when it ends. With
// SQLite's default (about 2 MB) the dirty pages of a season's indexes are
// written to the -wal and read back several times before the commit ("cache
// spill", SQLite documentation, PRAGMA cache_size and PRAGMA cache_spill).
class BulkWriteCache {
 public:
  explicit BulkWriteCache(Db& db, int64_t kib = kDefaultKib);
  ~BulkWriteCache();
  BulkWriteCache(const BulkWriteCache&) = delete;
  BulkWriteCache& operator=(const BulkWriteCache&) = delete;
  static constexpr int64_t kDefaultKib = 65536;

 private:
  Db& db_;
  int64_t pages_;  // PRAGMA cache_size before: pages, or -KiB when negative
};

}  // namespace cairn::store
