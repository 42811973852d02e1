// Temporary files and folders beside their target, never left behind: a
// registry of the live ones, removed when the process exits normally, when it
// is stopped with SIGTERM, SIGINT or SIGHUP, and, after a SIGKILL or a power
// cut, at the next start (remove_stale_temp_files). An atomic file writer
// (write beside, fsync, rename, fsync the folder) registers its temporary name
// here so that the same cleanup covers it.
//
// Names: TARGET + ".tmp-" + PID + "-" + 8 hex digits, so that a leftover names
// the process that made it, and a later run can tell a dead writer's leftover
// from a live one's.
#pragma once
#include <string>

namespace cairn::formats {

// A fresh temporary name beside TARGET (same folder, so a rename is atomic).
std::string temp_path_beside(const std::string& target);

// Adds or removes a path (file or folder) to the registry of live temporaries.
// Registration installs the exit and signal handlers once. At most 64 at a time
// (more are still removed by their owners, only not on a signal).
void register_temp(const std::string& path);
void unregister_temp(const std::string& path);

// A temporary path beside a target, registered while this object lives;
// removed on destruction unless release() was called (after a rename made it
// the target).
class TempPath {
 public:
  explicit TempPath(const std::string& target, bool directory = false);
  ~TempPath();
  TempPath(const TempPath&) = delete;
  TempPath& operator=(const TempPath&) = delete;
  const std::string& path() const { return path_; }
  void release();  // the path is no longer temporary (it was renamed): forget it

 private:
  std::string path_;
  bool live_ = true;
};

// Removes leftovers beside TARGET (TARGET.tmp-PID-xxxxxxxx, and the same
// inside TARGET's backup folder) whose process is gone. Returns how many.
int remove_stale_temp_files(const std::string& target);

}  // namespace cairn::formats
