// A folder made read-only for the tests of "a project on read-only media",
// honestly for the user the tests run as: root passes every permission bit
// (access(2): "the superuser ... write access is granted"), so as root the
// folder becomes a read-only bind mount of itself in a private mount namespace
// of this process (mount(2) MS_BIND then MS_REMOUNT|MS_RDONLY, unshare(2)
// CLONE_NEWNS), which even root cannot write (EROFS); as any other user it and
// its files lose their write permission (chmod a-w). When neither can be done
// (root without CAP_SYS_ADMIN), why_not() says so and the test skips.
// It holds no checks of its own.
// Source: the Linux manual pages access(2), mount(2) and unshare(2).
#pragma once
#include <sched.h>
#include <sys/mount.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <string>
#include <vector>

namespace cairn::store::testing {

class ReadOnlyFolder {
 public:
  explicit ReadOnlyFolder(const std::string& folder) : folder_(folder) {
    namespace fs = std::filesystem;
    if (geteuid() == 0) {
      static const int ns = [] {
        if (unshare(CLONE_NEWNS) != 0) return errno;
        if (mount(nullptr, "/", nullptr, MS_REC | MS_PRIVATE, nullptr) != 0) return errno;
        return 0;
      }();
      if (ns != 0) {
        why_not_ = std::string("running as root and cannot make a private mount namespace: ") + std::strerror(ns);
        return;
      }
      if (mount(folder.c_str(), folder.c_str(), nullptr, MS_BIND, nullptr) != 0 ||
          mount(nullptr, folder.c_str(), nullptr, MS_REMOUNT | MS_BIND | MS_RDONLY, nullptr) != 0) {
        why_not_ = std::string("running as root and cannot bind-mount read-only: ") + std::strerror(errno);
        umount2(folder.c_str(), MNT_DETACH);
        return;
      }
      mounted_ = true;
      how_ = "a read-only bind mount (root)";
    } else {
      for (const auto& e : fs::directory_iterator(folder)) {
        chmod(e.path().c_str(), 0444);
        files_.push_back(e.path().string());
      }
      chmod(folder.c_str(), 0555);
      how_ = "chmod a-w";
    }
  }
  ~ReadOnlyFolder() {
    if (mounted_) umount2(folder_.c_str(), MNT_DETACH);
    if (!mounted_ && why_not_.empty()) {
      chmod(folder_.c_str(), 0755);
      for (const auto& f : files_) chmod(f.c_str(), 0644);
    }
  }
  ReadOnlyFolder(const ReadOnlyFolder&) = delete;
  ReadOnlyFolder& operator=(const ReadOnlyFolder&) = delete;

  const std::string& why_not() const { return why_not_; }
  const std::string& how() const { return how_; }

 private:
  std::string folder_, why_not_, how_;
  bool mounted_ = false;
  std::vector<std::string> files_;
};

}  // namespace cairn::store::testing
