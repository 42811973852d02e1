#include "app/ui/jobs.h"

namespace cairn::ui {

void JobProgress::set(float fraction, const std::string& message) {
  fraction_.store(fraction);
  std::lock_guard<std::mutex> l(mu_);
  message_ = message;
}

std::string JobProgress::message() const {
  std::lock_guard<std::mutex> l(mu_);
  return message_;
}

Jobs::~Jobs() { join(); }

bool Jobs::start(const std::string& name, std::function<std::function<void()>(JobProgress&)> work) {
  if (busy()) return false;
  if (thread_.joinable()) thread_.join();
  name_ = name;
  progress_.set(0.0f, name);
  running_.store(true);
  pending_finish_ = true;
  thread_ = std::thread([this, work = std::move(work)] {
    std::function<void()> done;
    try {
      done = work(progress_);
    } catch (const std::exception& e) {
      const std::string what = e.what();
      progress_.set(1.0f, "failed: " + what);
      done = nullptr;
    }
    {
      std::lock_guard<std::mutex> l(mu_);
      finish_ = std::move(done);
    }
    running_.store(false);
  });
  return true;
}

bool Jobs::poll() {
  if (!pending_finish_ || running_.load()) return false;
  if (thread_.joinable()) thread_.join();
  std::function<void()> f;
  {
    std::lock_guard<std::mutex> l(mu_);
    f = std::move(finish_);
    finish_ = nullptr;
  }
  pending_finish_ = false;
  if (f) f();
  return true;
}

void Jobs::join() {
  if (thread_.joinable()) thread_.join();
}

}  // namespace cairn::ui
