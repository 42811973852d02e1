#include "storage/project.h"

#include <sqlite3.h>

#include <algorithm>
#include <cctype>
#include <chrono>
#include <cmath>
#include <ctime>
#include <cstring>
#include <filesystem>
#include <memory>
#include <set>
#include <fstream>
#include <vector>
#include <thread>

#include "geomath/geodesy.h"
#include "geomath/magnetic.h"
#include "formats/atomic_file.h"
#include "formats/ids.h"
#include "formats/iso8601.h"
#include "formats/temp_files.h"
#include "storage/file_state.h"
#include "storage/schema.h"

namespace fs = std::filesystem;

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

struct Project::Impl {
  std::string path;
  OpenOptions options;
  std::unique_ptr<OpenFileMark> mark;  // lives longer than the connection (storage/file_state.h)
  Db db;
  bool read_only = false;
  std::string problem;
  std::string device;
  int depth = 0;  // nesting of write()
  std::chrono::steady_clock::time_point last_backup{};
  bool have_backup = false;
  std::string backup_error;
};

namespace {

std::string backup_folder(const std::string& path, const std::string& dir) {
  return dir.empty() ? path + ".backups" : dir;
}

std::string stem_of(const std::string& path) { return fs::path(path).stem().string(); }

void set_pragmas(Db& db, const OpenOptions& o, bool writable) {
  sqlite3_busy_timeout(db.handle(), o.busy_timeout_ms);
  db.exec("PRAGMA foreign_keys = ON");
  if (writable) {
    const std::string mode = db.query_text("PRAGMA journal_mode = WAL");
    if (mode != "wal") throw std::runtime_error("cannot switch the file to WAL journal mode (got " + mode + ")");
  }
  db.exec("PRAGMA synchronous = FULL");
}

std::vector<std::string> check(Db& db, bool quick) {
  std::vector<std::string> out;
  Stmt s(db, quick ? "PRAGMA quick_check" : "PRAGMA integrity_check");
  while (s.step()) {
    std::string m = s.text(0);
    if (m != "ok") out.push_back(m);
  }
  return out;
}

std::string newest_backup_sentence(const std::string& path, const std::string& dir) {
  auto b = list_backups(path, dir);
  if (b.empty()) return "no backup was found in " + backup_folder(path, dir);
  return "the newest backup is " + b.back();
}

void register_device(Db& db, const std::string& id, const std::string& name) {
  Stmt q(db, "SELECT 1 FROM devices WHERE uuid = ?");
  q.bind(1, id);
  if (q.step()) return;
  const std::string now = utc_now();
  Stmt ins(db, "INSERT INTO devices(uuid, name, created, updated, device) VALUES (?,?,?,?,?)");
  ins.bind(1, id).bind(2, name.empty() ? std::string("device ") + id.substr(0, 8) : name);
  ins.bind(3, now).bind(4, now).bind(5, id);
  ins.run();
}

// A copy of the open database `src` (file `path`) into TMP with the online
// backup API, in rollback-journal mode so that it is one self-contained file.
void copy_database(Db& src, const std::string& path, const std::string& tmp) {
  Db dest(tmp, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
  sqlite3_backup* b = sqlite3_backup_init(dest.handle(), "main", src.handle(), "main");
  if (!b) throw SqlError("backup: " + dest.errmsg(), 0);
  int rc;
  do {
    rc = sqlite3_backup_step(b, -1);
    if (rc == SQLITE_BUSY || rc == SQLITE_LOCKED) std::this_thread::sleep_for(std::chrono::milliseconds(20));
  } while (rc == SQLITE_OK || rc == SQLITE_BUSY || rc == SQLITE_LOCKED);
  sqlite3_backup_finish(b);
  if (rc != SQLITE_DONE) throw SqlError("backup of " + path + " failed: " + sqlite3_errstr(rc), rc);
  dest.exec("PRAGMA journal_mode = DELETE");
}

// Whether two files hold the same bytes, read side by side in 1 MiB pieces (a
// season's file is close to a gigabyte: reading both whole to digest them took
// four times that in memory).
bool same_bytes(const std::string& a, const std::string& b) {
  std::ifstream fa(a, std::ios::binary), fb(b, std::ios::binary);
  if (!fa || !fb) return false;
  std::vector<char> pa(1 << 20), pb(1 << 20);
  while (true) {
    fa.read(pa.data(), static_cast<std::streamsize>(pa.size()));
    fb.read(pb.data(), static_cast<std::streamsize>(pb.size()));
    const std::streamsize na = fa.gcount(), nb = fb.gcount();
    if (na != nb || !std::equal(pa.begin(), pa.begin() + na, pb.begin())) return false;
    if (na == 0 || !fa || !fb) return !fa.bad() && !fb.bad() && fa.eof() == fb.eof();
  }
}

// The day of a backup from its name (NAME-YYYYMMDDThhmmss...): "YYYYMMDD".
std::string backup_day(const std::string& backup, const std::string& path) {
  const std::string name = fs::path(backup).filename().string();
  const size_t at = stem_of(path).size() + 1;
  return name.size() >= at + 8 ? name.substr(at, 8) : name;
}

// Keeps the newest KEEP backups and, of older ones, the newest of each day.
void prune_backups(const std::string& path, const std::string& dir, int keep) {
  auto all = list_backups(path, dir);  // oldest first
  const size_t k = static_cast<size_t>(std::max(1, keep));
  std::set<std::string> days_kept;
  for (size_t i = all.size(); i-- > 0;) {
    const bool recent = all.size() - i <= k;
    const bool first_of_day = days_kept.insert(backup_day(all[i], path)).second;
    if (recent || first_of_day) continue;
    std::error_code ec;
    fs::remove(all[i], ec);
  }
}

// Publishes the copy TMP as the newest backup of PATH in DIR, unless the
// newest backup already holds the same bytes (then TMP is dropped and that
// one is named). Returns the backup's path.
std::string publish_backup(TempPath& tmp, const std::string& path, const std::string& dir, int keep) {
  const fs::path folder = backup_folder(path, dir);
  const auto existing = list_backups(path, dir);
  if (!existing.empty() && fs::file_size(existing.back()) == fs::file_size(tmp.path()) &&
      same_bytes(existing.back(), tmp.path()))
    return existing.back();       // the same state: no second copy (tmp is removed with its TempPath)
  std::string stamp = utc_now();  // 2025-06-14T09:32:10.123Z -> 20250614T093210123Z
  stamp.erase(std::remove_if(stamp.begin(), stamp.end(), [](char c) { return c == '-' || c == ':' || c == '.'; }),
              stamp.end());
  fs::path target = folder / (stem_of(path) + "-" + stamp + ".cairn");
  for (int n = 2; fs::exists(target); ++n)
    target = folder / (stem_of(path) + "-" + stamp + "-" + std::to_string(n) + ".cairn");
  formats::move_into_place(tmp.path(), target.string());  // fsync of the copy and of the folder
  tmp.release();
  prune_backups(path, dir, keep);
  return target.string();
}

// A copy of `src` under a temporary name in the backup folder (removed on any
// exit unless published; formats/temp_files.h).
std::unique_ptr<TempPath> stage_backup(Db& src, const std::string& path, const std::string& dir) {
  const fs::path folder = backup_folder(path, dir);
  fs::create_directories(folder);
  auto tmp = std::make_unique<TempPath>((folder / stem_of(path)).string());
  copy_database(src, path, tmp->path());
  return tmp;
}

// One backup of the open database `src` (file `path`) into `dir`, deduplicated
// and pruned as above. Returns its path.
std::string make_backup(Db& src, const std::string& path, const std::string& dir, int keep) {
  auto tmp = stage_backup(src, path, dir);
  return publish_backup(*tmp, path, dir, keep);
}

// Validates the project settings; returns the normalised UTM zone ("" when none).
std::string checked_settings(const std::string& name, const std::string& utm_zone, double declination) {
  if (name.empty()) throw ValidationError("name", "required", "the project needs a name");
  std::string zone;
  if (!utm_zone.empty()) {
    auto z = parse_utm_zone(utm_zone);
    if (!z) throw ValidationError("utm_zone", "utm-zone", z.error());
    zone = *z;
  }
  if (!std::isfinite(declination) || std::abs(declination) > 180)
    throw ValidationError("declination", "declination-range", "declination must be within -180..180 degrees");
  return zone;
}

}  // namespace

Result<std::string> parse_utm_zone(const std::string& text) {
  auto z = geo::parse_utm_zone(text);
  if (!z) return Result<std::string>::failure("UTM zone " + z.error());
  if (!z->northp)
    return Result<std::string>::failure("UTM zone '" + text + "' needs its hemisphere, N or S (e.g. 33N)");
  return std::to_string(z->zone) + (*z->northp ? "N" : "S");
}

bool is_project_file(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  unsigned char h[100] = {};
  if (!f.read(reinterpret_cast<char*>(h), sizeof h)) return false;
  if (std::memcmp(h, "SQLite format 3", 16) != 0) return false;
  const uint32_t app = (uint32_t{h[68]} << 24) | (uint32_t{h[69]} << 16) | (uint32_t{h[70]} << 8) | h[71];
  return app == static_cast<uint32_t>(kApplicationId);
}

std::vector<std::string> list_backups(const std::string& path, const std::string& dir) {
  std::vector<std::string> out;
  const fs::path folder = backup_folder(path, dir);
  std::error_code ec;
  if (!fs::is_directory(folder, ec)) return out;
  const std::string prefix = stem_of(path) + "-";
  for (const auto& e : fs::directory_iterator(folder, ec)) {
    const std::string name = e.path().filename().string();
    if (e.is_regular_file() && name.rfind(prefix, 0) == 0 && e.path().extension() == ".cairn")
      out.push_back(e.path().string());
  }
  std::sort(out.begin(), out.end());  // names carry a UTC stamp, so this is time order
  return out;
}

Project::Project(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
Project::Project(Project&&) noexcept = default;
Project& Project::operator=(Project&&) noexcept = default;
Project::~Project() = default;

Project Project::create(const std::string& path, const NewProject& p, OpenOptions options) {
  const std::string zone = checked_settings(p.name, p.utm_zone, p.declination);
  std::error_code ec;
  if (fs::exists(path, ec)) throw std::runtime_error(path + " already exists; pick another name");
  {
    Db db(path, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
    set_pragmas(db, options, true);
    const std::string device = options.device_id.empty() ? new_uuid() : options.device_id;
    const std::string now = utc_now();
    try {
      db.exec("BEGIN IMMEDIATE");
      create_schema(db);
      Stmt s(db,
             "INSERT INTO project(id, file_uuid, name, utm_zone, north_default, declination, "
             "local_device, created, updated) VALUES (1,?,?,?,?,?,?,?,?)");
      s.bind(1, new_uuid()).bind(2, p.name).bind_text_or_null(3, zone);
      s.bind(4, to_string(p.north_default)).bind(5, p.declination).bind(6, device);
      s.bind(7, now).bind(8, now);
      s.run();
      register_device(db, device, options.device_name);
      db.exec("COMMIT");
    } catch (...) {
      db.close();
      fs::remove(path, ec);
      fs::remove(path + "-wal", ec);
      fs::remove(path + "-shm", ec);
      throw;
    }
  }
  return open(path, std::move(options));
}

Project Project::open(const std::string& path, OpenOptions options) {
  std::error_code ec;
  if (!fs::exists(path, ec)) throw std::runtime_error("no project file " + path + " (make one with 'cairn new')");
  auto impl = std::make_unique<Impl>();
  impl->path = path;
  impl->options = options;
  const std::string bdir = options.backup_dir;
  // A file of zero bytes (a copy that never finished, a card pulled out) is
  // said as such, and left as it is: SQLite would take it for a new database.
  if (fs::is_regular_file(path, ec) && fs::file_size(path, ec) == 0 &&
      !(fs::exists(path + "-wal", ec) && fs::file_size(path + "-wal", ec) > 0))
    throw std::runtime_error(path +
                             " is empty (0 bytes): it holds no project, perhaps because copying it did not "
                             "finish; " +
                             newest_backup_sentence(path, bdir) +
                             " (cairn restore FILE BACKUP); the file has not been changed");
  // The file as it lies (storage/file_state.h): a -wal that cannot be trusted,
  // or a place Cairn cannot write, opens it read-only and touches nothing.
  const FileState state = options.untrusted ? FileState{} : examine_file(path, !options.read_only);
  auto connect = [&](int flags) {
    const Trust trust = options.untrusted ? Trust::Untrusted : Trust::Own;
    return state.immutable ? Db(immutable_uri(path), SQLITE_OPEN_READONLY | SQLITE_OPEN_URI, trust)
                           : Db(path, flags, trust);
  };
  impl->mark = std::make_unique<OpenFileMark>(path);
  auto open_read_only = [&](const std::string& why) {
    const std::string sentence = why + "; " + newest_backup_sentence(path, bdir);
    try {
      impl->db = connect(SQLITE_OPEN_READONLY);
      set_pragmas(impl->db, options, false);
      impl->db.query_int("SELECT count(*) FROM project");  // readable at all?
    } catch (const std::exception& e) {
      throw std::runtime_error(path + " cannot be read (" + e.what() + "); " + newest_backup_sentence(path, bdir));
    }
    impl->read_only = true;
    impl->problem = sentence + "; the file is open read-only";
  };

  bool writable = !options.read_only && !state.read_only;
  // Leftovers of a run that was killed (a merge's copy, a backup half written).
  if (writable && !options.untrusted) remove_stale_temp_files(path);
  try {
    impl->db = connect(writable ? SQLITE_OPEN_READWRITE : SQLITE_OPEN_READONLY);
    sqlite3_busy_timeout(impl->db.handle(), options.busy_timeout_ms);
    const int64_t app = impl->db.query_int("PRAGMA application_id");
    const int64_t version = impl->db.query_int("PRAGMA user_version");
    if (app != kApplicationId)
      throw std::runtime_error(path +
                               " is not a Cairn project file (an SQLite file of another program, "
                               "or no database at all)");
    if (version > kSchemaVersion)
      throw std::runtime_error(path + " was written by a newer version of Cairn (schema version " +
                               std::to_string(version) + "; this Cairn reads versions up to " +
                               std::to_string(kSchemaVersion) +
                               "); open it with a newer Cairn. The file has not been changed.");
    if (version < 1) throw std::runtime_error(path + " is not a Cairn project file (no schema version)");
    set_pragmas(impl->db, options, writable);
    auto problems = options.integrity_checked ? std::vector<std::string>{} : check(impl->db, true);
    if (!problems.empty()) {
      impl->db.close();
      open_read_only(path + " failed its integrity check (" + problems.front() + ")");
      writable = false;
    } else if (version < kSchemaVersion) {
      if (!writable)
        throw std::runtime_error(path + " has schema version " + std::to_string(version) + " and must be upgraded to " +
                                 std::to_string(kSchemaVersion) + "; open it for writing once");
      make_backup(impl->db, path, bdir, options.backup_keep);  // the file as it was, before migrating
      try {
        impl->db.exec("BEGIN IMMEDIATE");
        migrate(impl->db, static_cast<int>(version));
        impl->db.exec("COMMIT");
      } catch (const std::exception& e) {
        try {
          impl->db.exec("ROLLBACK");
        } catch (...) {}
        throw std::runtime_error(path + ": upgrading from schema version " + std::to_string(version) + " failed (" +
                                 e.what() + "); the file has not been changed");
      }
    }
  } catch (const SqlError& e) {
    if (e.code() == SQLITE_BUSY) throw std::runtime_error(path + " is locked by another program: " + e.what());
    const int primary = e.code() & 0xff;
    if (primary == SQLITE_CORRUPT || primary == SQLITE_NOTADB) {
      impl->db.close();
      open_read_only(path + " is damaged (" + e.what() + ")");
      writable = false;
    } else {
      throw std::runtime_error(path + ": " + e.what());
    }
  }
  impl->read_only = !writable;
  if (impl->problem.empty()) impl->problem = state.problem;
  impl->device = options.device_id;
  if (impl->device.empty()) impl->device = impl->db.query_text("SELECT local_device FROM project");
  Project p(std::move(impl));
  if (writable) {
    // Registering this device is bookkeeping, not the session's first change:
    // no backup for it (the session's backup comes with its first real write).
    const bool backups = p.impl_->options.backups;
    p.impl_->options.backups = false;
    try {
      p.write([&] { register_device(p.db(), p.impl_->device, options.device_name); });
    } catch (const SqlError& e) {
      if ((e.code() & 0xff) == SQLITE_BUSY)
        throw std::runtime_error(path + " is locked by another program: " + e.what());
      throw;
    }
    p.impl_->options.backups = backups;
  }
  return p;
}

const std::string& Project::path() const { return impl_->path; }
bool Project::read_only() const { return impl_->read_only; }
const std::string& Project::problem() const { return impl_->problem; }
int Project::schema_version() const { return static_cast<int>(impl_->db.query_int("PRAGMA user_version")); }
const std::string& Project::device() const { return impl_->device; }
const std::string& Project::person() const { return impl_->options.person; }
void Project::set_person(const std::string& p) { impl_->options.person = p; }
Db& Project::db() { return impl_->db; }
bool Project::in_transaction() const { return impl_->depth > 0; }
const std::string& Project::backup_error() const { return impl_->backup_error; }
std::string Project::backup_dir() const { return backup_folder(impl_->path, impl_->options.backup_dir); }
std::vector<std::string> Project::backups() const { return list_backups(impl_->path, impl_->options.backup_dir); }

ProjectInfo Project::info() {
  Stmt s(impl_->db,
         "SELECT file_uuid, name, utm_zone, north_default, declination, local_device, created, "
         "updated FROM project WHERE id = 1");
  if (!s.step()) throw std::runtime_error(impl_->path + " has no project row");
  ProjectInfo i;
  i.file_uuid = s.text(0);
  i.name = s.text(1);
  i.utm_zone = s.text(2);
  i.north_default = parse_north(s.text(3)).value_or(North::True);
  i.declination = s.real(4);
  i.local_device = s.text(5);
  i.created = s.text(6);
  i.updated = s.text(7);
  // A file read without migrating it may predate the setting (schema version 4).
  if (schema_version() >= 4) {
    Stmt n(impl_->db, "SELECT nearby_radius FROM project WHERE id = 1");
    if (n.step()) i.nearby_radius = n.real(0);
  }
  if (schema_version() >= 5) {
    Stmt n(impl_->db, "SELECT friction_angle, sliding_window, toppling_window FROM project WHERE id = 1");
    if (n.step()) {
      i.friction_angle = n.real(0);
      i.sliding_window = n.real(1);
      i.toppling_window = n.real(2);
    }
  }
  return i;
}

void Project::update_info(const ProjectInfo& i) {
  const std::string zone = checked_settings(i.name, i.utm_zone, i.declination);
  if (!std::isfinite(i.nearby_radius) || i.nearby_radius < 0 || i.nearby_radius > 100000)
    throw ValidationError("nearby_radius", "nearby-range", "the nearby radius must be within 0..100000 metres");
  if (!std::isfinite(i.friction_angle) || i.friction_angle < 0 || i.friction_angle > 89)
    throw ValidationError("friction_angle", "friction-range", "the friction angle must be within 0..89 degrees");
  if (!std::isfinite(i.sliding_window) || i.sliding_window < 1 || i.sliding_window > 90)
    throw ValidationError("sliding_window", "window-range", "the sliding window must be within 1..90 degrees");
  if (!std::isfinite(i.toppling_window) || i.toppling_window < 1 || i.toppling_window > 90)
    throw ValidationError("toppling_window", "window-range", "the toppling window must be within 1..90 degrees");
  write([&] {
    Stmt s(impl_->db,
           "UPDATE project SET name=?, utm_zone=?, north_default=?, declination=?, nearby_radius=?, "
           "friction_angle=?, sliding_window=?, toppling_window=?, updated=? WHERE id=1");
    s.bind(1, i.name).bind_text_or_null(2, zone).bind(3, to_string(i.north_default));
    s.bind(4, i.declination).bind(5, i.nearby_radius).bind(6, i.friction_angle).bind(7, i.sliding_window);
    s.bind(8, i.toppling_window).bind(9, utc_now());
    s.run();
  });
}

Declination Project::declination_at(double lat, double lon, const std::string& time) {
  FieldTime t = today_utc();
  if (!time.empty()) {
    auto parsed = parse_iso8601(time);
    if (parsed) t = *parsed;
  }
  if (impl_->options.declination) {
    return impl_->options.declination(lat, lon, geo::decimal_year(t.day));
  }
  return Declination{info().declination, "project setting"};
}

std::vector<std::string> Project::integrity_check(bool quick) { return check(impl_->db, quick); }

void Project::write(const std::function<void()>& f) {
  if (impl_->read_only) {
    std::string why = impl_->path + " is open read-only";
    if (!impl_->problem.empty()) why += ": " + impl_->problem;
    throw std::runtime_error(why);
  }
  if (impl_->depth > 0) {
    ++impl_->depth;
    try {
      f();
    } catch (...) {
      --impl_->depth;
      throw;
    }
    --impl_->depth;
    return;
  }
  // The session's backup: the file as it was before its first change, staged
  // now and kept only when the change commits, so a refused import leaves no
  // backup behind (and one identical to the newest is not kept twice).
  std::unique_ptr<TempPath> staged;
  if (impl_->options.backups && !impl_->have_backup) {
    try {
      staged = stage_backup(impl_->db, impl_->path, impl_->options.backup_dir);
    } catch (const std::exception& e) {
      impl_->backup_error = e.what();
    }
  }
  impl_->db.exec("BEGIN IMMEDIATE");
  impl_->depth = 1;
  try {
    const int64_t changes_before = sqlite3_total_changes64(impl_->db.handle());
    f();
    // A commit that changes anything also stamps project.updated, so that its
    // -wal carries the page of the project row and names the project it belongs
    // to (storage/file_state.h). (SQLite skips a write that changes no byte.)
    if (sqlite3_total_changes64(impl_->db.handle()) != changes_before) {
      Stmt u(impl_->db, "UPDATE project SET updated = ? WHERE id = 1");
      u.bind(1, utc_now());
      u.run();
    }
    impl_->db.exec("COMMIT");
  } catch (...) {
    impl_->depth = 0;
    try {
      impl_->db.exec("ROLLBACK");
    } catch (...) {
      // the transaction may already be gone (SQLite rolls back on some errors)
    }
    throw;
  }
  impl_->depth = 0;
  if (staged) {
    try {
      publish_backup(*staged, impl_->path, impl_->options.backup_dir, impl_->options.backup_keep);
      impl_->last_backup = std::chrono::steady_clock::now();
      impl_->have_backup = true;
      impl_->backup_error.clear();
      return;
    } catch (const std::exception& e) {
      impl_->backup_error = e.what();
    }
  }
  // A rolling backup once the edits have gone on long enough since the last one.
  if (impl_->options.rolling_backups && backup_due()) {
    try {
      backup_now();
    } catch (const std::exception& e) {
      impl_->backup_error = e.what();
    }
  }
}

bool Project::backup_due() const {
  if (!impl_->options.backups) return false;
  return !impl_->have_backup || std::chrono::steady_clock::now() - impl_->last_backup >=
                                    std::chrono::seconds(impl_->options.backup_interval_s);
}

void Project::backup_made() {
  impl_->last_backup = std::chrono::steady_clock::now();
  impl_->have_backup = true;
  impl_->backup_error.clear();
}

void Project::backup_failed(const std::string& why) { impl_->backup_error = why; }

std::string Project::backup_now() {
  std::string b = make_backup(impl_->db, impl_->path, impl_->options.backup_dir, impl_->options.backup_keep);
  backup_made();
  return b;
}

std::string restore_from_backup(Project& p, const std::string& backup) {
  if (p.read_only()) throw std::runtime_error(p.path() + " is open read-only; nothing can be restored into it");
  std::error_code ec;
  if (!fs::exists(backup, ec)) throw std::runtime_error("no backup " + backup);
  if (fs::equivalent(backup, p.path(), ec)) throw std::runtime_error(backup + " is the project file itself");
  if (!is_project_file(backup)) throw std::runtime_error(backup + " is not a Cairn project file");
  Db src(backup, SQLITE_OPEN_READONLY, Trust::Untrusted);
  const int64_t version = src.query_int("PRAGMA user_version");
  if (version > kSchemaVersion)
    throw std::runtime_error(backup + " was written by a newer version of Cairn; restore it with that version");
  if (src.query_text("PRAGMA integrity_check(1)") != "ok")
    throw std::runtime_error(backup + " fails its integrity check; pick another backup");
  const std::string kept = p.backup_now();
  sqlite3_backup* b = sqlite3_backup_init(p.db().handle(), "main", src.handle(), "main");
  if (!b) throw std::runtime_error("cannot restore " + backup + ": " + p.db().errmsg());
  const int rc = sqlite3_backup_step(b, -1);
  sqlite3_backup_finish(b);
  if (rc != SQLITE_DONE)
    throw std::runtime_error("restoring " + backup + " failed (" + sqlite3_errstr(rc) + "); " + p.path() +
                             " is as it was, and its state is also kept in " + kept);
  // Into the file itself at once: a -wal whose file_uuid differs from the
  // file's (a backup of another file) would read as foreign after a crash
  // (storage/file_state.h).
  try {
    p.db().exec("PRAGMA wal_checkpoint(TRUNCATE)");
  } catch (const std::exception&) {}
  return kept;
}

}  // namespace cairn::store
