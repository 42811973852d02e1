// The screens' background builds (app/ui/background.h): a small build is
// there in the frame that asked; a large one runs on a worker while the last
// value stays; only the newest key wanted meanwhile is built next; a failed
// build keeps the last value and says why; what a build held and the value a
// newer one replaces are freed off the UI thread (retire.h).
// Source: common practice for immediate-mode UIs that keep drawing the last
// result while a newer one is computed; no published source. Every expected
// value here follows from the calls the test makes.
#include <gtest/gtest.h>

#include <atomic>
#include <chrono>
#include <condition_variable>
#include <memory>
#include <mutex>
#include <stdexcept>
#include <string>
#include <thread>

#include "app/ui/background.h"
#include "app/ui/retire.h"

using cairn::ui::Background;

namespace {

// A gate a worker build waits at until the test opens it.
struct Gate {
  std::mutex mu;
  std::condition_variable cv;
  bool open = false;
  void wait() {
    std::unique_lock<std::mutex> l(mu);
    cv.wait(l, [&] { return open; });
  }
  void release() {
    {
      std::lock_guard<std::mutex> l(mu);
      open = true;
    }
    cv.notify_all();
  }
};

// Polls until the build is current (a bounded wait: the builds here take microseconds once released).
template <class T>
bool settle(Background<T>& b) {
  for (int i = 0; i < 20000 && !b.current(); ++i) {
    b.poll();
    std::this_thread::sleep_for(std::chrono::milliseconds(1));
  }
  return b.current();
}

}  // namespace

TEST(Background, ASmallBuildIsThereInTheSameCall) {
  Background<int> b;
  EXPECT_EQ(b.value(), nullptr);
  EXPECT_TRUE(b.current());  // nothing wanted yet
  b.want(
      "a", [] { return 7; }, true);
  ASSERT_NE(b.value(), nullptr);
  EXPECT_EQ(*b.value(), 7);
  EXPECT_TRUE(b.current());
  EXPECT_EQ(b.value_key(), "a");
  // The same key again does not build again.
  int builds = 0;
  b.want(
      "a", [&] { return ++builds; }, true);
  EXPECT_EQ(builds, 0);
  EXPECT_EQ(*b.value(), 7);
}

TEST(Background, ALargeBuildRunsOnAWorkerWhileTheLastValueStays) {
  Background<std::string> b;
  b.want(
      "one", [] { return std::string("first"); }, true);
  Gate gate;
  const auto ui = std::this_thread::get_id();
  std::atomic<bool> on_other_thread{false};
  b.want(
      "two",
      [&] {
        on_other_thread = std::this_thread::get_id() != ui;
        gate.wait();
        return std::string("second");
      },
      false);
  // The call returned with the build still waiting at the gate: the old value is shown.
  EXPECT_TRUE(b.building());
  EXPECT_FALSE(b.current());
  EXPECT_EQ(*b.value(), "first");
  EXPECT_EQ(b.value_key(), "one");
  gate.release();
  ASSERT_TRUE(settle(b));
  EXPECT_EQ(*b.value(), "second");
  EXPECT_EQ(b.value_key(), "two");
  EXPECT_TRUE(on_other_thread.load());
}

TEST(Background, OnlyTheNewestKeyWantedMeanwhileIsBuiltNext) {
  Background<int> b;
  Gate gate;
  std::atomic<int> started{0};
  b.want(
      "1",
      [&] {
        ++started;
        gate.wait();
        return 1;
      },
      false);
  // Wanted while "1" runs: only "3" follows it.
  b.want(
      "2",
      [&] {
        ++started;
        return 2;
      },
      false);
  b.want(
      "3",
      [&] {
        ++started;
        return 3;
      },
      false);
  gate.release();
  ASSERT_TRUE(settle(b));
  EXPECT_EQ(*b.value(), 3);
  EXPECT_EQ(b.value_key(), "3");
  EXPECT_EQ(started.load(), 2);
}

TEST(Background, AFailedBuildKeepsTheLastValueAndSaysWhy) {
  Background<int> b;
  b.want(
      "ok", [] { return 5; }, true);
  b.want(
      "bad", []() -> int { throw std::runtime_error("no terrain"); }, false);
  ASSERT_TRUE(settle(b));
  EXPECT_EQ(*b.value(), 5);
  EXPECT_EQ(b.value_key(), "ok");
  EXPECT_EQ(b.error(), "no terrain");
  // Not tried again for the same key; a new key builds and clears the error.
  b.want(
      "bad", []() -> int { throw std::runtime_error("tried again"); }, true);
  EXPECT_EQ(b.error(), "no terrain");
  b.want(
      "good", [] { return 6; }, true);
  EXPECT_EQ(*b.value(), 6);
  EXPECT_EQ(b.error(), "");
}

TEST(Background, InvalidateBuildsTheSameKeyAgain) {
  Background<int> b;
  int builds = 0;
  b.want(
      "k", [&] { return ++builds; }, true);
  b.invalidate();
  b.want(
      "k", [&] { return ++builds; }, true);
  EXPECT_EQ(builds, 2);
  EXPECT_EQ(*b.value(), 2);
}

TEST(Background, WaitReturnsOnlyWhenTheRunningBuildHasEnded) {
  // What the App does before Dear ImGui's context goes: a build still running
  // (which may read that context's font atlas) has ended when wait() returns.
  Background<int> b;
  Gate gate;
  std::atomic<bool> ended{false};
  b.want(
      "a",
      [&] {
        gate.wait();
        ended = true;
        return 1;
      },
      false);
  EXPECT_TRUE(b.building());
  std::thread opener([&] {
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
    gate.release();
  });
  b.wait();
  EXPECT_TRUE(ended);
  opener.join();
  b.poll();  // its value is taken as usual
  ASSERT_NE(b.value(), nullptr);
  EXPECT_EQ(*b.value(), 1);
  b.wait();  // nothing running: returns at once
}

namespace {

// Notes the thread its destructor ran on: a stand-in for a season's records,
// which take milliseconds to free.
struct Freed {
  std::mutex mu;
  std::thread::id on;
  bool done = false;
};
struct Tracked {
  std::shared_ptr<Freed> note;
  explicit Tracked(std::shared_ptr<Freed> n) : note(std::move(n)) {}
  ~Tracked() {
    std::lock_guard<std::mutex> l(note->mu);
    note->on = std::this_thread::get_id();
    note->done = true;
  }
};

}  // namespace

// A frame cannot spare the milliseconds of freeing a season's records or a
// plan's drawing: what a worker build held and the value a newer one replaces
// are freed off the thread that polls (retire.h).
TEST(Background, WhatABuildHeldAndTheValueItReplacesAreFreedOffTheUiThread) {
  const auto ui = std::this_thread::get_id();
  auto held_note = std::make_shared<Freed>(), value_note = std::make_shared<Freed>();
  Background<std::shared_ptr<Tracked>> b;
  b.want(
      "one", [n = value_note] { return std::make_shared<Tracked>(n); }, true);
  {
    auto held = std::make_shared<Tracked>(held_note);  // the build's only owner once this scope ends
    b.want(
        "two", [held] { return std::shared_ptr<Tracked>(); }, false);
  }
  ASSERT_TRUE(settle(b));
  cairn::ui::wait_retired();
  // Both were freed, and neither on this thread.
  std::lock_guard<std::mutex> l1(held_note->mu), l2(value_note->mu);
  EXPECT_TRUE(held_note->done);
  EXPECT_TRUE(value_note->done);
  EXPECT_NE(held_note->on, ui);
  EXPECT_NE(value_note->on, ui);
}

// retire() drops one reference: a value someone else still holds lives on.
TEST(Retire, OnlyTheLastReferenceFrees) {
  auto note = std::make_shared<Freed>();
  auto kept = std::make_shared<Tracked>(note);
  const unsigned long before = cairn::ui::retired_count();
  cairn::ui::retire(kept);  // a copy handed over; `kept` still holds it
  cairn::ui::wait_retired();
  EXPECT_EQ(cairn::ui::retired_count(), before + 1);
  {
    std::lock_guard<std::mutex> l(note->mu);
    EXPECT_FALSE(note->done);
  }
  cairn::ui::retire(std::move(kept));
  cairn::ui::retire(nullptr);  // ignored
  cairn::ui::wait_retired();
  EXPECT_EQ(cairn::ui::retired_count(), before + 2);
  std::lock_guard<std::mutex> l(note->mu);
  EXPECT_TRUE(note->done);
  EXPECT_NE(note->on, std::this_thread::get_id());
}
