#include "storage/sqlite.h"

#include <sqlite3.h>

#include <cctype>
#include <mutex>
#include <string>
#include <unordered_map>

namespace cairn::store {

namespace {
[[noreturn]] void fail(sqlite3* db, int rc, const std::string& context) {
  std::string msg = db ? sqlite3_errmsg(db) : sqlite3_errstr(rc);
  int code = db ? sqlite3_extended_errcode(db) : rc;
  throw SqlError(context.empty() ? msg : context + ": " + msg, code);
}
}  // namespace

// At most this many idle statements are kept; past it the cache is emptied
// (statements built from varying text, such as a LIMIT, do not pile up).
constexpr size_t kMaxCachedStatements = 128;

struct Db::Cache {
  std::mutex mutex;  // a connection may be shared with a background thread
  std::unordered_map<std::string, sqlite3_stmt*> idle;
  void clear() {
    for (auto& [sql, st] : idle) sqlite3_finalize(st);
    idle.clear();
  }
};

sqlite3_stmt* Db::take(std::string_view sql) {
  if (cache_) {
    std::lock_guard<std::mutex> lock(cache_->mutex);
    auto it = cache_->idle.find(std::string(sql));
    if (it != cache_->idle.end()) {
      sqlite3_stmt* st = it->second;
      cache_->idle.erase(it);
      return st;
    }
  }
  sqlite3_stmt* st = nullptr;
  int rc = sqlite3_prepare_v2(db_, sql.data(), static_cast<int>(sql.size()), &st, nullptr);
  if (rc != SQLITE_OK) {
    sqlite3_finalize(st);
    fail(db_, rc, "preparing SQL");
  }
  return st;
}

void Db::give_back(std::string_view sql, sqlite3_stmt* st) {
  if (!st) return;
  sqlite3_reset(st);
  sqlite3_clear_bindings(st);
  if (!cache_ || !db_) {
    sqlite3_finalize(st);
    return;
  }
  std::lock_guard<std::mutex> lock(cache_->mutex);
  if (cache_->idle.size() >= kMaxCachedStatements) cache_->clear();
  auto [it, inserted] = cache_->idle.emplace(std::string(sql), st);
  if (!inserted) sqlite3_finalize(st);  // the same text in use twice at once: keep one
}

std::string immutable_uri(const std::string& path) {
  // Percent-encode everything but unreserved characters and '/' (RFC 3986, section 2.3).
  std::string uri = "file:";
  static const char* hex = "0123456789ABCDEF";
  for (unsigned char c : path) {
    if (std::isalnum(c) || c == '/' || c == '-' || c == '.' || c == '_' || c == '~') {
      uri += static_cast<char>(c);
    } else {
      uri += '%';
      uri += hex[c >> 4];
      uri += hex[c & 15];
    }
  }
  return uri + "?immutable=1";
}

Db::Db(const std::string& path, int flags, Trust trust) {
  int rc = sqlite3_open_v2(path.c_str(), &db_, flags, nullptr);
  if (rc != SQLITE_OK) {
    std::string msg = db_ ? sqlite3_errmsg(db_) : sqlite3_errstr(rc);
    sqlite3_close_v2(db_);
    db_ = nullptr;
    throw SqlError("cannot open " + path + ": " + msg, rc);
  }
  cache_ = std::make_unique<Cache>();
  sqlite3_extended_result_codes(db_, 1);
  int ok = 1;
  sqlite3_db_config(db_, SQLITE_DBCONFIG_DEFENSIVE, 1, &ok);
  sqlite3_db_config(db_, SQLITE_DBCONFIG_TRUSTED_SCHEMA, 0, &ok);
  sqlite3_db_config(db_, SQLITE_DBCONFIG_ENABLE_LOAD_EXTENSION, 0, &ok);
  if (trust == Trust::Untrusted) {
    sqlite3_db_config(db_, SQLITE_DBCONFIG_ENABLE_TRIGGER, 0, &ok);
    sqlite3_db_config(db_, SQLITE_DBCONFIG_ENABLE_VIEW, 0, &ok);
    // Corrupt cell sizes are reported instead of read past (SQLite
    // documentation, PRAGMA cell_size_check).
    sqlite3_exec(db_, "PRAGMA cell_size_check = ON", nullptr, nullptr, nullptr);
  }
}

Db::Db() = default;
Db::~Db() { close(); }

void Db::set_defensive(bool on) {
  int ok = 0;
  if (sqlite3_db_config(db_, SQLITE_DBCONFIG_DEFENSIVE, on ? 1 : 0, &ok) != SQLITE_OK || ok != (on ? 1 : 0))
    throw SqlError("cannot set defensive mode", SQLITE_ERROR);
}

Db::Db(Db&& o) noexcept : db_(o.db_), cache_(std::move(o.cache_)) { o.db_ = nullptr; }

Db& Db::operator=(Db&& o) noexcept {
  if (this != &o) {
    close();
    db_ = o.db_;
    cache_ = std::move(o.cache_);
    o.db_ = nullptr;
  }
  return *this;
}

void Db::close() {
  if (cache_) {
    std::lock_guard<std::mutex> lock(cache_->mutex);
    cache_->clear();
  }
  cache_.reset();
  if (db_) sqlite3_close_v2(db_);
  db_ = nullptr;
}

void Db::exec(const std::string& sql) {
  char* err = nullptr;
  int rc = sqlite3_exec(db_, sql.c_str(), nullptr, nullptr, &err);
  if (rc != SQLITE_OK) {
    std::string msg = err ? err : sqlite3_errstr(rc);
    sqlite3_free(err);
    throw SqlError(msg, sqlite3_extended_errcode(db_));
  }
}

Stmt Db::prepare(std::string_view sql) { return Stmt(*this, sql); }

std::string Db::query_text(const std::string& sql) {
  Stmt s(*this, sql);
  return s.step() ? s.text(0) : std::string();
}

int64_t Db::query_int(const std::string& sql) {
  Stmt s(*this, sql);
  return s.step() ? s.int64(0) : 0;
}

int64_t Db::changes() const { return sqlite3_changes64(db_); }

std::string Db::errmsg() const { return db_ ? sqlite3_errmsg(db_) : ""; }

Stmt::Stmt(Db& db, std::string_view sql) : db_(&db), st_(db.take(sql)), sql_(sql) {}

Stmt::~Stmt() {
  if (st_) db_->give_back(sql_, st_);
}

Stmt::Stmt(Stmt&& o) noexcept : db_(o.db_), st_(o.st_), sql_(std::move(o.sql_)) { o.st_ = nullptr; }

#define CAIRN_BIND(call)                                  \
  do {                                                    \
    int rc = (call);                                      \
    if (rc != SQLITE_OK) fail(db_->handle(), rc, "bind"); \
  } while (0)

Stmt& Stmt::bind(int i, std::nullptr_t) {
  CAIRN_BIND(sqlite3_bind_null(st_, i));
  return *this;
}
Stmt& Stmt::bind(int i, int64_t v) {
  CAIRN_BIND(sqlite3_bind_int64(st_, i, v));
  return *this;
}
Stmt& Stmt::bind(int i, double v) {
  CAIRN_BIND(sqlite3_bind_double(st_, i, v));
  return *this;
}
Stmt& Stmt::bind(int i, std::string_view v) {
  CAIRN_BIND(sqlite3_bind_text(st_, i, v.data(), static_cast<int>(v.size()), SQLITE_TRANSIENT));
  return *this;
}
Stmt& Stmt::bind_blob(int i, const void* data, int size) {
  CAIRN_BIND(sqlite3_bind_blob(st_, i, data, size, SQLITE_TRANSIENT));
  return *this;
}
Stmt& Stmt::bind(int i, const std::optional<double>& v) { return v ? bind(i, *v) : bind(i, nullptr); }
Stmt& Stmt::bind(int i, const std::optional<int>& v) { return v ? bind(i, *v) : bind(i, nullptr); }
Stmt& Stmt::bind(int i, const std::optional<std::string>& v) {
  return v ? bind(i, std::string_view(*v)) : bind(i, nullptr);
}
Stmt& Stmt::bind_text_or_null(int i, const std::string& v) {
  return v.empty() ? bind(i, nullptr) : bind(i, std::string_view(v));
}
#undef CAIRN_BIND

bool Stmt::step() {
  int rc = sqlite3_step(st_);
  if (rc == SQLITE_ROW) return true;
  if (rc == SQLITE_DONE) return false;
  fail(db_->handle(), rc, "");
}

void Stmt::run() {
  while (step()) {}
}

void Stmt::reset() {
  sqlite3_reset(st_);
  sqlite3_clear_bindings(st_);
}

bool Stmt::is_null(int c) const { return sqlite3_column_type(st_, c) == SQLITE_NULL; }
int Stmt::storage_class(int c) const { return sqlite3_column_type(st_, c); }
int64_t Stmt::int64(int c) const { return sqlite3_column_int64(st_, c); }
double Stmt::real(int c) const { return sqlite3_column_double(st_, c); }
std::string Stmt::blob(int c) const {
  const void* p = sqlite3_column_blob(st_, c);
  if (!p) return {};
  return std::string(static_cast<const char*>(p), static_cast<size_t>(sqlite3_column_bytes(st_, c)));
}
std::string Stmt::text(int c) const {
  const unsigned char* p = sqlite3_column_text(st_, c);
  if (!p) return {};
  return std::string(reinterpret_cast<const char*>(p), static_cast<size_t>(sqlite3_column_bytes(st_, c)));
}
std::optional<double> Stmt::opt_real(int c) const {
  if (is_null(c)) return std::nullopt;
  return real(c);
}
std::optional<int> Stmt::opt_int(int c) const {
  if (is_null(c)) return std::nullopt;
  return integer(c);
}
std::optional<std::string> Stmt::opt_text(int c) const {
  if (is_null(c)) return std::nullopt;
  return text(c);
}

BulkWriteCache::BulkWriteCache(Db& db, int64_t kib) : db_(db), pages_(db.query_int("PRAGMA cache_size")) {
  db_.exec("PRAGMA cache_size = " + std::to_string(-kib));
}

BulkWriteCache::~BulkWriteCache() {
  try {
    db_.exec("PRAGMA cache_size = " + std::to_string(pages_));
  } catch (...) {  // a destructor must not throw; the connection keeps the larger cache
  }
}

}  // namespace cairn::store
