// Long work (import, merge, export, a full check) on a worker thread, so the UI
// keeps drawing: one job at a time, with a progress fraction and a message the
// UI reads every frame, and a completion callback run back on the UI thread.
#pragma once
#include <atomic>
#include <functional>
#include <memory>
#include <mutex>
#include <string>
#include <thread>

namespace cairn::ui {

// What a job reports while it runs (thread-safe).
class JobProgress {
 public:
  // fraction in [0, 1], or < 0 when the work has no measure.
  void set(float fraction, const std::string& message);
  float fraction() const { return fraction_.load(); }
  std::string message() const;

 private:
  std::atomic<float> fraction_{0.0f};
  mutable std::mutex mu_;
  std::string message_;
};

class Jobs {
 public:
  ~Jobs();
  // Starts `work` on a worker thread unless a job is running (then false).
  // `work` returns a function that is run on the UI thread by poll() when it is done.
  bool start(const std::string& name, std::function<std::function<void()>(JobProgress&)> work);
  bool busy() const { return running_.load() || pending_finish_; }
  const std::string& name() const { return name_; }
  const JobProgress& progress() const { return progress_; }
  // Runs the finished job's completion on this (the UI) thread; true when one ran.
  bool poll();
  // Waits for a running job (at exit).
  void join();

 private:
  std::thread thread_;
  std::atomic<bool> running_{false};
  bool pending_finish_ = false;
  std::string name_;
  JobProgress progress_;
  std::mutex mu_;
  std::function<void()> finish_;
};

}  // namespace cairn::ui
