// A Cairn project file (NAME.cairn): an SQLite database kept safe for the field.
//
// Opening a file sets, on every connection (SQLite documentation, "Pragma statements"):
//  - journal_mode=WAL: readers and a writer share the file, and a commit is one
//    append to the write-ahead log ("Write-Ahead Logging");
//  - synchronous=FULL: in WAL mode every commit is synced, so a confirmed
//    reading survives a power cut, not only a crash of the program;
//  - foreign_keys=ON: a reading cannot point at a station that does not exist;
//  - busy_timeout: the touch UI and a `cairn` command can share one file.
// It then runs PRAGMA quick_check. A file that fails it, or cannot be read as a
// database, is opened read-only (or refused when even that fails) with a message
// that names the newest backup.
//
// Rolling backups use SQLite's online backup API (sqlite3_backup_*): one per
// writable session, of the file as it was before the session's first change
// (staged before the change and kept only when it commits, so a refused import
// leaves none), then one after each write that comes at least
// `backup_interval_s` after the last backup. A backup whose bytes equal the
// newest one's is not kept twice. The newest `backup_keep` distinct states are
// kept, and of older ones the newest of each day.
//
// The schema version is PRAGMA user_version: an older file is backed up and
// migrated forward on open; a newer one is refused and left untouched.
#pragma once
#include <functional>
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

#include "geomath/result.h"
#include "storage/records.h"
#include "storage/sqlite.h"

namespace cairn::store {

// Declination (degrees, east positive) at a WGS84 place and a decimal year,
// with its source's name. The app layer supplies one built on the World
// Magnetic Model; storage itself never reads model files.
using DeclinationProvider = std::function<Declination(double lat, double lon, double decimal_year)>;

// What `cairn new` asks for.
struct NewProject {
  std::string name;
  std::string utm_zone;               // "" or a zone such as "33N", "19S"
  North north_default = North::True;  // for readings that do not say
  double declination = 0;             // project setting used when no provider is given
};

struct OpenOptions {
  std::string device_id;    // this tablet's UUID; "" uses the device that created the file
  std::string device_name;  // recorded for a device the file has not seen yet
  std::string person;       // person UUID at the keyboard (audit trail); "" when unknown
  bool read_only = false;   // open for reading only (no backup, no migration)
  // A copy of a file from another device (merge): its triggers and views are
  // disabled for the connection (storage/sqlite.h, Trust::Untrusted).
  bool untrusted = false;
  // The caller has just run SQLite's full integrity_check on these very pages
  // (a merge's backup-API copy of a source): the quick check on opening, a
  // second read of the whole file, is left out.
  bool integrity_checked = false;
  bool backups = true;
  int backup_keep = 10;         // how many rolling backups to keep (>= 1)
  int backup_interval_s = 300;  // seconds between backups while editing
  // false: no rolling backups after writes (the session's backup is still
  // made); the caller makes them itself with backup_of (the touch UI, on a
  // worker, so that no frame waits for a copy of the file).
  bool rolling_backups = true;
  std::string backup_dir;  // "" = PATH + ".backups" beside the file
  int busy_timeout_ms = 5000;
  DeclinationProvider declination;  // empty: the project's declination setting
};

// Thrown when a value fails validation: `field` names the record field,
// `rule` the rule id (as in storage/SCHEMA.md) and what() the sentence.
class ValidationError : public std::invalid_argument {
 public:
  ValidationError(std::string field, std::string rule, const std::string& message)
      : std::invalid_argument(message), field_(std::move(field)), rule_(std::move(rule)) {}
  const std::string& field() const { return field_; }
  const std::string& rule() const { return rule_; }

 private:
  std::string field_, rule_;
};

class Project {
 public:
  // Makes a new project file. Fails when PATH exists or the zone is malformed.
  static Project create(const std::string& path, const NewProject& p, OpenOptions options = {});
  // Opens an existing project file (see the file comment for the checks).
  // Throws std::runtime_error with a clear message when the file is missing, is not a
  // Cairn project, comes from a newer Cairn, or cannot be read at all.
  static Project open(const std::string& path, OpenOptions options = {});

  Project(Project&&) noexcept;
  Project& operator=(Project&&) noexcept;
  ~Project();

  const std::string& path() const;
  bool read_only() const;
  // Why the file was opened read-only against the caller's wish ("" when it was not).
  const std::string& problem() const;
  int schema_version() const;

  ProjectInfo info();
  // Changes name, UTM zone, default north and declination setting (validated).
  void update_info(const ProjectInfo& info);

  // The device writing (its UUID) and the person at the keyboard.
  const std::string& device() const;
  const std::string& person() const;
  void set_person(const std::string& person_uuid);

  // Declination for a magnetic reading at a place and ISO 8601 time ("" = today):
  // from the provider when there is one, else the project setting.
  Declination declination_at(double lat, double lon, const std::string& time);

  // PRAGMA integrity_check (quick = PRAGMA quick_check): empty when the file is sound,
  // else SQLite's messages.
  std::vector<std::string> integrity_check(bool quick = false);

  // Runs f inside one transaction (BEGIN IMMEDIATE ... COMMIT); any exception
  // rolls everything back and is rethrown. Nested calls join the outer one.
  void write(const std::function<void()>& f);
  bool in_transaction() const;

  // A backup now; returns its path. Throws on failure.
  std::string backup_now();
  // Whether the rolling backup is due: backups are on and backup_interval_s
  // have passed since the last one (or none was made this session).
  bool backup_due() const;
  // The last backup was made now (by backup_of, on another connection).
  void backup_made();
  // A backup made for this file elsewhere (the UI's opening, its job worker)
  // failed: kept as backup_error() until one is made.
  void backup_failed(const std::string& why);
  // Existing backups of this file, oldest first.
  std::vector<std::string> backups() const;
  std::string backup_dir() const;
  // The last error of an automatic backup ("" when the last one worked).
  const std::string& backup_error() const;

  Db& db();

 private:
  struct Impl;
  explicit Project(std::unique_ptr<Impl> impl);
  std::unique_ptr<Impl> impl_;
};

// Backups of the project file PATH in DIR (PATH + ".backups" when DIR is ""),
// oldest first. Usable without opening the file (e.g. to name them in errors).
std::vector<std::string> list_backups(const std::string& path, const std::string& dir = "");

// True when PATH is an SQLite database whose header carries Cairn's application
// id (SQLite documentation, "Database File Format", section 1.3: the header
// string at offset 0, the application id big-endian at offset 68). Reads 100
// bytes; runs no SQL.
bool is_project_file(const std::string& path);

// Puts the contents of BACKUP (a backup of P, or any sound Cairn project file)
// into P, after making a backup of P as it is now. BACKUP must pass
// PRAGMA integrity_check and be no newer than this Cairn. Returns the path of
// the backup that holds P's state from before the restore.
std::string restore_from_backup(Project& p, const std::string& backup);

// A UTM zone as Cairn writes it ("33N"), or a failure naming the text.
Result<std::string> parse_utm_zone(const std::string& text);

}  // namespace cairn::store
