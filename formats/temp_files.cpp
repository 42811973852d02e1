#include "formats/temp_files.h"

#include <signal.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <mutex>
#include <random>
#include <stdexcept>
#include <fmt/format.h>

namespace fs = std::filesystem;

namespace cairn::formats {

namespace {

// Fixed slots so that the signal handler touches no allocator and no lock:
// a slot is in use while `used` is set; the handler only reads.
constexpr int kSlots = 64;
constexpr size_t kPathMax = 4096;
struct Slot {
  std::atomic<bool> used{false};
  char path[kPathMax];
};
Slot g_slots[kSlots];
std::mutex g_mutex;  // registration only (never taken in the handler)
std::once_flag g_handlers;

// SQLite's companions of a database file, removed with it.
const char* const kCompanions[] = {"-wal", "-shm", "-journal"};

// Removes every registered path and its SQLite companions (unlink), or an
// empty folder (rmdir). Async-signal-safe: no allocation, no lock.
void remove_all_registered_signal_safe() {
  char buf[kPathMax + 16];
  for (auto& s : g_slots)
    if (s.used.load()) {
      if (unlink(s.path) != 0) rmdir(s.path);
      const size_t n = std::strlen(s.path);
      for (const char* c : kCompanions) {
        std::memcpy(buf, s.path, n);
        std::memcpy(buf + n, c, std::strlen(c) + 1);
        unlink(buf);
      }
    }
}

void remove_with_companions(const std::string& path) {
  std::error_code ec;
  fs::remove_all(path, ec);
  for (const char* c : kCompanions) fs::remove(path + c, ec);
}

void remove_all_registered() {
  for (auto& s : g_slots)
    if (s.used.load()) remove_with_companions(s.path);
}

struct sigaction g_old[32];

void on_signal(int sig) {
  remove_all_registered_signal_safe();
  // Then die of the signal as the process would have (exit status says so).
  sigaction(sig, &g_old[sig], nullptr);
  raise(sig);
}

void install_handlers() {
  std::atexit(remove_all_registered);
  for (int sig : {SIGTERM, SIGINT, SIGHUP}) {
    struct sigaction sa {};
    sa.sa_handler = on_signal;
    sigemptyset(&sa.sa_mask);
    sigaction(sig, &sa, &g_old[sig]);
    // A handler someone installed before us (e.g. a UI) keeps running on the
    // default path; ours only adds the cleanup.
    if (g_old[sig].sa_handler != SIG_DFL && g_old[sig].sa_handler != SIG_IGN) sigaction(sig, &g_old[sig], nullptr);
  }
}

std::string random_hex8() {
  static thread_local std::mt19937 gen(std::random_device{}());
  return fmt::format("{:08x}", static_cast<unsigned>(gen()));
}

const char* const kMarker = ".tmp-";

}  // namespace

std::string temp_path_beside(const std::string& target) {
  return target + kMarker + std::to_string(getpid()) + "-" + random_hex8();
}

void register_temp(const std::string& path) {
  std::call_once(g_handlers, install_handlers);
  if (path.size() >= kPathMax) return;
  std::lock_guard<std::mutex> lock(g_mutex);
  for (auto& s : g_slots)
    if (!s.used.load()) {
      std::memcpy(s.path, path.c_str(), path.size() + 1);
      s.used.store(true);
      return;
    }
}

void unregister_temp(const std::string& path) {
  std::lock_guard<std::mutex> lock(g_mutex);
  for (auto& s : g_slots)
    if (s.used.load() && path == s.path) {
      s.used.store(false);
      return;
    }
}

TempPath::TempPath(const std::string& target, bool directory) : path_(temp_path_beside(target)) {
  register_temp(path_);
  if (directory) {
    std::error_code ec;
    if (!fs::create_directory(path_, ec)) {
      unregister_temp(path_);
      throw std::runtime_error("cannot make the temporary folder " + path_ + ": " + ec.message());
    }
  }
}

TempPath::~TempPath() {
  if (!live_) return;
  remove_with_companions(path_);
  unregister_temp(path_);
}

void TempPath::release() {
  if (!live_) return;
  live_ = false;
  unregister_temp(path_);
}

int remove_stale_temp_files(const std::string& target) {
  int removed = 0;
  const fs::path t(target);
  const fs::path folder = t.has_parent_path() ? t.parent_path() : fs::path(".");
  const std::string base = t.filename().string();
  auto sweep = [&](const fs::path& dir, const std::string& prefix_start) {
    std::error_code ec;
    if (!fs::is_directory(dir, ec)) return;
    for (const auto& e : fs::directory_iterator(dir, ec)) {
      const std::string name = e.path().filename().string();
      if (name.rfind(prefix_start, 0) != 0) continue;
      const size_t m = name.find(kMarker, prefix_start.size());
      if (m == std::string::npos) continue;
      const long pid = std::strtol(name.c_str() + m + std::strlen(kMarker), nullptr, 10);
      if (pid <= 0) continue;
      if (pid == getpid()) continue;                                          // ours, live
      if (kill(static_cast<pid_t>(pid), 0) == 0 || errno == EPERM) continue;  // its writer is alive
      std::error_code rc;
      if (fs::remove_all(e.path(), rc) > 0) ++removed;
    }
  };
  sweep(folder, base);
  sweep(folder / (base + ".backups"), "");
  return removed;
}

}  // namespace cairn::formats
