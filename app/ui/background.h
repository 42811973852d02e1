// What a screen derives from the records (the Logbook's rows, the Net's
// drawing, the Plan's layers, the Crosscheck's list), built off the UI thread
// when the project is large, so that no frame waits for it: the screen keeps
// drawing the last value it had until the new one is there.
//
// want(key, build) names what the screen needs now. When the key is new,
// `build` runs on a worker thread (at most one at a time; a key wanted while
// one runs waits, and only the newest such key is built) or, when the caller
// asks for it in the frame (model.h, build_in_frame: the tests' reference
// rendering), at once in this call. `build` must own everything it reads (copies,
// or shared pointers to the immutable records and check result): the UI
// thread goes on changing its own state meanwhile.
//
// Immediate mode: nothing here draws; the screen asks every frame and draws
// value(). A failed build keeps the old value and gives its message in error().
#pragma once
#include <chrono>
#include <exception>
#include <functional>
#include <future>
#include <memory>
#include <string>
#include <utility>

#include "app/ui/retire.h"

namespace cairn::ui {

template <class T>
class Background {
 public:
  using Build = std::function<T()>;

  // The screen needs the value for `key`. `in_frame`: build it now, in this call.
  void want(const std::string& key, Build build, bool in_frame) {
    poll();
    if (key == wanted_) return;
    wanted_ = key;
    if (running_.valid()) {  // after the running build, only the newest key wanted meanwhile
      if (next_) retire(std::make_shared<const Build>(std::move(next_)));  // what it holds, freed off this thread
      next_ = std::move(build);
      next_key_ = key;
      return;
    }
    if (in_frame) {
      finish(key, [&] { return std::make_shared<const T>(build()); });
      return;
    }
    start(key, std::move(build));
  }

  // Takes a finished build, if any, and starts the one waiting. Called by want(); the
  // App also calls it once a frame through Derivations::poll, so that a screen
  // not drawn still gets its value.
  void poll() {
    if (!running_.valid() || running_.wait_for(std::chrono::seconds(0)) != std::future_status::ready) return;
    finish(running_key_, [&] { return running_.get(); });
    if (next_) {
      Build b = std::move(next_);
      next_ = nullptr;
      start(next_key_, std::move(b));
    }
  }

  // The newest value built (nullptr before the first), possibly for an older key.
  const T* value() const { return value_.get(); }
  std::shared_ptr<const T> shared() const { return value_; }
  // The key value() was built for.
  const std::string& value_key() const { return value_key_; }
  // Whether value() is for the key wanted last.
  bool current() const { return (value_key_ == wanted_ || failed_key_ == wanted_) && !running_.valid(); }
  bool building() const { return running_.valid(); }
  const std::string& error() const { return error_; }
  // Forgets the key, so that the next want() builds again (e.g. the theme changed).
  void invalidate() { wanted_.clear(); }

  // Waits for a build that is running (its value is taken by the next poll).
  // The App calls it before Dear ImGui's context goes: a picture drawn into
  // pixels reads the context's font atlas (soft_raster.h, RasterSetup).
  void wait() const {
    if (running_.valid()) running_.wait();
  }

  ~Background() { wait(); }  // the worker reads what `build` owns: let it end

 private:
  void start(const std::string& key, Build build) {
    running_key_ = key;
    // What the build holds (shared pointers to a season's records) is let go
    // here on the worker: the async state it lives in is freed by the UI thread.
    running_ = std::async(std::launch::async, [b = std::move(build)]() mutable {
      auto value = std::make_shared<const T>(b());
      b = nullptr;
      return value;
    });
  }

  template <class Get>
  void finish(const std::string& key, Get get) {
    try {
      retire(std::exchange(value_, get()));  // the older value is freed off the UI thread
      value_key_ = key;
      failed_key_.clear();
      error_.clear();
    } catch (const std::exception& e) {
      failed_key_ = key;  // not tried again until the key changes
      error_ = e.what();
    }
  }

  std::string wanted_, value_key_, failed_key_, running_key_, next_key_;
  std::shared_ptr<const T> value_;
  std::future<std::shared_ptr<const T>> running_;
  Build next_;
  std::string error_;
};

}  // namespace cairn::ui
