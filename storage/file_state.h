// The state of a project file on disk, looked at before SQLite reads it:
//
//  - its write-ahead log (NAME.cairn-wal), which SQLite trusts as far as its
//    checksums go and ignores silently after that. inspect_wal() reads it the
//    way SQLite's recovery does (SQLite documentation, "Database File Format",
//    section 4 "The Write-Ahead Log": header, frames, salts, checksums) and
//    compares it with its index, NAME.cairn-shm ("WAL-mode File Format",
//    section 2.1 "The WAL-Index Header"). It reports a -wal that SQLite would
//    ignore in whole (damaged header), one that belongs to another database
//    (another page size, or salts the file's own index does not know), committed
//    changes that SQLite would drop (a damaged frame followed by later commits,
//    or an index that counts more committed frames than the -wal holds: a -wal
//    cut short). A -wal that is only torn at its end by a crash (a transaction
//    that never committed) is normal and not reported. A crash in the middle of
//    a very large commit, or stale index after a power cut, can also be reported:
//    the safe mode and the advice cover those too.
//    It also reads the project's identity (file_uuid) from the file alone
//    (opened immutable, without the -wal), so that a -wal holding another
//    project's file_uuid can be refused after SQLite has read it.
//    The -wal is inspected only when no connection has the file open (in this
//    process, or another: the -shm's lock byte, SQLite documentation "WAL-mode
//    File Format", section 2.3), because a live -wal changes under the reader.
//  - whether the file can be written where it lies (read-only media, a folder
//    Cairn may not write, a file without write permission).
//
// Project::open uses both: a -wal that cannot be trusted, or read-only media,
// opens the file read-only (immutable when SQLite could not read it otherwise)
// and writes nothing beside it, with a message that says what and what to do.
#pragma once
#include <memory>
#include <string>

namespace cairn::store {

struct WalInspection {
  bool inspected = false;    // false: no -wal with content, or a connection has the file open
  std::string problem;       // why the -wal cannot be trusted, in words ("" when it can)
  std::string advice;        // what to do about it
  long frames = 0;           // frames SQLite would read
  long committed = 0;        // of those, up to the last commit
  long dropped_commits = 0;  // committed transactions SQLite would skip
  std::string file_uuid;     // project.file_uuid in the file alone ("" when it cannot be read there)
};

WalInspection inspect_wal(const std::string& path);

// How Project::open should open PATH (WANT_WRITE: the caller asked to write).
struct FileState {
  bool read_only = false;  // open read-only whatever the caller asked
  bool immutable = false;  // open immutable (SQLite reads the file alone, without -wal and -shm, and locks nothing)
  std::string problem;     // what the user is told ("" when nothing is wrong)
};
FileState examine_file(const std::string& path, bool want_write);

// "" when PATH and its folder can be written; else why not, in words.
std::string why_not_writable(const std::string& path);

// Held by every open Project while its connection lives: inspect_wal() does not
// touch the -wal and -shm of a file this process has open (closing any handle
// of a file drops the process's POSIX locks on it, SQLite's locks included).
class OpenFileMark {
 public:
  explicit OpenFileMark(const std::string& path);
  ~OpenFileMark();
  OpenFileMark(const OpenFileMark&) = delete;
  OpenFileMark& operator=(const OpenFileMark&) = delete;

 private:
  unsigned long long dev_ = 0, ino_ = 0;
  bool marked_ = false;
};

}  // namespace cairn::store
