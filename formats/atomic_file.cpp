#include "formats/atomic_file.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <stdexcept>

#include "formats/temp_files.h"

namespace fs = std::filesystem;

namespace cairn::formats {

namespace {

std::string errno_text() { return std::strerror(errno); }

fs::path folder_of(const std::string& path) {
  fs::path dir = fs::path(path).parent_path();
  return dir.empty() ? fs::path(".") : dir;
}

}  // namespace

void sync_to_disk(const std::string& path) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) throw std::runtime_error("cannot open " + path + " to flush it to disk: " + errno_text());
  const int rc = ::fsync(fd);
  const std::string why = rc != 0 ? errno_text() : "";
  ::close(fd);
  // Some file systems refuse fsync on a folder (EINVAL); the data itself is synced.
  if (rc != 0 && !(fs::is_directory(path) && why == std::strerror(EINVAL)))
    throw std::runtime_error("cannot flush " + path + " to disk: " + why);
}

void move_into_place(const std::string& tmp, const std::string& path) {
  std::error_code ec;
  sync_to_disk(tmp);
  fs::rename(tmp, path, ec);
  if (ec) throw std::runtime_error("cannot move " + tmp + " to " + path + ": " + ec.message());
  sync_to_disk(folder_of(path).string());
}

void replace_file_atomically(const std::string& path, const std::function<void(const std::string& tmp)>& fill) {
  std::error_code ec;
  const fs::path dir = folder_of(path);
  if (!fs::is_directory(dir, ec)) throw std::runtime_error("cannot write " + path + ": no folder " + dir.string());
  // Leftovers of a run that was killed while writing PATH go first; this run's
  // temporary file is registered, so that it goes on SIGTERM too (formats/temp_files.h).
  remove_stale_temp_files(path);
  TempPath tmp(path);  // removed with its SQLite companions unless released
  try {
    fill(tmp.path());
    move_into_place(tmp.path(), path);
    tmp.release();
  } catch (const std::exception& e) {
    throw std::runtime_error("cannot write " + path + ": " + e.what());
  }
}

void write_file_atomically(const std::string& path, std::string_view text) {
  replace_file_atomically(path, [&](const std::string& tmp) {
    const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
    if (fd < 0) throw std::runtime_error(errno_text());
    size_t done = 0;
    while (done < text.size()) {
      const ssize_t n = ::write(fd, text.data() + done, text.size() - done);
      if (n < 0 && errno == EINTR) continue;
      if (n <= 0) {
        const std::string why = errno_text();
        ::close(fd);
        throw std::runtime_error(why);
      }
      done += static_cast<size_t>(n);
    }
    if (::close(fd) != 0) throw std::runtime_error(errno_text());
  });
}

}  // namespace cairn::formats
