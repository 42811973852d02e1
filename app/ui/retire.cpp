#include "app/ui/retire.h"

#include <condition_variable>
#include <deque>
#include <mutex>
#include <thread>

namespace cairn::ui {

namespace {

class Retirer {
 public:
  Retirer() : thread_([this] { run(); }) {}
  ~Retirer() {
    {
      std::lock_guard<std::mutex> l(mu_);
      stop_ = true;
    }
    wake_.notify_all();
    thread_.join();
  }
  void take(std::shared_ptr<const void> p) {
    {
      std::lock_guard<std::mutex> l(mu_);
      queue_.push_back(std::move(p));
      ++handed_;
    }
    wake_.notify_all();
  }
  unsigned long dropped() {
    std::lock_guard<std::mutex> l(mu_);
    return dropped_;
  }
  void wait() {
    std::unique_lock<std::mutex> l(mu_);
    const unsigned long target = handed_;
    done_.wait(l, [&] { return dropped_ >= target; });
  }

 private:
  void run() {
    std::unique_lock<std::mutex> l(mu_);
    for (;;) {
      wake_.wait(l, [&] { return stop_ || !queue_.empty(); });
      if (queue_.empty()) return;  // stopping, and nothing left to free
      std::shared_ptr<const void> p = std::move(queue_.front());
      queue_.pop_front();
      l.unlock();
      p.reset();  // the destructor runs here, outside the lock
      l.lock();
      ++dropped_;
      done_.notify_all();
    }
  }

  std::mutex mu_;
  std::condition_variable wake_, done_;
  std::deque<std::shared_ptr<const void>> queue_;
  unsigned long handed_ = 0, dropped_ = 0;
  bool stop_ = false;
  std::thread thread_;  // last: started once the members it uses exist
};

Retirer& retirer() {
  static Retirer r;
  return r;
}

}  // namespace

void retire(std::shared_ptr<const void> p) {
  if (p) retirer().take(std::move(p));
}

unsigned long retired_count() { return retirer().dropped(); }

void wait_retired() { retirer().wait(); }

}  // namespace cairn::ui
