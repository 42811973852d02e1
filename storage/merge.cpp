#include "storage/merge.h"

#include <sqlite3.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <set>
#include <unordered_map>
#include <stdexcept>

#include "geomath/geodesy.h"
#include "formats/ids.h"
#include "storage/schema.h"
#include "formats/sha256.h"
#include "storage/sqlite.h"
#include "formats/temp_files.h"
#include "formats/utf8.h"
#include "formats/validate.h"
#include "storage/reviews.h"
#include "storage/terrain.h"
#include "geomath/decimal.h"
#include "storage/track.h"
#include "storage/pick_lists.h"

namespace fs = std::filesystem;

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

// What the merges table keeps of a source file's path: the path relative to the
// camp file's folder when the source lies inside it, otherwise its file name, so
// a bundled or copied camp file carries no machine's absolute paths.
std::string relative_peer_path(const std::string& camp_file, const std::string& source) {
  std::error_code ec;
  const fs::path camp_dir = fs::absolute(fs::path(camp_file), ec).parent_path();
  const fs::path src = fs::absolute(fs::path(source), ec).lexically_normal();
  const fs::path rel = src.lexically_relative(camp_dir.lexically_normal());
  if (!rel.empty() && *rel.begin() != "..") return rel.generic_string();
  return fs::path(source).filename().string();
}

// ---- rows as typed values ------------------------------------------------------

enum class Affinity { Integer, Real, Text };

// SQLite's affinity rules for a declared column type (SQLite documentation,
// "Datatypes In SQLite", section 3.1), for the types the schema uses.
Affinity affinity_of(std::string type) {
  for (auto& c : type) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  if (type.find("INT") != std::string::npos) return Affinity::Integer;
  if (type.find("CHAR") != std::string::npos || type.find("CLOB") != std::string::npos ||
      type.find("TEXT") != std::string::npos)
    return Affinity::Text;
  return Affinity::Real;  // REAL, FLOA, DOUB (no NUMERIC or BLOB columns in a project file)
}

struct Value {
  enum Type { Null, Int, Real, Text } type = Null;
  int64_t i = 0;
  double d = 0;
  std::string s;

  bool operator==(const Value& o) const {
    if (type != o.type) return false;
    switch (type) {
      case Null: return true;
      case Int: return i == o.i;
      case Real: return d == o.d || (std::isnan(d) && std::isnan(o.d));
      case Text: return s == o.s;
    }
    return false;
  }
  bool operator!=(const Value& o) const { return !(*this == o); }
  bool null() const { return type == Null; }
  // For ordering versions with equal stamps and for messages.
  std::string text() const {
    switch (type) {
      case Null: return "";
      case Int: return std::to_string(i);
      case Real: return geo::format_decimal("%.17g", d);
      case Text: return s;
    }
    return "";
  }
  static Value of(const std::string& v) {
    Value x;
    x.type = Text;
    x.s = v;
    return x;
  }
};
using Row = std::vector<Value>;

Value read_value(const Stmt& s, int col, Affinity a) {
  Value v;
  if (s.is_null(col)) return v;
  switch (a) {
    case Affinity::Integer: v.type = Value::Int, v.i = s.int64(col); break;
    case Affinity::Real: v.type = Value::Real, v.d = s.real(col); break;
    case Affinity::Text: v.type = Value::Text, v.s = s.text(col); break;
  }
  return v;
}

void bind_value(Stmt& s, int i, const Value& v) {
  switch (v.type) {
    case Value::Null: s.bind(i, nullptr); break;
    case Value::Int: s.bind(i, v.i); break;
    case Value::Real: s.bind(i, v.d); break;
    case Value::Text: s.bind(i, v.s); break;
  }
}

// An SQL identifier in double quotes, its own quotes doubled (SQLite
// documentation, "SQL Keywords": quoting identifiers).
std::string quoted(const std::string& name);

}  // namespace

std::string code_holders_sql(const std::string& table, const std::string& key, const std::string& scope) {
  // Two index lookups (the code itself; the clash rows that name it as the
  // original), not one WHERE with an OR across the join, which SQLite can only
  // answer with a scan of the whole table (EXPLAIN QUERY PLAN: "SCAN r").
  const std::string k = quoted(key);
  const std::string in_scope = scope.empty() ? "" : " AND r." + quoted(scope) + " IS ?2";
  const std::string cols = "SELECT r.uuid, r." + k + ", r.created, r.deleted IS NOT NULL, kc.original, kc.stored";
  return cols + " FROM " + quoted(table) + " r LEFT JOIN key_clashes kc ON kc.record = r.uuid WHERE r." + k + " = ?1" +
         in_scope + " UNION " + cols + " FROM key_clashes kc JOIN " + quoted(table) +
         " r ON r.uuid = kc.record WHERE kc.original = ?1 AND kc.stored = r." + k + in_scope + " ORDER BY 3, 1";
}

namespace {

std::string quoted(const std::string& name) {
  std::string q = "\"";
  for (char c : name) {
    if (c == '"') q += '"';
    q += c;
  }
  return q + "\"";
}

// ---- tables --------------------------------------------------------------------

struct Column {
  std::string name;
  Affinity affinity;
};

struct Table {
  std::string name;
  std::vector<Column> cols;
  int uuid = -1, created = -1, updated = -1, device = -1, deleted = -1;
  int key = -1, scope = -1;  // natural key, unique among live records (within scope)
  // Statement texts, made once (table_info): a merge runs them for every record.
  std::string columns, select_by_uuid, insert;
  int col(const std::string& n) const {
    for (size_t i = 0; i < cols.size(); ++i)
      if (cols[i].name == n) return static_cast<int>(i);
    return -1;
  }
  const std::string& list() const { return columns; }
};

// Natural keys, as the partial unique indexes of storage/schema.cpp define them.
struct KeySpec {
  const char* table;
  const char* key;
  const char* scope;  // nullptr: unique in the whole table
};
const KeySpec kKeys[] = {{"people", "initials", nullptr}, {"units", "code", nullptr},   {"contacts", "name", nullptr},
                         {"stations", "code", nullptr},   {"planes", "ref", "station"}, {"lines", "ref", "station"}};

Table table_info(Db& db, const std::string& name) {
  Table t;
  t.name = name;
  Stmt s(db, "SELECT name, type FROM pragma_table_info(?) ORDER BY cid");
  s.bind(1, name);
  while (s.step()) t.cols.push_back({s.text(0), affinity_of(s.text(1))});
  if (t.cols.empty()) throw std::runtime_error("the file has no table '" + name + "'");
  t.uuid = t.col("uuid");
  t.created = t.col("created");
  t.updated = t.col("updated");
  t.device = t.col("device");
  t.deleted = t.col("deleted");
  for (const auto& k : kKeys)
    if (name == k.table) {
      t.key = t.col(k.key);
      t.scope = k.scope ? t.col(k.scope) : -1;
    }
  std::string marks;
  for (const auto& c : t.cols) {
    t.columns += (t.columns.empty() ? "" : ", ") + quoted(c.name);
    marks += marks.empty() ? "?" : ",?";
  }
  t.select_by_uuid = "SELECT " + t.columns + " FROM " + quoted(name) + " WHERE uuid = ?";
  t.insert = "INSERT INTO " + quoted(name) + "(" + t.columns + ") VALUES (" + marks + ")";
  return t;
}

// The source's row of `uuid` must be read with the target's column list; a
// source migrated to the same schema version has the same columns.
Row read_columns(const Stmt& s, const Table& t) {
  Row r(t.cols.size());
  for (size_t i = 0; i < t.cols.size(); ++i) r[i] = read_value(s, static_cast<int>(i), t.cols[i].affinity);
  return r;
}

std::optional<Row> read_row(Db& db, const Table& t, const std::string& uuid) {
  Stmt s(db, t.select_by_uuid);
  s.bind(1, uuid);
  if (!s.step()) return std::nullopt;
  return read_columns(s, t);
}

// The code a record was written with: a record stored under CODE~xxxxxx after a
// clash reads as CODE again (unless a person has renamed it since).
void natural_key(Db& db, const Table& t, Row& r) {
  if (t.key < 0 || r[t.key].null()) return;
  Stmt s(db, "SELECT original, stored FROM key_clashes WHERE record = ?");
  s.bind(1, r[t.uuid].s);
  if (s.step() && s.text(1) == r[t.key].s) r[t.key] = Value::of(s.text(0));
}

struct Stamp {
  std::string updated, device;
  bool operator==(const Stamp& o) const { return updated == o.updated && device == o.device; }
  bool operator<(const Stamp& o) const { return std::tie(updated, device) < std::tie(o.updated, o.device); }
};
Stamp stamp_of(const Table& t, const Row& r) { return {r[t.updated].s, r[t.device].s}; }

// A conflict's id: a UUID (version 8, RFC 9562 section 5.8) made from the
// SHA-256 digest of the record and the version kept aside, so that the same
// conflict found twice, in any order, is one row.
std::string conflict_id(const std::string& table, const std::string& record, const Stamp& v) {
  std::string h = sha256_hex(table + "\n" + record + "\n" + v.updated + "\n" + v.device).substr(0, 32);
  h[12] = '8';
  h[16] = "89ab"[std::stoi(h.substr(16, 1), nullptr, 16) & 3];
  return h.substr(0, 8) + "-" + h.substr(8, 4) + "-" + h.substr(12, 4) + "-" + h.substr(16, 4) + "-" + h.substr(20);
}

// ---- lineage from the audit trail ------------------------------------------------

// Parent versions of each version of one record, from the audit rows (each
// holds the row before and after one write).
class Lineage {
 public:
  Lineage(Db& db, const std::string& record) {
    Stmt s(db,
           "SELECT json_extract(new_values, '$.updated'), json_extract(new_values, '$.device'), "
           "json_extract(old_values, '$.updated'), json_extract(old_values, '$.device') "
           "FROM audit WHERE record = ? AND new_values IS NOT NULL AND old_values IS NOT NULL");
    s.bind(1, record);
    while (s.step()) parents_.emplace(Stamp{s.text(0), s.text(1)}, Stamp{s.text(2), s.text(3)});
  }
  // True when `a` is a strict ancestor of `b`.
  bool ancestor(const Stamp& a, const Stamp& b) const {
    std::set<Stamp> seen;
    std::vector<Stamp> todo{b};
    while (!todo.empty()) {
      const Stamp x = todo.back();
      todo.pop_back();
      auto [lo, hi] = parents_.equal_range(x);
      for (auto it = lo; it != hi; ++it) {
        if (it->second == a) return true;
        if (seen.insert(it->second).second) todo.push_back(it->second);
      }
    }
    return false;
  }

 private:
  std::multimap<Stamp, Stamp> parents_;
};

// ---- a source, copied and checked -------------------------------------------------

const char* const kRecordOrder[] = {"people", "units", "contacts", "stations", "planes", "lines", "points", "photos"};

// Tables of Cairn's own schema that merge reads or leaves alone.
const std::set<std::string> kOwnTables = {"project", "devices", "audit", "merges", "conflicts", "conflict_values",
                                          "key_clashes", "people", "units", "contacts", "stations", "planes", "lines",
                                          "points", "photos",
                                          // the terrain and the day track merge on their own rules
                                          // (storage/terrain.h, storage/track.h); the pick-lists stay with
                                          // their camp, a source's extra codes reported (storage/SCHEMA.md)
                                          "terrain", "terrain_tiles", "pick_lists", "track_points"};

// Tables Cairn's modules keep beside the records (rows with the record columns
// but no audit trail, merged by UUID), each with the function that creates it
// in a camp file that has not got it yet. Only these are ever created by a
// merge, always from Cairn's own schema text, never from a source file's.
struct SideTable {
  const char* name;
  void (*ensure)(Project&);
};
const SideTable kSideTables[] = {{"flag_reviews", ensure_review_tables}, {"day_signoffs", ensure_review_tables}};

bool is_side_table(const std::string& name) {
  for (const auto& t : kSideTables)
    if (name == t.name) return true;
  return false;
}

// Opens a source file read-only with triggers and views off; a file on
// read-only media (no -shm can be made beside it) is read immutable, as it
// lies on disk.
Db open_source(const std::string& path, std::vector<std::string>& notes) {
  try {
    Db d(path, SQLITE_OPEN_READONLY, Trust::Untrusted);
    d.query_int("SELECT count(*) FROM sqlite_master");
    return d;
  } catch (const SqlError& first) {
    try {
      Db d(immutable_uri(path), SQLITE_OPEN_READONLY | SQLITE_OPEN_URI, Trust::Untrusted);
      d.query_int("SELECT count(*) FROM sqlite_master");
      notes.push_back(path + " could not be opened normally (" + first.what() +
                      "); it was read as it lies on disk (immutable), without its -wal");
      return d;
    } catch (const SqlError&) {
      throw first;
    }
  }
}

// Checks PATH (application id, schema version), copies its pages into DEST
// with SQLite's online backup API, which runs none of the file's SQL, and
// checks the copy (integrity, the kinds of its tables): the pages checked are
// the pages merged, and the check runs on a connection that can write, where
// PRAGMA integrity_check also verifies the CHECK constraints (on a read-only
// connection SQLite 3.40 leaves them out). Project::open of the copy then
// leaves its own quick check out (OpenOptions::integrity_checked). Tables
// Cairn does not know, triggers and views are named in NOTES and never run or
// adopted.
void snapshot(const std::string& path, const std::string& dest, std::vector<std::string>& notes,
              std::vector<std::string>& ignored) {
  Db src;
  int64_t app = 0, version = 0;
  try {
    src = open_source(path, notes);
    app = src.query_int("PRAGMA application_id");
    version = src.query_int("PRAGMA user_version");
  } catch (const SqlError& e) {
    throw std::runtime_error(path + " is not a Cairn project file (" + e.what() + ")");
  }
  if (app != kApplicationId) throw std::runtime_error(path + " is not a Cairn project file");
  if (version > kSchemaVersion)
    throw std::runtime_error(path + " was written by a newer version of Cairn (schema version " +
                             std::to_string(version) + "); merge it with a newer Cairn");
  Db out;
  try {
    out = Db(dest, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE, Trust::Untrusted);
    sqlite3_backup* b = sqlite3_backup_init(out.handle(), "main", src.handle(), "main");
    if (!b) throw SqlError(out.errmsg(), 0);
    const int rc = sqlite3_backup_step(b, -1);
    sqlite3_backup_finish(b);
    if (rc != SQLITE_DONE) throw SqlError(sqlite3_errstr(rc), rc);
  } catch (const SqlError& e) {
    throw std::runtime_error(path + " cannot be read (" + std::string(e.what()) +
                             "); restore it from one of its backups before merging");
  }
  try {
    Stmt ic(out, "PRAGMA integrity_check(20)");
    std::string first;
    while (ic.step())
      if (first.empty()) first = ic.text(0);
    if (first != "ok")
      throw std::runtime_error(path + " failed its integrity check (" + terminal_safe(first) +
                               "); restore it from one of its backups before merging");
    Stmt m(out, "SELECT type, name FROM sqlite_master WHERE name NOT LIKE 'sqlite\\_%' ESCAPE '\\' ORDER BY name");
    while (m.step()) {
      const std::string type = m.text(0), name = m.text(1);
      const bool own = kOwnTables.count(name) > 0 || is_side_table(name);
      if (own && type != "table")
        throw std::runtime_error(path + " is not a Cairn project file: '" + terminal_safe(name) + "' is a " +
                                 terminal_safe(type) + ", not a table");
      if (type == "table" && !own) {
        ignored.push_back("table " + name);
        notes.push_back(path + ": table " + terminal_safe(name) + " is not a Cairn table; it was not merged");
      } else if (type == "trigger" || type == "view") {
        ignored.push_back(type + " " + name);
        notes.push_back(path + ": " + type + " " + terminal_safe(name) + " was neither run nor merged");
      }
    }
  } catch (const SqlError& e) {
    throw std::runtime_error(path + " cannot be read (" + std::string(e.what()) +
                             "); restore it from one of its backups before merging");
  }
}

void validate_source(Db& db, const std::string& path);

// A source copied beside the camp file (formats/temp_files.h: removed on any
// exit, SIGTERM included, and after a SIGKILL at the camp file's next opening).
struct Source {
  TempPath copy_file, backups;
  std::optional<Project> project;
  ProjectInfo info;
  std::vector<std::string> notes;    // for the report's warnings
  std::vector<std::string> ignored;  // "table x", "trigger y", "view z"
  // The file's key_clashes rows (record -> original, stored), read once: every
  // incoming record asks for its natural code. A few rows per clash reported.
  std::unordered_map<std::string, std::pair<std::string, std::string>> clashes;

  Source(const std::string& path, const std::string& camp) : copy_file(camp), backups(camp) {
    std::error_code ec;
    if (!fs::exists(path, ec)) throw std::runtime_error("no project file " + path);
    const std::string copy = copy_file.path();
    snapshot(path, copy, notes, ignored);
    OpenOptions o;
    o.backups = false;
    o.untrusted = true;
    o.integrity_checked = true;     // snapshot() checked these very pages
    o.backup_dir = backups.path();  // only a migration of an older file writes one
    try {
      project.emplace(Project::open(copy, o));  // migrates the copy when it is older
    } catch (const std::exception& e) {
      std::string m = e.what();
      const size_t at = m.find(copy);
      if (at != std::string::npos) m.replace(at, copy.size(), path);
      throw std::runtime_error(m);
    }
    if (!project->problem().empty())
      throw std::runtime_error(path + " failed its integrity check; restore it from one of its backups before merging");
    validate_source(db(), path);
    info = project->info();
    // Read record by record in creation order, not page order: a page cache
    // of its own (32 MiB) keeps the reads out of the kernel (as in merge_files).
    db().exec("PRAGMA cache_size = -32768");
    Stmt k(db(), "SELECT record, original, stored FROM key_clashes");
    while (k.step()) clashes.emplace(k.text(0), std::make_pair(k.text(1), k.text(2)));
  }
  Db& db() { return project->db(); }

  // natural_key() of an incoming record, from the rows read above.
  void natural_key(const Table& t, Row& r) const {
    if (t.key < 0 || r[t.key].null()) return;
    const auto it = clashes.find(r[t.uuid].s);
    if (it != clashes.end() && it->second.second == r[t.key].s) r[t.key] = Value::of(it->second.first);
  }
};

// ---- the merge of one source -----------------------------------------------------------

// Who points at what (for the dangling-reference warnings).
struct Ref {
  const char* table;
  const char* column;
  const char* parent;
};
const Ref kRefs[] = {
    {"contacts", "lower_unit", "units"}, {"contacts", "upper_unit", "units"}, {"stations", "unit", "units"},
    {"stations", "observer", "people"},  {"planes", "station", "stations"},   {"planes", "contact", "contacts"},
    {"planes", "observer", "people"},    {"lines", "station", "stations"},    {"lines", "host_plane", "planes"},
    {"lines", "observer", "people"},     {"points", "contact", "contacts"},   {"points", "observer", "people"},
    {"photos", "station", "stations"}};

// ---- every source record passes the rules of the record API ------------------------

bool is_reference(const std::string& table, const std::string& column) {
  for (const Ref& r : kRefs)
    if (table == r.table && column == r.column) return true;
  return column == "person" || column == "device" || column == "record" || column == "uuid";
}

// The rule one stored value of a source file breaks, if any: its storage class
// must be the column's, and its value pass the same rules (formats/validate.h,
// formats/utf8.h) that the record API and the importers apply.
Check check_cell(const std::string& table, const Column& c, const Stmt& s, int i) {
  const int sc = s.storage_class(i);
  const std::string& n = c.name;
  if (sc == SQLITE_NULL) return std::nullopt;
  if (sc == SQLITE_BLOB) return Broken{"type", n + " holds binary data, not a value"};
  if (c.affinity == Affinity::Text) {
    if (sc != SQLITE_TEXT) return Broken{"type", n + " holds a number where text belongs"};
    const std::string v = s.text(i);
    const bool multiline = n == "notes" || n == "comment" || n == "caption" || n == "old_values" || n == "new_values";
    if (auto b = check_text(v, n, multiline)) return b;
    if (is_reference(table, n)) {
      if (v.empty() && n != "uuid" && n != "device" && n != "record") return std::nullopt;
      return check_uuid(v, n);
    }
    if (n == "created" || n == "updated" || n == "deleted" || n == "time" || n == "at") {
      if (auto b = check_time(v, nullptr)) return Broken{b->rule, n + ": " + b->message};
      return std::nullopt;
    }
    if (n == "colour") return check_colour(v);
    if (n == "sha256") return check_sha256(v);
    if (table == "photos" && n == "path") return check_photo_path(v);
    return std::nullopt;
  }
  if (c.affinity == Affinity::Integer) {
    if (sc != SQLITE_INTEGER) return Broken{"type", n + " is not a whole number"};
    const int64_t v = s.int64(i);
    const int clamped = static_cast<int>(std::clamp<int64_t>(v, -1000000, 1000000));
    if (n == "quality") return check_quality(clamped);
    if (n == "age_rank") return check_age_rank(clamped);
    return std::nullopt;
  }
  if (sc != SQLITE_INTEGER && sc != SQLITE_FLOAT) return Broken{"type", n + " holds text where a number belongs"};
  const double v = s.real(i);
  if (n == "lat") return check_latitude(v);
  if (n == "lon") return check_longitude(v);
  if (n == "elevation") return check_elevation(v);
  if (n == "h_accuracy" || n == "v_accuracy") return check_accuracy(v, n);
  if (n == "strike" || n == "measured_strike" || n == "trend" || n == "measured_trend") return check_direction(v, n);
  if (n == "dip" || n == "measured_dip" || n == "plunge" || n == "measured_plunge") return check_inclination(v, n);
  if (n == "rake") return check_rake(v);
  if (n == "declination") return check_declination(v);
  if (!std::isfinite(v)) return Broken{"number", n + " is not a finite number"};
  return std::nullopt;
}

// Reads every row that a merge takes from a source (devices, audit rows,
// records, code clashes, side tables) and refuses the first bad value, naming
// the file, table, record UUID and rule. Runs before anything is written.
void validate_source(Db& db, const std::string& path) {
  std::vector<std::string> tables = {"devices", "audit", "key_clashes", "track_points", "pick_lists"};
  for (const char* t : kRecordOrder) tables.push_back(t);
  for (const auto& side : kSideTables) {
    Stmt h(db, "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?");
    h.bind(1, side.name);
    if (h.step()) tables.push_back(side.name);
  }
  for (const auto& name : tables) {
    const Table t = table_info(db, name);
    Stmt s(db, "SELECT " + t.list() + " FROM " + quoted(name));
    // What names a row: its UUID, the record it is about, a fix's row id, a pick-list code.
    const int id_col = t.uuid >= 0            ? t.uuid
                       : t.col("record") >= 0 ? t.col("record")
                       : t.col("id") >= 0     ? t.col("id")
                                              : t.col("code");
    while (s.step()) {
      for (size_t i = 0; i < t.cols.size(); ++i) {
        const Check b = check_cell(name, t.cols[i], s, static_cast<int>(i));
        if (!b) continue;
        const std::string id = id_col >= 0 ? terminal_safe(s.text(id_col).substr(0, 80)) : std::string("?");
        throw std::runtime_error(path + ": table " + name + ", record " + id + ": " + b->rule + ": " +
                                 terminal_safe(b->message) +
                                 "; nothing was merged. Correct the record on the tablet, or leave this file out");
      }
    }
  }
}

struct Candidate {
  enum Origin { Current, Kept, Incoming } origin;
  Row row;
  Stamp stamp;
  std::string conflict;  // Kept: its conflict id
};

enum class Outcome { Added, Updated, Skipped, Conflict };

class Merger {
 public:
  Merger(Project& target, const MergeOptions& o, MergeReport& rep) : p_(target), db_(target.db()), o_(o), rep_(rep) {
    for (const char* t : kRecordOrder) tables_.emplace(t, table_info(db_, t));
    tables_.emplace("devices", table_info(db_, "devices"));
    tables_.emplace("audit", table_info(db_, "audit"));
  }

  void merge(Source& src, const std::string& path, size_t index, size_t count) {
    SourceMerge sm;
    const long writes_before = writes_;
    sm.path = path;
    sm.ignored = src.ignored;
    for (const auto& n : src.notes) rep_.warnings.push_back(n);
    sm.file_uuid = src.info.file_uuid;
    sm.name = src.info.name;
    const ProjectInfo mine = p_.info();
    if (!mine.utm_zone.empty() && !src.info.utm_zone.empty() && mine.utm_zone != src.info.utm_zone)
      rep_.warnings.push_back(path + " works in UTM zone " + src.info.utm_zone + ", this file in " + mine.utm_zone +
                              "; positions are WGS84 and merge unchanged");

    MergeProgress pr;
    pr.source = path;
    pr.source_index = index;
    pr.sources = count;
    pr.total = static_cast<size_t>(src.db().query_int("SELECT count(*) FROM audit") +
                                   src.db().query_int("SELECT count(*) FROM devices"));
    for (const char* t : kRecordOrder)
      pr.total += static_cast<size_t>(src.db().query_int(std::string("SELECT count(*) FROM ") + t));
    auto tick = [&](const std::string& table) {
      ++pr.done;
      pr.table = table;
      if (o_.progress && (pr.done % 50 == 0 || pr.done == pr.total)) o_.progress(pr);
    };

    // Devices: labels only; the newest name wins, a given name over a made-up one.
    {
      const Table& t = tables_.at("devices");
      Stmt s(src.db(), "SELECT uuid FROM devices ORDER BY created, uuid");
      while (s.step()) {
        tick("devices");
        Row in = *read_row(src.db(), t, s.text(0));
        auto cur = read_row(db_, t, in[t.uuid].s);
        if (!cur) {
          insert_row(t, in);
          ++sm.devices_added;
        } else if (device_rank(t, in) > device_rank(t, *cur)) {
          update_row(t, in);
        }
      }
    }
    // Audit rows: the history of every version, merged first so that the
    // lineage of incoming versions is known.
    {
      const Table& t = tables_.at("audit");
      Stmt s(src.db(), "SELECT " + t.list() + " FROM audit ORDER BY at, uuid");
      Stmt ins(db_, "INSERT OR IGNORE INTO audit(" + t.list() + ") VALUES (" + marks(t.cols.size()) + ")");
      while (s.step()) {
        tick("audit");
        for (size_t i = 0; i < t.cols.size(); ++i)
          bind_value(ins, static_cast<int>(i) + 1, read_value(s, static_cast<int>(i), t.cols[i].affinity));
        ins.run();
        ins.reset();
        if (db_.changes() > 0) {
          ++sm.audit_added;
          wrote();
        }
      }
    }
    int photos_added = 0;
    for (const char* name : kRecordOrder) {
      const Table& t = tables_.at(name);
      // Every column in the one pass: the file is a private copy nothing else writes.
      Stmt s(src.db(), "SELECT " + t.list() + " FROM " + quoted(name) + " ORDER BY created, uuid");
      while (s.step()) {
        tick(name);
        Row in = read_columns(s, t);
        src.natural_key(t, in);
        const Outcome o = merge_record(src, t, in);
        if (o == Outcome::Added && t.name == "photos") ++photos_added;
        const std::string device = in[t.device].s;
        const std::string person = person_of(t, in);
        for (MergeCounts* c : {&sm.counts, &sm.by_device[device], &sm.by_person[person]}) {
          switch (o) {
            case Outcome::Added: ++c->added; break;
            case Outcome::Updated: ++c->updated; break;
            case Outcome::Skipped: ++c->skipped; break;
            case Outcome::Conflict: ++c->conflicts; break;
          }
        }
      }
    }
    if (photos_added > 0)
      rep_.warnings.push_back(path + ": " + std::to_string(photos_added) +
                              " photo record(s) added; the image files are not copied: copy them beside this file");
    merge_side_tables(src, path, sm);
    if (o_.terrain) merge_terrain_of(src, path, sm);
    if (o_.track) merge_track_of(src, path, sm);
    if (o_.pick_list_report) report_pick_lists(src, path);
    const bool changed = writes_ > writes_before;
    if (changed) {
      rep_.changed = true;
      Stmt m(db_,
             "INSERT INTO merges(uuid, peer_file_uuid, peer_name, peer_path, merged_at, device, added, skipped, "
             "conflicts) VALUES (?,?,?,?,?,?,?,?,?)");
      m.bind(1, new_uuid())
          .bind(2, sm.file_uuid)
          .bind(3, sm.name)
          .bind(4, relative_peer_path(p_.path(), path))
          .bind(5, utc_now());
      m.bind(6, p_.device()).bind(7, sm.counts.added + sm.counts.updated).bind(8, sm.counts.skipped);
      m.bind(9, sm.counts.conflicts);
      m.run();
    }
    rep_.sources.push_back(std::move(sm));
  }

  // Live records that point at a record deleted on another device.
  void dangling_warnings() {
    for (const Ref& r : kRefs) {
      Stmt s(db_, std::string("SELECT c.uuid, x.uuid FROM ") + r.table + " c JOIN " + r.parent + " x ON c." + r.column +
                      " = x.uuid WHERE c.deleted IS NULL AND x.deleted IS NOT NULL");
      while (s.step()) {
        rep_.warnings.push_back("live " + label(tables_.at(r.table), s.text(0)) + " points at deleted " +
                                label(tables_.at(r.parent), s.text(1)) + " (" + r.column +
                                "); restore the one or delete the other");
      }
    }
  }

  void names() {
    Stmt d(db_, "SELECT uuid, name FROM devices");
    while (d.step()) rep_.device_names[d.text(0)] = d.text(1);
    Stmt p(db_, "SELECT uuid, name, initials FROM people");
    while (p.step()) rep_.person_names[p.text(0)] = p.text(1) + " (" + p.text(2) + ")";
  }

 private:
  // Tables a module keeps beside the records (kSideTables: flag reviews, day
  // sign-offs): rows with the record columns but no audit trail, written once
  // and then only withdrawn. They merge by UUID; of two versions the newer wins.
  // A side table the camp file lacks is made by its module's own function;
  // tables Cairn does not know were named in the report and are left alone.
  void merge_side_tables(Source& src, const std::string& path, SourceMerge& sm) {
    auto has = [](Db& db, const std::string& name) {
      Stmt s(db, "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?");
      s.bind(1, name);
      return s.step();
    };
    for (const SideTable& side : kSideTables) {
      const std::string name = side.name;
      if (!has(src.db(), name)) continue;
      const Table ts = table_info(src.db(), name);
      if (ts.uuid < 0 || ts.updated < 0 || ts.device < 0 || ts.deleted < 0) continue;  // not record-like
      if (!has(db_, name)) {
        side.ensure(p_);
        wrote();
      }
      const Table t = table_info(db_, name);
      bool columns_match = true;
      for (const auto& c : t.cols) columns_match = columns_match && ts.col(c.name) >= 0;
      if (!columns_match) {
        rep_.warnings.push_back(path + ": table " + name + " has other columns here; its rows were not merged");
        continue;
      }
      Stmt s(src.db(), "SELECT uuid FROM " + quoted(name) + " ORDER BY created, uuid");
      while (s.step()) {
        const Row in = *read_row(src.db(), t, s.text(0));
        auto cur = read_row(db_, t, in[t.uuid].s);
        MergeCounts& c = sm.by_device[in[t.device].s];
        try {
          if (!cur) {
            insert_row(t, in);
            ++sm.counts.added, ++c.added;
          } else if (newer(t, Candidate{Candidate::Incoming, in, stamp_of(t, in), ""},
                           Candidate{Candidate::Current, *cur, stamp_of(t, *cur), ""})) {
            update_row(t, in);
            ++sm.counts.updated, ++c.updated;
          } else {
            ++sm.counts.skipped, ++c.skipped;
          }
        } catch (const std::runtime_error& e) {
          if (o_.fail_after && writes_ > *o_.fail_after) throw;
          rep_.warnings.push_back(path + ": " + name + " row " + in[t.uuid].s + " was not merged (" + e.what() + ")");
        }
      }
    }
  }

  // The terrain (storage/terrain.h): added when this file has none, skipped when
  // identical, and a different one is reported as a conflict, never replaced.
  void merge_terrain_of(Source& src, const std::string& path, SourceMerge& sm) {
    const TerrainMerge m = merge_terrain(p_, src.db());
    if (m.outcome == TerrainMerge::Added) ++sm.counts.added, wrote();
    if (m.outcome == TerrainMerge::Skipped) ++sm.counts.skipped;
    if (m.outcome == TerrainMerge::Conflict) ++sm.counts.conflicts;
    if (!m.message.empty()) rep_.warnings.push_back(path + ": " + m.message);
  }

  // The day track (storage/track.h): every fix the camp has not got, identical ones skipped.
  void merge_track_of(Source& src, const std::string& path, SourceMerge& sm) {
    try {
      const TrackMerge m = merge_track(p_, src.db());
      sm.track_added = m.added;
      sm.track_skipped = m.skipped;
      if (m.added > 0) wrote();
    } catch (const SqlError& e) {
      throw std::runtime_error(path + ": day track: " + e.what());
    } catch (const std::runtime_error& e) {
      if (o_.fail_after && writes_ > *o_.fail_after) throw;
      throw std::runtime_error(path + ": " + e.what());
    }
  }

  // Pick-lists (storage/pick_lists.h) are the camp's: a source's lithologies and
  // structure kinds are never adopted; those the camp's lists have not got are
  // reported so that someone adds them on the Camp screen if they belong.
  void report_pick_lists(Source& src, const std::string& path) {
    for (const PickList l : {PickList::Lithology, PickList::Structure}) {
      const std::vector<std::string> mine = pick_list(p_, l), theirs = pick_list(*src.project, l);
      std::string extra;
      size_t n = 0;
      for (const auto& code : theirs)
        if (std::find(mine.begin(), mine.end(), code) == mine.end())
          extra += std::string(n++ ? ", " : "") + terminal_safe(code);
      if (n == 0) continue;
      const std::string list(to_string(l));
      rep_.warnings.push_back(path + ": its " + list + " list has " + std::to_string(n) + " code" +
                              (n == 1 ? "" : "s") + " this file's list has not (" + extra +
                              "); the camp's list is kept: add them on the Camp screen if they belong");
    }
  }

  // ---- one record --------------------------------------------------------------

  Outcome merge_record(Source& src, const Table& t, const Row& in) {
    const std::string id = in[t.uuid].s;
    auto cur = read_row(db_, t, id);
    if (!cur) {
      write(t, in, nullptr);
      return Outcome::Added;
    }
    natural_key(db_, t, *cur);
    const Stamp sin = stamp_of(t, in), scur = stamp_of(t, *cur);
    if (sin == scur) {
      if (!same_data(t, in, *cur, true))
        rep_.warnings.push_back(label(t, id) + ": " + src.info.name +
                                " holds the same version with other values; the target's is kept");
      return Outcome::Skipped;
    }
    // A version already kept aside (open or settled) is not news.
    {
      Stmt s(db_, "SELECT 1 FROM conflicts WHERE uuid = ?");
      s.bind(1, conflict_id(t.name, id, sin));
      if (s.step()) return Outcome::Skipped;
    }
    std::vector<Candidate> c;
    c.push_back({Candidate::Current, *cur, scur, ""});
    {
      Stmt s(db_,
             "SELECT uuid, other_updated, other_device FROM conflicts WHERE tbl = ? AND record = ? AND "
             "resolved IS NULL ORDER BY uuid");
      s.bind(1, t.name).bind(2, id);
      while (s.step()) c.push_back({Candidate::Kept, kept_row(t, s.text(0)), {s.text(1), s.text(2)}, s.text(0)});
    }
    c.push_back({Candidate::Incoming, in, sin, ""});

    // The versions no other descends from; of those with equal contents, the newest.
    const Lineage lineage(db_, id);
    std::vector<bool> keep(c.size(), true);
    for (size_t i = 0; i < c.size(); ++i)
      for (size_t j = 0; j < c.size() && keep[i]; ++j)
        if (i != j && lineage.ancestor(c[i].stamp, c[j].stamp)) keep[i] = false;
    for (size_t i = 0; i < c.size(); ++i)
      for (size_t j = 0; j < c.size() && keep[i]; ++j)
        if (i != j && keep[j] && same_data(t, c[i].row, c[j].row, false) && newer(t, c[j], c[i])) keep[i] = false;
    size_t w = c.size();
    for (size_t i = 0; i < c.size(); ++i)
      if (keep[i] && (w == c.size() || newer(t, c[i], c[w]))) w = i;

    const Candidate& win = c[w];
    if (win.origin != Candidate::Current) write(t, win.row, &*cur);
    bool conflict = false;
    for (size_t i = 0; i < c.size(); ++i) {
      if (i == w) {
        if (c[i].origin == Candidate::Kept) drop_conflict(c[i].conflict);
        continue;
      }
      if (c[i].origin == Candidate::Kept) {
        if (!keep[i]) drop_conflict(c[i].conflict);
      } else if (keep[i]) {
        keep_aside(t, c[i], win);
        conflict = true;
      }
    }
    if (conflict) return Outcome::Conflict;
    return win.origin == Candidate::Current ? Outcome::Skipped : Outcome::Updated;
  }

  // Later `updated`, then device id, then content: a total order, so the choice
  // of the current version never depends on the order of merging.
  bool newer(const Table& t, const Candidate& a, const Candidate& b) const {
    if (!(a.stamp == b.stamp)) return b.stamp < a.stamp;
    return content(t, a.row) > content(t, b.row);
  }
  static std::string content(const Table&, const Row& r) {
    std::string s;
    for (const auto& v : r) s += std::to_string(v.type) + ":" + v.text() + "\x1f";
    return s;
  }

  // Same values, apart from who wrote them when; a deletion counts as deleted or not.
  static bool same_data(const Table& t, const Row& a, const Row& b, bool exact) {
    for (size_t i = 0; i < a.size(); ++i) {
      const int c = static_cast<int>(i);
      if (!exact && (c == t.updated || c == t.device)) continue;
      if (!exact && c == t.deleted) {
        if (a[i].null() != b[i].null()) return false;
        continue;
      }
      if (a[i] != b[i]) return false;
    }
    return true;
  }

  Row kept_row(const Table& t, const std::string& conflict) {
    Row r(t.cols.size());
    Stmt s(db_, "SELECT col, value FROM conflict_values WHERE conflict = ?");
    s.bind(1, conflict);
    while (s.step()) {
      const int c = t.col(s.text(0));
      if (c >= 0) r[c] = read_value(s, 1, t.cols[c].affinity);
    }
    return r;
  }

  void keep_aside(const Table& t, const Candidate& loser, const Candidate& winner) {
    const std::string record = loser.row[t.uuid].s;
    const std::string cid = conflict_id(t.name, record, loser.stamp);
    {
      Stmt s(db_,
             "INSERT INTO conflicts(uuid, tbl, record, other_updated, other_device, found_at) VALUES (?,?,?,?,?,?)");
      s.bind(1, cid).bind(2, t.name).bind(3, record).bind(4, loser.stamp.updated).bind(5, loser.stamp.device);
      s.bind(6, utc_now());
      s.run();
      wrote();
    }
    Stmt v(db_, "INSERT INTO conflict_values(conflict, col, value) VALUES (?,?,?)");
    for (size_t i = 0; i < t.cols.size(); ++i) {
      v.bind(1, cid).bind(2, t.cols[i].name);
      bind_value(v, 3, loser.row[i]);
      v.run();
      v.reset();
    }
    MergeConflict mc;
    mc.id = cid;
    mc.table = t.name;
    mc.record = record;
    mc.label = label(t, record);
    mc.current = side(t, winner.row);
    mc.other = side(t, loser.row);
    mc.fields = differences(t, winner.row, loser.row);
    rep_.conflicts.push_back(std::move(mc));
  }

  void drop_conflict(const std::string& id) {
    Stmt a(db_, "DELETE FROM conflict_values WHERE conflict = ?");
    a.bind(1, id);
    a.run();
    Stmt b(db_, "DELETE FROM conflicts WHERE uuid = ?");
    b.bind(1, id);
    b.run();
    wrote();
  }

  // ---- writing a version, with its code placed ------------------------------------

  // Writes ROW (natural code) as the current version; OLD is the version it replaces.
  void write(const Table& t, const Row& row, const Row* old) {
    // A new record whose code nobody holds (the common case): settle() after
    // the insert would find it alone, keeping its code and no clash row.
    if (!old && t.key >= 0 && !row[t.key].null() && holders(t, row[t.key].s, row).empty()) {
      insert_row(t, row);
      set_code(t, row[t.uuid].s, row[t.key].s, row[t.key].s, row[t.key].s, false);
      return;
    }
    Row r = row;
    const bool keyed = t.key >= 0 && !r[t.key].null() && r[t.deleted].null();
    // A code held by another live record: written first under a code of its
    // own (listed as a clash), then settle() decides who keeps the code.
    if (keyed && taken(t, r, r[t.key].s)) r[t.key] = Value::of(provisional(row[t.key].s, r[t.uuid].s));
    if (old)
      update_row(t, r);
    else
      insert_row(t, r);
    if (keyed && r[t.key] != row[t.key]) {
      Stmt s(db_, "INSERT OR REPLACE INTO key_clashes(record, tbl, original, stored) VALUES (?,?,?,?)");
      s.bind(1, r[t.uuid].s).bind(2, t.name).bind(3, row[t.key].s).bind(4, r[t.key].s);
      s.run();
    }
    if (t.key < 0) return;
    settle(t, row);
    if (old && ((*old)[t.key] != row[t.key] || (t.scope >= 0 && (*old)[t.scope] != row[t.scope]))) settle(t, *old);
  }

  // True when a live record other than R holds CODE (in R's scope).
  bool taken(const Table& t, const Row& r, const std::string& code) {
    std::string sql = "SELECT 1 FROM " + quoted(t.name) + " WHERE " + quoted(t.cols[t.key].name) +
                      " = ?1 AND deleted IS NULL AND uuid <> ?2";
    if (t.scope >= 0) sql += " AND " + quoted(t.cols[t.scope].name) + " IS ?3";
    Stmt s(db_, sql);
    s.bind(1, code).bind(2, r[t.uuid].s);
    if (t.scope >= 0) bind_value(s, 3, r[t.scope]);
    return s.step();
  }

  static std::string provisional(const std::string& code, const std::string& uuid) {
    return code + "~" + compact(uuid);
  }
  static std::string compact(const std::string& uuid) {
    std::string h;
    for (char ch : uuid)
      if (ch != '-') h += ch;
    return h;
  }

  // Gives every record whose natural code is REF's its stored code: the live
  // one created first keeps the code, the other live ones get CODE~xxxxxx,
  // deleted ones keep their own code. A function of the records alone.
  // The records whose natural code is CODE, in the scope of REF (oldest first).
  struct Member {
    std::string uuid, stored, created;
    bool deleted, clash_row;
  };
  std::vector<Member> holders(const Table& t, const std::string& code, const Row& ref) {
    std::string& sql = holders_sql_[t.name];
    if (sql.empty())
      sql = code_holders_sql(t.name, t.cols[t.key].name, t.scope >= 0 ? t.cols[t.scope].name : std::string());
    std::vector<Member> members;
    Stmt s(db_, sql);
    s.bind(1, code);
    if (t.scope >= 0) bind_value(s, 2, ref[t.scope]);
    // clash_row: already reported (a provisional code is not a report yet).
    while (s.step())
      members.push_back({s.text(0), s.text(1), s.text(2), s.int64(3) != 0,
                         !s.is_null(4) && s.text(5) != provisional(code, s.text(0))});
    return members;
  }

  void settle(const Table& t, const Row& ref) {
    if (ref[t.key].null()) return;
    const std::string code = ref[t.key].s;
    const std::vector<Member> members = holders(t, code, ref);
    const Member* keeper = nullptr;
    for (const auto& m : members)
      if (!m.deleted) {
        keeper = &m;
        break;
      }
    // Others first, so that the code is free when the keeper takes it.
    for (const auto& m : members) {
      if (&m == keeper) continue;
      std::string want = code;
      if (!m.deleted) {
        want = code + "~" + compact(m.uuid).substr(0, 6);
        Row probe(t.cols.size());
        probe[t.uuid] = Value::of(m.uuid);
        if (t.scope >= 0) probe[t.scope] = ref[t.scope];
        if (taken(t, probe, want)) want = code + "~" + compact(m.uuid);
      }
      set_code(t, m.uuid, m.stored, want, code, !m.deleted);
      if (!m.deleted && !m.clash_row) report_clash(t, ref, code, keeper ? keeper->uuid : "", m.uuid, want);
    }
    if (keeper) set_code(t, keeper->uuid, keeper->stored, code, code, false);
  }

  void set_code(const Table& t, const std::string& uuid, const std::string& now, const std::string& want,
                const std::string& original, bool clash) {
    if (now != want) {
      Stmt s(db_, "UPDATE " + quoted(t.name) + " SET " + quoted(t.cols[t.key].name) + " = ? WHERE uuid = ?");
      s.bind(1, want).bind(2, uuid);
      s.run();
      wrote();
    }
    if (clash) {
      Stmt s(db_, "INSERT OR REPLACE INTO key_clashes(record, tbl, original, stored) VALUES (?,?,?,?)");
      s.bind(1, uuid).bind(2, t.name).bind(3, original).bind(4, want);
      s.run();
    } else {
      Stmt s(db_, "DELETE FROM key_clashes WHERE record = ?");
      s.bind(1, uuid);
      s.run();
    }
  }

  void report_clash(const Table& t, const Row& ref, const std::string& code, const std::string& kept,
                    const std::string& renamed, const std::string& stored) {
    KeyClash k;
    k.table = t.name;
    k.column = t.cols[t.key].name;
    k.code = code;
    if (t.scope >= 0) k.scope = label(tables_.at("stations"), ref[t.scope].s);
    k.kept = kept;
    k.renamed = renamed;
    k.stored_as = stored;
    k.kept_device = device_name(record_device(t, kept));
    k.renamed_device = device_name(record_device(t, renamed));
    // A suggestion: the code with the first free letter, b to z.
    for (char ch = 'b'; ch <= 'z' && k.suggestion.empty(); ++ch) {
      const std::string s = code + ch;
      Row probe(t.cols.size());
      probe[t.uuid] = Value::of("");
      if (t.scope >= 0) probe[t.scope] = ref[t.scope];
      if (!taken(t, probe, s)) k.suggestion = s;
    }
    if (k.suggestion.empty()) k.suggestion = code + "-" + compact(renamed).substr(0, 4);
    if (t.name == "stations") {
      auto a = read_row(db_, t, kept), b = read_row(db_, t, renamed);
      if (a && b) {
        const geo::LatLon pa{(*a)[t.col("lat")].d, (*a)[t.col("lon")].d},
            pb{(*b)[t.col("lat")].d, (*b)[t.col("lon")].d};
        auto ua = geo::to_utm(pa);
        if (ua) {
          auto ub = geo::to_utm(pb, geo::UtmZone{ua->zone, ua->northp});
          if (ub) k.distance_m = std::hypot(ua->easting - ub->easting, ua->northing - ub->northing);
        }
      }
    }
    rep_.clashes.push_back(std::move(k));
  }

  void insert_row(const Table& t, const Row& r) {
    Stmt s(db_, t.insert);
    for (size_t i = 0; i < r.size(); ++i) bind_value(s, static_cast<int>(i) + 1, r[i]);
    run(s, t, r);
  }

  void update_row(const Table& t, const Row& r) {
    std::string set;
    for (size_t i = 0; i < t.cols.size(); ++i)
      if (static_cast<int>(i) != t.uuid)
        set += (set.empty() ? "" : ", ") + quoted(t.cols[i].name) + " = ?" + std::to_string(i + 1);
    Stmt s(db_, "UPDATE " + quoted(t.name) + " SET " + set + " WHERE uuid = ?" + std::to_string(t.uuid + 1));
    for (size_t i = 0; i < r.size(); ++i) bind_value(s, static_cast<int>(i) + 1, r[i]);
    run(s, t, r);
  }

  void run(Stmt& s, const Table& t, const Row& r) {
    try {
      s.run();
    } catch (const SqlError& e) {
      throw std::runtime_error("cannot merge " + t.name + " record " + r[t.uuid].s + ": " + e.what());
    }
    wrote();
  }

  void wrote() {
    ++writes_;
    if (o_.fail_after && writes_ > *o_.fail_after)
      throw std::runtime_error("merge stopped by the test hook after " + std::to_string(*o_.fail_after) + " writes");
  }

  static std::string marks(size_t n) {
    std::string m;
    for (size_t i = 0; i < n; ++i) m += i ? ",?" : "?";
    return m;
  }

  // A made-up device name ("device 1a2b3c4d") ranks below a given one; then the newer.
  static std::tuple<bool, std::string, std::string> device_rank(const Table& t, const Row& r) {
    const std::string name = r[t.col("name")].s;
    const bool made_up = name == "device " + r[t.uuid].s.substr(0, 8);
    return {!made_up, r[t.updated].s, name};
  }

  // ---- describing records --------------------------------------------------------

  std::string person_of(const Table& t, const Row& r) {
    Stmt s(db_,
           "SELECT person FROM audit WHERE record = ? AND json_extract(new_values, '$.updated') = ? AND "
           "json_extract(new_values, '$.device') = ? AND person IS NOT NULL LIMIT 1");
    s.bind(1, r[t.uuid].s).bind(2, r[t.updated].s).bind(3, r[t.device].s);
    if (s.step()) return s.text(0);
    const int obs = t.col("observer");
    if (obs >= 0 && !r[obs].null()) return r[obs].s;
    return "";
  }

  VersionSide side(const Table& t, const Row& r) {
    VersionSide v;
    v.updated = r[t.updated].s;
    v.device = r[t.device].s;
    v.device_name = device_name(v.device);
    v.person = person_of(t, r);
    if (!v.person.empty()) {
      Stmt s(db_, "SELECT name, initials FROM people WHERE uuid = ?");
      s.bind(1, v.person);
      if (s.step()) v.person_name = s.text(0) + " (" + s.text(1) + ")";
    }
    v.deleted = !r[t.deleted].null();
    return v;
  }

  std::string device_name(const std::string& uuid) {
    Stmt s(db_, "SELECT name FROM devices WHERE uuid = ?");
    s.bind(1, uuid);
    return s.step() ? s.text(0) : uuid;
  }

  std::string record_device(const Table& t, const std::string& uuid) {
    if (uuid.empty()) return "";
    Stmt s(db_, "SELECT device FROM " + quoted(t.name) + " WHERE uuid = ?");
    s.bind(1, uuid);
    return s.step() ? s.text(0) : "";
  }

  std::vector<ConflictField> differences(const Table& t, const Row& cur, const Row& other) {
    std::vector<ConflictField> out;
    for (size_t i = 0; i < t.cols.size(); ++i) {
      const int c = static_cast<int>(i);
      if (c == t.updated || c == t.device || c == t.uuid) continue;
      if (cur[i] == other[i]) continue;
      out.push_back({t.cols[i].name, shown(t, c, cur[i]), shown(t, c, other[i])});
    }
    return out;
  }

  // A value for people: references by their code or name, deletions in words.
  std::string shown(const Table& t, int c, const Value& v) {
    if (c == t.deleted) return v.null() ? "live" : "deleted " + v.s;
    if (v.null()) return "";
    if (v.type == Value::Real) return format_number(v.d);
    const std::string& name = t.cols[c].name;
    for (const Ref& r : kRefs)
      if (t.name == r.table && name == r.column) return label(tables_.at(r.parent), v.s);
    return v.text();
  }

 public:
  // "station S12", "planar reading P3 at S12", ... for messages.
  std::string label(const Table& t, const std::string& uuid) {
    auto text = [&](const std::string& sql, const std::string& u) {
      Stmt s(db_, sql);
      s.bind(1, u);
      return s.step() ? s.text(0) : std::string();
    };
    const std::string name = t.name;
    if (name == "stations") return "station " + text("SELECT code FROM stations WHERE uuid = ?", uuid);
    if (name == "units") return "unit " + text("SELECT code FROM units WHERE uuid = ?", uuid);
    if (name == "contacts") return "contact " + text("SELECT name FROM contacts WHERE uuid = ?", uuid);
    if (name == "people") return "person " + text("SELECT initials FROM people WHERE uuid = ?", uuid);
    if (name == "planes" || name == "lines") {
      const std::string what = name == "planes" ? "planar reading" : "linear reading";
      const std::string ref = text("SELECT ref FROM " + name + " WHERE uuid = ?", uuid);
      const std::string st =
          text("SELECT s.code FROM " + name + " r JOIN stations s ON s.uuid = r.station WHERE r.uuid = ?", uuid);
      const std::string typed = text("SELECT typed FROM " + name + " WHERE uuid = ?", uuid);
      return what + (ref.empty() ? " " + typed : " " + ref) + " at station " + st;
    }
    if (name == "points")
      return "contact point of " +
             text("SELECT c.name FROM points p JOIN contacts c ON c.uuid = p.contact WHERE p.uuid = ?", uuid) + " (" +
             uuid.substr(0, 8) + ")";
    if (name == "photos") return "photo " + text("SELECT path FROM photos WHERE uuid = ?", uuid);
    return name + " " + uuid;
  }

  std::string conflict_label(const std::string& table, const std::string& uuid) {
    return label(tables_.at(table), uuid);
  }

  MergeConflict describe(const std::string& id) {
    MergeConflict mc;
    Stmt s(db_, "SELECT tbl, record, found_at, resolved FROM conflicts WHERE uuid = ?");
    s.bind(1, id);
    if (!s.step()) throw std::runtime_error("no conflict " + id);
    mc.id = id;
    mc.table = s.text(0);
    mc.record = s.text(1);
    mc.found_at = s.text(2);
    mc.resolved = s.text(3);
    const Table& t = tables_.at(mc.table);
    mc.label = label(t, mc.record);
    auto cur = read_row(db_, t, mc.record);
    const Row other = kept_row(t, id);
    if (cur) {
      mc.current = side(t, *cur);
      mc.fields = differences(t, *cur, other);
    }
    mc.other = side(t, other);
    return mc;
  }

 private:
  Project& p_;
  Db& db_;
  const MergeOptions& o_;
  MergeReport& rep_;
  std::map<std::string, Table> tables_;
  std::unordered_map<std::string, std::string> holders_sql_;  // by table
  long writes_ = 0;
};

}  // namespace

namespace {

// Most lines of missing photo files in one report; the rest are counted.
constexpr int kMaxMissingPhotoLines = 100;

// A warning for each live photo reference whose file is not beside the target
// (photos travel apart from the project file; the merge never refuses for them).
void missing_photo_warnings(Project& p, MergeReport& rep) {
  const fs::path base = fs::absolute(p.path()).parent_path();
  Stmt s(p.db(),
         "SELECT ph.path, COALESCE(st.code, '') FROM photos ph LEFT JOIN stations st ON st.uuid = ph.station "
         "WHERE ph.deleted IS NULL ORDER BY ph.path, ph.uuid");
  int missing = 0;
  while (s.step()) {
    const std::string path = s.text(0), code = s.text(1);
    if (formats::check_photo_path(path)) continue;  // never looked up outside the project folder
    std::error_code ec;
    if (fs::is_regular_file(base / path, ec)) continue;
    if (++missing <= kMaxMissingPhotoLines)
      rep.warnings.push_back("photo file " + path + (code.empty() ? "" : " (station " + code + ")") +
                             " is missing beside " + p.path() + ": copy it there from the tablet or camera");
  }
  if (missing > kMaxMissingPhotoLines)
    rep.warnings.push_back("... and " + std::to_string(missing - kMaxMissingPhotoLines) +
                           " more photo files missing beside " + p.path());
}

}  // namespace

MergeReport merge_files(Project& target, const std::vector<std::string>& sources, const MergeOptions& options) {
  if (sources.empty()) throw std::invalid_argument("no source files to merge");
  std::error_code ec;
  for (const auto& s : sources) {
    if (!fs::exists(s, ec)) throw std::runtime_error("no project file " + s);
    if (fs::equivalent(s, target.path(), ec))
      throw std::runtime_error(s + " is the target file itself; name the tablets' files to merge into it");
  }
  // Check and copy every source before anything is written.
  std::vector<std::unique_ptr<Source>> copies;
  for (const auto& s : sources) copies.push_back(std::make_unique<Source>(s, target.path()));

  MergeReport rep;
  // The merge is one transaction over every index of a season (storage/sqlite.h).
  BulkWriteCache cache(target.db());
  target.write([&] {
    rep = MergeReport{};
    Merger m(target, options, rep);
    for (size_t i = 0; i < copies.size(); ++i) m.merge(*copies[i], sources[i], i, copies.size());
    m.dangling_warnings();
    m.names();
  });
  missing_photo_warnings(target, rep);
  return rep;
}

std::vector<MergeConflict> list_conflicts(Project& p, bool include_resolved) {
  MergeReport scratch;
  MergeOptions o;
  Merger m(p, o, scratch);
  std::vector<std::string> ids;
  {
    Stmt s(p.db(), std::string("SELECT uuid FROM conflicts") + (include_resolved ? "" : " WHERE resolved IS NULL") +
                       " ORDER BY found_at, tbl, record, uuid");
    while (s.step()) ids.push_back(s.text(0));
  }
  std::vector<MergeConflict> out;
  for (const auto& id : ids) out.push_back(m.describe(id));
  return out;
}

void resolve_conflict(Project& p, const std::string& id) {
  p.write([&] {
    Stmt s(p.db(), "UPDATE conflicts SET resolved = ? WHERE uuid = ? AND resolved IS NULL");
    s.bind(1, utc_now()).bind(2, id);
    s.run();
    if (p.db().changes() == 0) throw std::runtime_error("no open conflict " + id);
  });
}

}  // namespace cairn::store
