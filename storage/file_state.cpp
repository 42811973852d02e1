#include "storage/file_state.h"

#include <fcntl.h>
#include <sqlite3.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdint>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <mutex>
#include <utility>
#include <vector>

#include "storage/project.h"
#include "storage/sqlite.h"

namespace fs = std::filesystem;

namespace cairn::store {

namespace {

std::mutex g_open_mu;
std::map<std::pair<unsigned long long, unsigned long long>, int> g_open;  // (dev, inode) -> connections

bool identity(const std::string& path, unsigned long long& dev, unsigned long long& ino) {
  struct stat st {};
  if (stat(path.c_str(), &st) != 0) return false;
  dev = static_cast<unsigned long long>(st.st_dev);
  ino = static_cast<unsigned long long>(st.st_ino);
  return true;
}

bool open_in_this_process(const std::string& path) {
  unsigned long long dev = 0, ino = 0;
  if (!identity(path, dev, ino)) return false;
  std::lock_guard<std::mutex> l(g_open_mu);
  return g_open.count({dev, ino}) > 0;
}

// True when another process holds the -shm's "DMS" lock byte, which every
// connection to a WAL database holds (shared) while it is open (SQLite
// documentation, "WAL-mode File Format", section 2.3: byte 128 of the -shm
// in the unix VFS). F_GETLK only asks; it takes no lock.
bool open_in_another_process(const std::string& shm) {
  const int fd = ::open(shm.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) return false;
  struct flock fl {};
  fl.l_type = F_WRLCK;
  fl.l_whence = SEEK_SET;
  fl.l_start = 128;
  fl.l_len = 1;
  const bool locked = fcntl(fd, F_GETLK, &fl) == 0 && fl.l_type != F_UNLCK;
  ::close(fd);
  return locked;
}

uint32_t be32(const unsigned char* p) {
  return (uint32_t{p[0]} << 24) | (uint32_t{p[1]} << 16) | (uint32_t{p[2]} << 8) | uint32_t{p[3]};
}

// SQLite's WAL checksum ("Database File Format", 4.1): over 32-bit words, big-
// or little-endian as the header's magic number says, continuing from S.
void wal_checksum(bool big_endian, const unsigned char* data, size_t n, uint32_t s[2]) {
  for (size_t i = 0; i + 8 <= n; i += 8) {
    uint32_t x0, x1;
    if (big_endian) {
      x0 = be32(data + i);
      x1 = be32(data + i + 4);
    } else {
      x0 = uint32_t{data[i]} | (uint32_t{data[i + 1]} << 8) | (uint32_t{data[i + 2]} << 16) |
           (uint32_t{data[i + 3]} << 24);
      x1 = uint32_t{data[i + 4]} | (uint32_t{data[i + 5]} << 8) | (uint32_t{data[i + 6]} << 16) |
           (uint32_t{data[i + 7]} << 24);
    }
    s[0] += x0 + s[1];
    s[1] += x1 + s[0];
  }
}

// A frame's checksum from CHAIN (the previous frame's, or the header's).
bool frame_checks(bool big_endian, const std::vector<unsigned char>& frame, const uint32_t chain[2]) {
  uint32_t s[2] = {chain[0], chain[1]};
  wal_checksum(big_endian, frame.data(), 8, s);
  wal_checksum(big_endian, frame.data() + 24, frame.size() - 24, s);
  return s[0] == be32(frame.data() + 16) && s[1] == be32(frame.data() + 20);
}

// The database's page size from its header (offset 16, big-endian, 1 = 65536);
// 0 when the file is too short to say (all of it still in the -wal).
uint32_t database_page_size(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  unsigned char h[100] = {};
  if (!f.read(reinterpret_cast<char*>(h), sizeof h)) return 0;
  if (std::memcmp(h, "SQLite format 3", 16) != 0) return 0;
  const uint32_t v = (uint32_t{h[16]} << 8) | h[17];
  return v == 1 ? 65536 : v;
}

// The -shm's header as SQLite's last connection left it ("WAL-mode File
// Format", 2.1: two copies of a 48-byte header in native byte order; mxFrame
// at offset 16, the -wal's salts at 32). False when there is none to trust.
struct ShmHeader {
  uint32_t max_frame = 0;
  unsigned char salts[8] = {};
};
bool read_shm_header(const std::string& shm, ShmHeader& out) {
  std::ifstream f(shm, std::ios::binary);
  unsigned char h[96] = {};
  if (!f.read(reinterpret_cast<char*>(h), sizeof h)) return false;
  if (std::memcmp(h, h + 48, 48) != 0) return false;  // a header being written: not a settled state
  uint32_t version = 0;
  std::memcpy(&version, h, 4);
  if (version != 3007000 || h[12] != 1) return false;  // iVersion, isInit
  std::memcpy(&out.max_frame, h + 16, 4);
  std::memcpy(out.salts, h + 32, 8);
  return true;
}

std::string file_uuid_without_wal(const std::string& path) {
  try {
    Db d(immutable_uri(path), SQLITE_OPEN_READONLY | SQLITE_OPEN_URI, Trust::Untrusted);
    return d.query_text("SELECT file_uuid FROM project WHERE id = 1");
  } catch (const std::exception&) {
    return "";
  }
}

}  // namespace

OpenFileMark::OpenFileMark(const std::string& path) {
  if (!identity(path, dev_, ino_)) return;
  std::lock_guard<std::mutex> l(g_open_mu);
  ++g_open[{dev_, ino_}];
  marked_ = true;
}

OpenFileMark::~OpenFileMark() {
  if (!marked_) return;
  std::lock_guard<std::mutex> l(g_open_mu);
  auto it = g_open.find({dev_, ino_});
  if (it != g_open.end() && --it->second == 0) g_open.erase(it);
}

WalInspection inspect_wal(const std::string& path) {
  WalInspection r;
  const std::string wal = path + "-wal", shm = path + "-shm";
  std::error_code ec;
  const auto size = fs::file_size(wal, ec);
  if (ec || size == 0) return r;
  if (open_in_this_process(path) || open_in_another_process(shm)) return r;
  r.inspected = true;
  r.file_uuid = file_uuid_without_wal(path);
  const std::string keep = "Keep copies of " + path + ", " + wal + " and " + shm + "; then ";
  const std::string move_away = "move " + wal + " and " + shm +
                                " out of the folder (the file then opens as it is shown now, as of its last "
                                "checkpoint, for writing) and re-enter what is missing, or restore a backup "
                                "(cairn restore FILE BACKUP)";
  // The index first: a writer appends frames before it counts them there.
  ShmHeader index;
  const bool have_index = read_shm_header(shm, index);

  std::ifstream f(wal, std::ios::binary);
  unsigned char h[32] = {};
  if (size < 32 || !f.read(reinterpret_cast<char*>(h), sizeof h)) {
    r.problem =
        wal + " is " + std::to_string(size) + " bytes, shorter than the 32-byte header of a -wal: it is damaged";
    r.advice = keep + move_away;
    return r;
  }
  const uint32_t magic = be32(h), version = be32(h + 4), page = be32(h + 8);
  const bool big_endian = magic == 0x377f0683;
  uint32_t chain[2] = {0, 0};
  wal_checksum(big_endian, h, 24, chain);
  const bool page_ok = page >= 512 && page <= 65536 && (page & (page - 1)) == 0;
  if ((magic & 0xfffffffe) != 0x377f0682 || version != 3007000 || !page_ok || chain[0] != be32(h + 24) ||
      chain[1] != be32(h + 28)) {
    r.problem = wal + " has a damaged header: SQLite would ignore all of it (" + std::to_string(size) +
                " bytes of changes) without a word";
    r.advice = keep + move_away;
    return r;
  }
  const uint32_t db_page = database_page_size(path);
  if (db_page != 0 && db_page != page) {
    r.problem = wal + " belongs to another database: its pages are " + std::to_string(page) + " bytes, those of " +
                path + " " + std::to_string(db_page);
    r.advice = keep + move_away;
    return r;
  }
  // A writer that restarts the -wal sets the index's new salts (with no frame
  // counted yet) before it writes the -wal's new header: a kill in between
  // leaves them different, harmlessly. Only an index that counts frames speaks.
  if (have_index && index.max_frame > 0 && std::memcmp(index.salts, h + 16, 8) != 0) {
    r.problem = wal + " does not match " + shm +
                ", the index its last session left: the -wal comes from another file or another moment (a -wal "
                "copied without its file?)";
    r.advice = keep + "if this follows a power cut and " + wal + " is the file's own, move only " + shm +
               " out of the folder and open the file again (SQLite rebuilds the index from the -wal); otherwise " +
               move_away;
    return r;
  }
  std::vector<unsigned char> frame(24 + static_cast<size_t>(page)), previous;
  long index_no = 0, first_bad = 0;
  while (f.read(reinterpret_cast<char*>(frame.data()), static_cast<std::streamsize>(frame.size()))) {
    ++index_no;
    const bool ours = std::memcmp(frame.data() + 8, h + 16, 8) == 0 && be32(frame.data()) != 0;
    const bool commit = be32(frame.data() + 4) != 0;
    if (first_bad == 0) {
      if (ours && frame_checks(big_endian, frame, chain)) {
        chain[0] = be32(frame.data() + 16);
        chain[1] = be32(frame.data() + 20);
        r.frames = index_no;
        if (commit) r.committed = index_no;
      } else {
        first_bad = index_no;
      }
    } else if (ours && commit) {
      // A later commit of the same -wal that checks from its predecessor:
      // written after the damaged frame, and SQLite would never reach it.
      const uint32_t from[2] = {be32(previous.data() + 16), be32(previous.data() + 20)};
      if (frame_checks(big_endian, frame, from)) ++r.dropped_commits;
    }
    previous.swap(frame);
    frame.resize(previous.size());
  }
  if (r.dropped_commits > 0) {
    r.problem = wal + " is damaged at frame " + std::to_string(first_bad) + " of " + std::to_string(index_no) +
                ": SQLite would keep the changes before it and silently drop " + std::to_string(r.dropped_commits) +
                " committed change" + (r.dropped_commits == 1 ? "" : "s") + " after it";
    r.advice = keep + move_away;
    return r;
  }
  if (have_index && static_cast<long>(index.max_frame) > r.committed) {
    r.problem = wal + " holds " + std::to_string(r.committed) + " committed frames where its index " + shm +
                " counts " + std::to_string(index.max_frame) + ": it was cut short or damaged, and SQLite would drop " +
                "the rest without a word";
    r.advice = keep + move_away;
    return r;
  }
  return r;
}

std::string why_not_writable(const std::string& path) {
  const fs::path folder = fs::absolute(path).parent_path();
  auto reason = [](int e) {
    return e == EROFS ? std::string("lies on read-only media") : std::string("may not be written (permissions)");
  };
  // access() asks the kernel as this user: root passes permission bits but not
  // a read-only file system.
  if (access(path.c_str(), W_OK) != 0) {
    const int e = errno;
    return path + " " + reason(e);
  }
  if (access(folder.c_str(), W_OK) != 0) {
    const int e = errno;
    return "the folder " + folder.string() + " " + reason(e) + " (Cairn keeps its -wal and -shm beside the file)";
  }
  return "";
}

FileState examine_file(const std::string& path, bool want_write) {
  FileState st;
  if (open_in_this_process(path)) return st;  // this process's connection already owns the -wal
  std::error_code ec;
  const auto wal_size = fs::file_size(path + "-wal", ec);
  const bool has_wal = !ec && wal_size > 0;
  const auto backups = list_backups(path);
  const std::string newest = backups.empty() ? std::string() : " (the newest backup is " + backups.back() + ")";
  const std::string shown = ". Cairn shows " + path +
                            " as of its last checkpoint, without the changes in its -wal, read-only, and writes "
                            "nothing. ";
  const WalInspection wal = inspect_wal(path);
  if (!wal.problem.empty()) {
    st.read_only = st.immutable = true;
    st.problem = wal.problem + shown + wal.advice + newest;
    return st;
  }
  if (wal.inspected && !wal.file_uuid.empty()) {
    // The file as SQLite reads it with its -wal must be the same project as the
    // file alone: a -wal of another project can pass every check above.
    // A read-only connection never checkpoints; NO_CKPT_ON_CLOSE says so twice.
    try {
      Db probe(path, SQLITE_OPEN_READONLY, Trust::Untrusted);
      int ok = 0;
      sqlite3_db_config(probe.handle(), SQLITE_DBCONFIG_NO_CKPT_ON_CLOSE, 1, &ok);
      const std::string live = probe.query_text("SELECT file_uuid FROM project WHERE id = 1");
      if (live != wal.file_uuid) {
        st.read_only = st.immutable = true;
        st.problem = path + "-wal belongs to another project (its file_uuid is " + live + ", the file's own " +
                     wal.file_uuid + ")" + shown + "Keep copies of the three files; then move " + path + "-wal and " +
                     path + "-shm out of the folder and open the file again" + newest;
        return st;
      }
    } catch (const std::exception&) {
      // Unreadable with its -wal: Project::open says so (damaged file).
    }
  }
  const std::string why = why_not_writable(path);
  if (why.empty()) return st;
  st.read_only = true;
  // On read-only media SQLite can read a WAL file only when its -wal and -shm
  // already lie beside it; otherwise the file is read immutable, as it lies.
  try {
    Db probe(path, SQLITE_OPEN_READONLY, Trust::Untrusted);
    probe.query_int("PRAGMA application_id");
  } catch (const std::exception&) {
    st.immutable = true;
  }
  if (want_write || (st.immutable && has_wal)) {
    st.problem = why + ": it is open read-only (list, check and export work; nothing can be changed). To edit it, " +
                 "copy it" + (has_wal ? ", with its -wal and -shm," : "") + " to a folder Cairn can write";
    if (st.immutable && has_wal)
      st.problem += ". Its -wal (" + std::to_string(wal_size) +
                    " bytes of the latest changes) cannot be read from here: they are not shown";
  }
  return st;
}

}  // namespace cairn::store
